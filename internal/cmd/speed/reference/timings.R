# Reference timings in R's stats package for workloads of the speed
# program (internal/cmd/speed): the airline model by arima() and robust
# STL by stl() on the same data.
#
# Usage (the driver compare.py runs it):
#   Rscript internal/cmd/speed/reference/timings.R INPUTS_DIR [MIN_SECONDS [WORKLOADS]]
# INPUTS_DIR is written by `speed -inputs INPUTS_DIR`. Prints one JSON line
# per workload with the CPU time (user + system, from system.time) per
# operation: each operation is repeated until the repeats take at least
# MIN_SECONDS (default 0.5) of CPU time. WORKLOADS, a comma-separated list,
# restricts the workloads (default: all of them).
#
# Written for R 4.2 (base and stats only).

args <- commandArgs(trailingOnly = TRUE)
if (length(args) < 1) stop("usage: Rscript timings.R INPUTS_DIR [MIN_SECONDS]")
dir <- args[1]
min_time <- if (length(args) > 1) as.numeric(args[2]) else 0.5
wanted <- if (length(args) > 2) strsplit(args[3], ",")[[1]] else c("airline-fit", "stl-monthly", "stl-weekly")
read_values <- function(name) read.csv(file.path(dir, name))$value

cpu <- function(expr_fun, k) {
  t <- system.time(for (i in seq_len(k)) expr_fun(), gcFirst = TRUE)
  t[["user.self"]] + t[["sys.self"]]
}

# time_op runs f once, then k times with k chosen so that the k runs take
# at least min_time seconds; returns c(seconds per op, k).
time_op <- function(f) {
  first <- max(cpu(f, 1), 1e-4)
  k <- max(1, ceiling(min_time / first))
  repeat {
    s <- cpu(f, k)
    if (s >= min_time / 2 || k > 1e6) return(c(s / k, k))
    k <- k * 2
  }
}

emit <- function(workload, n, t, check) {
  cat(sprintf('{"tool":"R","version":"%s","workload":"%s","n":%d,"ns_per_op":%.0f,"ops":%d,"check":"%s"}\n',
              paste(R.version$major, R.version$minor, sep = "."), workload, n, t[1] * 1e9, as.integer(t[2]), check))
}

ap <- read_values("airpassengers.csv")
co2m <- read_values("co2_monthly.csv")
co2w <- read_values("co2_weekly_filled.csv")
same <- function(a, b) if (isTRUE(all.equal(a, as.numeric(b), tolerance = 0))) "data as R's" else "DATA DIFFER FROM R's"

# The airline model, R's default method (CSS then ML).
if ("airline-fit" %in% wanted) {
  x <- log(ts(ap, start = c(1949, 1), frequency = 12))
  fit <- NULL
  t <- time_op(function() fit <<- arima(x, order = c(0, 1, 1), seasonal = list(order = c(0, 1, 1), period = 12)))
  emit("airline-fit", length(x), t, sprintf("loglik %.6f; AirPassengers %s", fit$loglik, same(ap, AirPassengers)))
}

# Robust STL, s.window = 7, R's defaults otherwise (windows, jumps, inner 1
# and outer 15 passes when robust).
stl_check <- function(d) sprintf("sum seasonal %.6f sum trend %.6f", sum(d$time.series[, "seasonal"]), sum(d$time.series[, "trend"]))
d <- NULL
if ("stl-monthly" %in% wanted) {
  y <- ts(co2m, start = c(1959, 1), frequency = 12)
  t <- time_op(function() d <<- stl(y, s.window = 7, robust = TRUE))
  emit("stl-monthly", length(y), t, paste(stl_check(d), "; co2", same(co2m, co2)))
}
if ("stl-weekly" %in% wanted) {
  y <- ts(co2w, frequency = 52)
  t <- time_op(function() d <<- stl(y, s.window = 7, robust = TRUE))
  emit("stl-weekly", length(y), t, stl_check(d))
}
