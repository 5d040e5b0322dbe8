"""Compare the speed program's workloads with R and statsmodels on the same
machine, interleaved.

Usage, from the repository root:
    nice /usr/bin/python3 internal/cmd/speed/reference/compare.py [-rounds 5] [-min-time 0.5] [-workloads a,b] [-json FILE]

Builds internal/cmd/speed, writes its inputs (speed -inputs), then runs
ROUNDS rounds, each of which times the workloads with our program, with R
(timings.R, Rscript on PATH) and with statsmodels (timings.py, run by
/usr/bin/python3), one after the other, so that a change in the machine's
load affects all three alike. Every tool reports CPU time per operation
(user + system of its process), single-threaded (GOMAXPROCS 1; R's stats
are single-threaded; OMP_NUM_THREADS=1 and OPENBLAS_NUM_THREADS=1 for
numpy). The table gives the median over the rounds and the ratios of the
reference software's time to ours, with the machine (CPU model, cores) and
the load average before and after, and the check fields (log-likelihoods,
component sums) of each tool side by side, so that one can see that the
fits agree.
"""

import argparse
import datetime
import json
import os
import statistics
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
WORKLOADS = ["airline-fit", "ets-madm-fit", "ets-select-18", "stl-monthly", "stl-weekly"]
TOOLS = ["R", "statsmodels", "almanac"]


def lines(cmd, env=None):
    out = subprocess.run(cmd, check=True, capture_output=True, text=True, env=env).stdout
    return [json.loads(l) for l in out.splitlines() if l.strip().startswith("{")]


def machine():
    model = "unknown"
    try:
        with open("/proc/cpuinfo") as fh:
            for l in fh:
                if l.startswith("model name"):
                    model = l.split(":", 1)[1].strip()
                    break
    except OSError:
        pass
    return model, os.cpu_count()


def loadavg():
    try:
        with open("/proc/loadavg") as fh:
            return " ".join(fh.read().split()[:3])
    except OSError:
        return "unknown"


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("-rounds", type=int, default=5)
    ap.add_argument("-min-time", type=float, default=0.5, dest="min_time")
    ap.add_argument("-json", default="", help="also write every measurement to this file")
    ap.add_argument("-workloads", default=",".join(WORKLOADS), help="comma-separated subset of " + ",".join(WORKLOADS))
    args = ap.parse_args()
    chosen = [w for w in args.workloads.split(",") if w]
    for w in chosen:
        if w not in WORKLOADS:
            sys.exit("unknown workload %s" % w)

    tmp = tempfile.mkdtemp(prefix="speed-compare-")
    exe = os.path.join(tmp, "speed")
    subprocess.run(["go", "build", "-o", exe, "./internal/cmd/speed"], check=True)
    inputs = os.path.join(tmp, "inputs")
    subprocess.run([exe, "-inputs", inputs], check=True)
    env = dict(os.environ, OMP_NUM_THREADS="1", OPENBLAS_NUM_THREADS="1", MKL_NUM_THREADS="1")

    model, cores = machine()
    load_before = loadavg()
    started = datetime.datetime.now(datetime.timezone.utc)
    times = {}  # (tool, workload) -> [ns]
    checks = {}
    versions = {"almanac": "this checkout"}
    for r in range(args.rounds):
        runs = [
            ("almanac", [exe, "-workloads", ",".join(chosen), "-repeats", "1", "-min-time", str(args.min_time)]),
            ("R", ["Rscript", os.path.join(HERE, "timings.R"), inputs, str(args.min_time), ",".join(chosen)]),
            ("statsmodels", ["/usr/bin/python3", os.path.join(HERE, "timings.py"), inputs, str(args.min_time), ",".join(chosen)]),
        ]
        # Rotate the order from round to round.
        runs = runs[r % 3:] + runs[:r % 3]
        for tool, cmd in runs:
            for rec in lines(cmd, env):
                times.setdefault((tool, rec["workload"]), []).append(rec["ns_per_op"])
                checks[(tool, rec["workload"])] = rec.get("check", "")
                if "version" in rec:
                    versions[tool] = rec["version"]
        print("round %d done, load %s" % (r + 1, loadavg()), file=sys.stderr)
    load_after = loadavg()

    def med(tool, w):
        v = times.get((tool, w))
        return statistics.median(v) if v else None

    def ms(v):
        return "—" if v is None else ("%.3g ms" % (v / 1e6) if v < 1e9 else "%.3g s" % (v / 1e9))

    print("Measured %s on %s (%d cores); load average %s before, %s after; %d rounds, medians; CPU time per operation, one thread." % (
        started.strftime("%Y-%m-%d %H:%M UTC"), model, cores, load_before, load_after, args.rounds))
    print("R %s, statsmodels %s. Command: nice /usr/bin/python3 internal/cmd/speed/reference/compare.py -rounds %d -min-time %g -workloads %s" % (
        versions.get("R", "?"), versions.get("statsmodels", "?"), args.rounds, args.min_time, ",".join(chosen)))
    print()
    print("| workload | R `stats` | statsmodels | almanac | R / almanac | statsmodels / almanac |")
    print("| --- | --- | --- | --- | --- | --- |")
    for w in chosen:
        a, r_, s = med("almanac", w), med("R", w), med("statsmodels", w)
        ratio = lambda x: "—" if x is None or a is None else "%.1f×" % (x / a)
        print("| %s | %s | %s | %s | %s | %s |" % (w, ms(r_), ms(s), ms(a), ratio(r_), ratio(s)))
    print()
    print("Checks (each tool's result summary):")
    for w in chosen:
        for tool in TOOLS:
            if (tool, w) in checks:
                print("  %-14s %-12s %s" % (w, tool, checks[(tool, w)]))
    if args.json:
        with open(args.json, "w") as fh:
            json.dump({"started": started.isoformat(), "cpu": model, "cores": cores, "load_before": load_before,
                       "load_after": load_after, "versions": versions,
                       "times": {"%s/%s" % k: v for k, v in times.items()},
                       "checks": {"%s/%s" % k: v for k, v in checks.items()}}, fh, indent=1)


if __name__ == "__main__":
    main()
