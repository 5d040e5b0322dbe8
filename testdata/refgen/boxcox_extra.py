"""Extra Box-Cox reference fixture (kind "boxcox") for the root package's
data-driven reference test, in the format of shared/reference/README.md:
a series of R frequency 52 (a weekly slice of the Mauna Loa CO2 record),
which the shared fixtures do not have.

Run from the repository root with the Debian Python that has scipy:
    /usr/bin/python3 testdata/refgen/boxcox_extra.py /path/to/co2_weekly.csv
Deterministic; the fixture records the software versions and the calls.
"""
import csv
import json
import sys

import numpy
import pandas
import scipy
import statsmodels
from scipy import stats

path = sys.argv[1] if len(sys.argv) > 1 else "../shared/data/co2_weekly.csv"
rows = list(csv.DictReader(open(path)))
first = next(i for i, r in enumerate(rows) if r["date"] == "1990-01-06")
x = [float(r["co2"]) for r in rows[first:first + 5 * 52]]
xa = numpy.array(x)

software = "[Python %s, statsmodels %s, scipy %s, numpy %s, pandas %s]" % (
    sys.version.split()[0], statsmodels.__version__.split("+")[0], scipy.__version__, numpy.__version__, pandas.__version__)
grid_l = [-1.0, -0.5, 0.0, 0.5, 1.0, 2.0]
lam = stats.boxcox_normmax(xa, method="mle")
calls = ["from scipy import stats", "x = dataset.values", "lam = stats.boxcox_normmax(x, method='mle')",
         "stats.boxcox_llf(lam, x)", "stats.boxcox(x, lmbda=lam)"]
grid = []
for g in grid_l:
    calls += ["stats.boxcox_llf(%r, x)" % g, "stats.boxcox(x, lmbda=%r)" % g]
    grid.append({"lambda": g, "llf": float(stats.boxcox_llf(g, xa)),
                 "transformed": [float(v) for v in stats.boxcox(xa, lmbda=g)]})

fixture = {
    "case": "boxcox_co2weekly_f52",
    "package": "tests",
    "kind": "boxcox",
    "reference": "scipy %s scipy.stats.boxcox_normmax(method='mle'), scipy.stats.boxcox, scipy.stats.boxcox_llf %s" % (scipy.__version__, software),
    "call": "; ".join(calls),
    "dataset": {
        "name": "co2week",
        "title": "Weekly atmospheric CO2 at Mauna Loa, 260 weeks from 1990-01-06",
        "source": "Keeling, C.D. and T.P. Whorf (2004), Atmospheric CO2 concentrations derived from flask air samples at sites in the SIO network, Trends: A Compendium of Data on Global Change, CDIAC (shared/data/co2_weekly.csv, rows 1990-01-06 to 1994-12-24)",
        "frequency": 52,
        "start": [1990, 1],
        "end": [1994, 52],
        "n": len(x),
        "values": x,
    },
    "transform": "none",
    "input": x,
    "spec": {"method": "mle", "optimizer": "scipy.optimize.brent with brack=(-2.0, 2.0) (scipy default) on -boxcox_llf", "grid": grid_l},
    "expect": {
        "lambda_mle": float(lam),
        "llf_at_lambda_mle": float(stats.boxcox_llf(lam, xa)),
        "transformed_at_lambda_mle": [float(v) for v in stats.boxcox(xa, lmbda=lam)],
        "grid": grid,
    },
    "tolerance": {
        "lambda_mle": {"abs": 1e-05, "why": "optimiser dependent (Brent, xtol 1.48e-8); the llf is flat at the maximum, so also check llf_at_lambda_mle"},
        "llf_at_lambda_mle": {"bar": "go_llf >= expect - 1e-9 * abs(expect)", "why": "a correct maximiser is at least as good"},
        "grid.llf": {"rel": 1e-12, "why": "closed form"},
        "transformed": {"rel": 1e-12, "why": "(x^lambda - 1)/lambda, log(x) at lambda = 0"},
    },
}
out = "testdata/reference/boxcox_co2weekly_f52.json"
with open(out, "w") as fh:
    json.dump(fixture, fh, indent=1)
    fh.write("\n")
print("wrote", out, "lambda_mle", lam)
