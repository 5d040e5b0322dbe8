"""Reference timings in statsmodels for workloads of the speed program
(internal/cmd/speed): ETS(M,Ad,M), the 18-model ETS selection by AICc,
robust STL with R's settings, and the airline model by SARIMAX, on the
same data.

Usage (the driver compare.py runs it):
    /usr/bin/python3 internal/cmd/speed/reference/timings.py INPUTS_DIR [MIN_SECONDS [WORKLOADS]]

INPUTS_DIR is written by `speed -inputs INPUTS_DIR`. Prints one JSON line
per workload with the CPU time of the process (time.process_time) per
operation: each operation is repeated until the repeats take at least
MIN_SECONDS (default 0.5). WORKLOADS, a comma-separated list, restricts the
workloads (default: all). Set OMP_NUM_THREADS=1 and OPENBLAS_NUM_THREADS=1
(the driver does) so that numpy uses one core.

Written for statsmodels 0.13.5 (Debian's /usr/bin/python3).
"""

import json
import math
import os
import sys
import time
import warnings

import numpy as np
import statsmodels
from statsmodels.tsa.exponential_smoothing.ets import ETSModel
from statsmodels.tsa.seasonal import STL
from statsmodels.tsa.statespace.sarimax import SARIMAX

warnings.simplefilter("ignore")


def read_values(dirname, name):
    with open(os.path.join(dirname, name)) as fh:
        lines = fh.read().split()
    return np.array([float(v) for v in lines[1:]])


def time_op(f, min_time):
    """Seconds of CPU time per call of f, and the number of calls timed."""
    t0 = time.process_time()
    f()
    first = max(time.process_time() - t0, 1e-4)
    k = max(1, math.ceil(min_time / first))
    while True:
        t0 = time.process_time()
        for _ in range(k):
            f()
        s = time.process_time() - t0
        if s >= min_time / 2 or k > 10**6:
            return s / k, k
        k *= 2


def emit(workload, n, t, check):
    print(json.dumps({"tool": "statsmodels", "version": statsmodels.__version__, "workload": workload,
                      "n": n, "ns_per_op": round(t[0] * 1e9), "ops": t[1], "check": check}), flush=True)


def next_odd(x):
    r = int(round(x))  # R's nextodd rounds half to even, as Python's round
    return r + 1 if r % 2 == 0 else r


def stl_r_settings(period, s_window):
    """R's stl defaults for a robust fit with a numeric s.window."""
    t_window = next_odd(math.ceil(1.5 * period / (1 - 1.5 / s_window)))
    l_window = next_odd(period)
    return dict(period=period, seasonal=s_window, trend=t_window, low_pass=l_window,
                seasonal_deg=0, trend_deg=1, low_pass_deg=1, robust=True,
                seasonal_jump=math.ceil(s_window / 10), trend_jump=math.ceil(t_window / 10),
                low_pass_jump=math.ceil(l_window / 10))


def main():
    if len(sys.argv) < 2:
        sys.exit("usage: timings.py INPUTS_DIR [MIN_SECONDS]")
    d = sys.argv[1]
    min_time = float(sys.argv[2]) if len(sys.argv) > 2 else 0.5
    wanted = sys.argv[3].split(",") if len(sys.argv) > 3 else ["airline-fit", "ets-madm-fit", "ets-select-18", "stl-monthly", "stl-weekly"]
    ap = read_values(d, "airpassengers.csv")
    co2m = read_values(d, "co2_monthly.csv")
    co2w = read_values(d, "co2_weekly_filled.csv")

    res = {}

    def airline():
        res["airline"] = SARIMAX(np.log(ap), order=(0, 1, 1), seasonal_order=(0, 1, 1, 12)).fit(disp=False)
    if "airline-fit" in wanted:
        t = time_op(airline, min_time)
        emit("airline-fit", len(ap), t, "loglik %.6f (SARIMAX, exact diffuse)" % res["airline"].llf)

    def madm():
        res["madm"] = ETSModel(ap, error="mul", trend="add", damped_trend=True, seasonal="mul",
                               seasonal_periods=12).fit(disp=False)
    if "ets-madm-fit" in wanted:
        t = time_op(madm, min_time)
        emit("ets-madm-fit", len(ap), t, "ETS(M,Ad,M) loglik %.6f" % res["madm"].llf)

    def select18():
        best = None
        for error in ("add", "mul"):
            for trend, damped in ((None, False), ("add", False), ("add", True)):
                for seasonal in (None, "add", "mul"):
                    fit = ETSModel(ap, error=error, trend=trend, damped_trend=damped, seasonal=seasonal,
                                   seasonal_periods=12 if seasonal else None).fit(disp=False)
                    if best is None or fit.aicc < best[0]:
                        name = "ETS(%s,%s,%s)" % (error[0].upper(),
                                                  "N" if trend is None else ("Ad" if damped else "A"),
                                                  "N" if seasonal is None else seasonal[0].upper())
                        best = (fit.aicc, name)
        res["select"] = best
    if "ets-select-18" in wanted:
        t = time_op(select18, min_time)
        emit("ets-select-18", len(ap), t, "%s (AICc %.4f)" % (res["select"][1], res["select"][0]))

    for workload, y, period in (("stl-monthly", co2m, 12), ("stl-weekly", co2w, 52)):
        if workload not in wanted:
            continue
        s = stl_r_settings(period, 7)

        def decompose():
            res["stl"] = STL(y, **s).fit(inner_iter=1, outer_iter=15)
        t = time_op(decompose, min_time)
        emit(workload, len(y), t, "sum seasonal %.6f sum trend %.6f" % (res["stl"].seasonal.sum(), res["stl"].trend.sum()))


if __name__ == "__main__":
    main()
