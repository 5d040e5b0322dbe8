#!/usr/bin/python3
"""Generate the ets_estimated fixtures of package smoothing from statsmodels.

Run from the repository root with Debian's interpreter (statsmodels 0.13.5):

    nice /usr/bin/python3 smoothing/testdata/generate/ets_statsmodels.py \
        [--m3 ../shared/data/m3] [--out smoothing/testdata/reference]

For every series it fits the 18 ETS models statsmodels' ETSModel estimates
(error add/mul x trend none/add/add-damped x seasonal none/add/mul) with the
default settings (initialization_method="estimated", usual bounds) and writes
one fixture per fit in the format of the shared reference README (kind
ets_estimated). The series are the monthly airline passengers series
(AirPassengers; its values are read from the existing shared fixture
airpassengers_madm_estimated.json) and 20 M3 series (training parts): 10
monthly and 10 quarterly, taken at evenly spaced positions of the M3 series
list of each frequency (positions 0, k, 2k, ... with k = count // 10), a rule
that spreads the choice over the six M3 domains and the range of lengths
without looking at any result. A weekly series (frequency 52) checks
that the reference test reads any R frequency: the first 156 consecutive
complete weeks of the Mauna Loa CO2 series in ../shared/data (weekly
data; period 52 is above the seasonal states the library supports, so
only the six non-seasonal models are fitted there).

Independent check: the generator re-computes the log-likelihood at
statsmodels' estimates with its own numpy transcription of the recursion in
the shared README and stops if it differs from statsmodels' llf by more than
1e-9 (relative) for the models without multiplicative seasonality. For
multiplicative seasonality, where statsmodels' recursion is not the
innovations state-space form, it records the innovations-form
log-likelihood at statsmodels' estimates in
expect_innovations_form.llf_at_estimates (NOT statsmodels output): a lower
bound for the innovations-form maximum over the same bounds.

The output is deterministic: a re-run reproduces every file byte for byte.
"""
import argparse
import csv
import json
import math
import os
import sys
import warnings

import numpy as np
import pandas as pd
import scipy
import statsmodels
from statsmodels.tsa.exponential_smoothing.ets import ETSModel

HERE = os.path.dirname(os.path.abspath(__file__))
REFERENCE = ("statsmodels %s statsmodels.tsa.exponential_smoothing.ets.ETSModel "
             "[Python %s, statsmodels %s, scipy %s, numpy %s, pandas %s]" % (
                 statsmodels.__version__.split("+")[0], sys.version.split()[0],
                 statsmodels.__version__.split("+")[0], scipy.__version__, np.__version__, pd.__version__))
BOUNDS = ("alpha in [1e-4, 1-1e-4]; beta/alpha in [1e-4, 1-1e-4]; gamma/(1-alpha) in [1e-4, 1-1e-4]; "
          "phi in [0.8, 0.98]; initial states unbounded; initial_seasonal.<m-1> fixed at 0 (additive) / 1 (multiplicative)")
BAR = 1e-3


def models():
    for err in ("add", "mul"):
        for trend, damped in ((None, False), ("add", False), ("add", True)):
            for seas in (None, "add", "mul"):
                short = err[0].upper() + {None: "N", "add": "A"}[trend] + ("d" if damped else "") + \
                    {None: "N", "add": "A", "mul": "M"}[seas]
                yield err, trend, damped, seas, short


def innovations_llf(y, err, trend, damped, seas, m, par, l0, b0, s0):
    """llf of the innovations state-space form (Hyndman et al. 2008, Table
    2.3), statsmodels' definition of llf (shared README)."""
    alpha = par["smoothing_level"]
    beta = par.get("smoothing_trend", 0.0)
    gamma = par.get("smoothing_seasonal", 0.0)
    phi = par.get("damping_trend", 1.0) if damped else 1.0
    l, b = l0, (b0 if trend else 0.0)
    s = list(s0) if seas else [0.0]
    mm = m if seas else 1
    sse, slog = 0.0, 0.0
    for t, yt in enumerate(y):
        j = t % mm
        L = l + phi * b
        sv = s[j]
        yhat = L + sv if seas == "add" else (L * sv if seas == "mul" else L)
        a = yt - yhat
        e = a / yhat if err == "mul" else a
        if err == "mul":
            slog += math.log(yhat)
        sse += e * e
        q = a / sv if seas == "mul" else a
        l = L + alpha * q
        if trend:
            b = phi * b + beta * q
        if seas == "add":
            s[j] = sv + gamma * a
        elif seas == "mul":
            s[j] = sv + gamma * a / L
    n = len(y)
    return -n / 2 * (math.log(2 * math.pi * sse / n) + 1) - slog


def clean(v):
    if isinstance(v, (np.floating, float)):
        v = float(v)
        return None if math.isnan(v) else v
    if isinstance(v, (np.integer,)):
        return int(v)
    if isinstance(v, np.bool_):
        return bool(v)
    return v


def fit_one(case, dataset, y, m, err, trend, damped, seas, short, h):
    kw = dict(error=err, trend=trend, damped_trend=damped, seasonal=seas,
              initialization_method="estimated")
    if seas:
        kw["seasonal_periods"] = m
    call = ("y = pd.Series(input, dtype=float); model = ETSModel(y, error=%r, trend=%r, damped_trend=%r, "
            "seasonal=%r%s, initialization_method=\"estimated\"); res = model.fit(disp=False); fc = res.forecast(%d)"
            % (err, trend, damped, seas, (", seasonal_periods=%d" % m) if seas else "", h)).replace("'", '"')
    ys = pd.Series(y, dtype=float)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        model = ETSModel(ys, **kw)
        res = model.fit(disp=False)
        fc = res.forecast(h)
    names = list(model.param_names)
    params = {k: clean(v) for k, v in zip(names, res.params)}
    par = {k: params[k] for k in ("smoothing_level", "smoothing_trend", "smoothing_seasonal", "damping_trend") if k in params}
    chron = {"initial_level": clean(res.initial_level)}
    if trend:
        chron["initial_trend"] = clean(res.initial_trend)
    if seas:
        chron["initial_seasonal"] = [clean(v) for v in np.asarray(res.initial_seasonal)]
        # Reverse order of the estimated parameters (shared README).
        for j in range(m):
            assert params["initial_seasonal.%d" % j] == chron["initial_seasonal"][m - 1 - j]
    llf = float(res.llf)
    n = len(y)
    dfm = int(res.df_model)
    assert abs(res.aic - (-2 * llf + 2 * dfm)) <= 1e-9 * abs(res.aic)
    mine = innovations_llf(y, err, trend, damped, seas, m, par, chron["initial_level"],
                           chron.get("initial_trend", 0.0), chron.get("initial_seasonal", []))
    notes = {"warnings": sorted({str(w.message) for w in caught}), "bounds_used_by_statsmodels": BOUNDS}
    doc = {
        "case": case,
        "package": "smoothing",
        "kind": "ets_estimated",
        "reference": REFERENCE,
        "call": call,
        "dataset": dataset,
        "transform": "none",
        "input": [clean(v) for v in y],
        "spec": {"error": err, "trend": trend, "damped_trend": damped, "seasonal": seas,
                 "seasonal_periods": m if seas else None, "short_name": short,
                 "initialization_method": "estimated", "h": h},
        "expect": {
            "param_names": names,
            "params": params,
            "initial_state_chronological": chron,
            "llf": llf,
            "aic": clean(res.aic), "aicc": clean(res.aicc), "bic": clean(res.bic),
            "df_model": dfm, "nobs": n, "mse": clean(res.mse),
            "converged": bool(res.mle_retvals.get("converged", False)) if isinstance(res.mle_retvals, dict) else None,
            "fittedvalues": [clean(v) for v in res.fittedvalues],
            "forecast": {"h": h, "mean": [clean(v) for v in fc]},
        },
        "tolerance": {
            "llf": {"bar": "go_llf >= expect.llf - %g" % BAR, "abs": BAR,
                    "why": "optimiser dependent (statsmodels: L-BFGS-B with finite-difference gradient); "
                           "a correct fit under the same bounds must be at least as good"},
            "params": {"why": "informative only: flat likelihood surfaces let parameters differ at near-equal likelihood"},
            "forecast": {"rel": 0.01, "why": "follows the parameters"},
        },
        "notes": notes,
    }
    if seas == "mul":
        doc["expect_innovations_form"] = {
            "llf_at_estimates": mine,
            "tolerance": {"rel": 1e-9},
            "why": ("innovations-form log-likelihood (generator's numpy transcription, not statsmodels output) at "
                    "statsmodels' estimated parameters and chronological initial states; statsmodels updates "
                    "a multiplicative seasonal from the new level, so its llf is of a different recursion. "
                    "This value is a lower bound for the innovations-form maximum over the same bounds: "
                    "go_llf >= llf_at_estimates - tolerance.llf.abs"),
        }
    else:
        if abs(mine - llf) > 1e-9 * abs(llf):
            raise SystemExit("%s: numpy transcription llf %.15g differs from statsmodels %.15g" % (case, mine, llf))
    return doc


def airpassengers():
    src = os.path.join(HERE, "..", "reference", "airpassengers_madm_estimated.json")
    with open(src) as fh:
        d = json.load(fh)["dataset"]
    return d


def m3_series(folder):
    meta = {}
    with open(os.path.join(folder, "m3_series.csv")) as fh:
        for row in csv.DictReader(fh):
            meta[row["series"]] = row
    chosen = []
    for freq, fname, period in (("monthly", "m3_monthly.csv", 12), ("quarterly", "m3_quarterly.csv", 4)):
        ids = [k for k, v in meta.items() if v["frequency"] == freq]  # file order of m3_series.csv
        step = len(ids) // 10
        pick = [ids[i * step] for i in range(10)]
        vals = {k: [] for k in pick}
        with open(os.path.join(folder, fname)) as fh:
            for row in csv.DictReader(fh):
                if row["series"] in vals and row["part"] == "train":
                    vals[row["series"]].append((int(row["index"]), float(row["value"])))
        for k in pick:
            v = [x for _, x in sorted(vals[k])]
            md = meta[k]
            start = [int(md["start_year"]), int(md["start_period"])]
            dataset = {"name": "M3 " + k, "title": "M3 competition series %s (%s, %s), training part" % (k, freq, md["domain"]),
                       "source": "Makridakis, S. & Hibon, M. (2000). The M3-Competition: results, conclusions and implications. "
                                 "IJF 16:451-476; data file M3C.xls of the International Institute of Forecasters",
                       "frequency": period, "start": start, "n": len(v), "values": v}
            chosen.append((k.lower(), dataset, period, int(md["h"])))
    return chosen


def co2_weekly(path):
    rows = []
    with open(path) as fh:
        for row in csv.DictReader(fh):
            rows.append((row["date"], row["co2"]))
    run = []
    for date, v in rows:
        if v == "":
            run = []
            continue
        run.append((date, float(v)))
        if len(run) == 156:
            break
    first = pd.Timestamp(run[0][0])
    start = [int(first.year), int((first.dayofyear - 1) // 7 + 1)]
    return {"name": "co2_weekly", "title": "Weekly atmospheric CO2 at Mauna Loa (first 156 consecutive complete weeks)",
            "source": "Keeling, C.D. and T.P. Whorf (2004), Atmospheric CO2 concentrations derived from flask air samples "
                      "at sites in the SIO network, CDIAC; as shipped with statsmodels' datasets",
            "frequency": 52, "start": start, "n": len(run), "values": [v for _, v in run]}


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--m3", default=os.path.join(HERE, "..", "..", "..", "..", "shared", "data", "m3"))
    ap.add_argument("--out", default=os.path.join(HERE, "..", "reference"))
    args = ap.parse_args()
    series = [("airpassengers", airpassengers(), 12, 24)] + m3_series(args.m3)
    series.append(("co2weekly", co2_weekly(os.path.join(args.m3, "..", "co2_weekly.csv")), 52, 26))
    for name, dataset, m, h in series:
        y = [float(v) for v in dataset["values"]]
        for err, trend, damped, seas, short in models():
            if seas and m > 24:
                continue
            case = "sm18_%s_%s" % (name, short.lower())
            doc = fit_one(case, dataset, y, m, err, trend, damped, seas, short, h)
            with open(os.path.join(args.out, case + ".json"), "w") as fh:
                json.dump(doc, fh, indent=1, allow_nan=False)
                fh.write("\n")
            print(case, "%.6f" % doc["expect"]["llf"], file=sys.stderr)


if __name__ == "__main__":
    main()
