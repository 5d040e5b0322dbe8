# Extra reference fixtures for the data-driven reference tests of
# decompose (kinds stl, classical_decomposition) and accuracy (acf_pacf,
# portmanteau), in the format of ../../../../shared/reference/README.md.
# They exercise what the shared fixtures do not: an explicit trend window
# (t_window_arg, including an even one that the Fortran raises to odd),
# other *_arg keys, R frequency 52 (a weekly slice of the Mauna Loa CO2
# record) and series without dates (start c(1, 1)).
#
# Run from the repository root:
#   Rscript decompose/testdata/refgen/extra_fixtures.R /path/to/co2_weekly.csv
# (the shared data folder holds co2_weekly.csv). Base R only; the output is
# deterministic. Every fixture records R's version and the exact call.

args <- commandArgs(trailingOnly = TRUE)
co2file <- if (length(args) >= 1) args[1] else "../shared/data/co2_weekly.csv"
ver <- R.version.string
rev <- R.version[["svn rev"]]
software <- sprintf("%s r%s", sub("^R version ", "R ", ver), rev)

num <- function(x) {
  if (length(x) == 1 && is.na(x)) return("null")
  if (is.logical(x)) return(if (x) "true" else "false")
  if (is.character(x)) return(sprintf("\"%s\"", gsub("\"", "\\\\\"", x)))
  s <- sprintf("%.17g", x)
  s[is.na(x)] <- "null"
  s
}
arr <- function(x) paste0("[", paste(vapply(as.list(x), num, ""), collapse = ", "), "]")
obj <- function(...) {
  kv <- list(...)
  paste0("{", paste(sprintf("\"%s\": %s", names(kv), unlist(kv)), collapse = ", "), "}")
}
str <- function(s) num(s)

dataset <- function(name, title, source, x) {
  tsp_ <- tsp(x)
  f <- frequency(x)
  st <- start(x)
  en <- end(x)
  obj(name = str(name), title = str(title), source = str(source), frequency = num(f),
      start = arr(st), end = arr(en), n = num(length(x)), values = arr(as.numeric(x)))
}

write_fixture <- function(dir, case, package, kind, reference, call, ds, transform, input, spec, expect, tolerance, note = NULL) {
  parts <- c(
    sprintf("\"case\": %s", str(case)),
    sprintf("\"package\": %s", str(package)),
    sprintf("\"kind\": %s", str(kind)),
    sprintf("\"reference\": %s", str(reference)),
    sprintf("\"call\": %s", str(call)),
    sprintf("\"dataset\": %s", ds),
    sprintf("\"transform\": %s", str(transform)),
    sprintf("\"input\": %s", arr(input)),
    sprintf("\"spec\": %s", spec),
    sprintf("\"expect\": %s", expect),
    sprintf("\"tolerance\": %s", tolerance))
  if (!is.null(note)) parts <- c(parts, sprintf("\"note\": %s", str(note)))
  path <- file.path(dir, paste0(case, ".json"))
  writeLines(paste0("{\n ", paste(parts, collapse = ",\n "), "\n}"), path)
  cat("wrote", path, "\n")
}

dec_dir <- "decompose/testdata/reference"
acc_dir <- "accuracy/testdata/reference"

# --- data ---------------------------------------------------------------
co2w <- read.csv(co2file, stringsAsFactors = FALSE)
from <- which(co2w$date == "1990-01-06")
wk <- co2w$co2[from:(from + 5 * 52 - 1)]
stopifnot(!anyNA(wk))
co2week <- ts(wk, frequency = 52, start = c(1990, 1))
co2w_title <- "Weekly atmospheric CO2 at Mauna Loa, 260 weeks from 1990-01-06"
co2w_source <- "Keeling, C.D. and T.P. Whorf (2004), Atmospheric CO2 concentrations derived from flask air samples at sites in the SIO network, Trends: A Compendium of Data on Global Change, CDIAC (shared/data/co2_weekly.csv, rows 1990-01-06 to 1994-12-24)"

nodate <- ts(as.numeric(nottem)[1:120], frequency = 10)   # no dates: start c(1, 1)
nodate_title <- "First 120 values of nottem as a series without dates, frequency 10"
nodate_source <- "Anderson, O. D. (1976) Time Series Analysis and Forecasting: The Box-Jenkins approach. Butterworths. Series R. [R datasets help page ?nottem]"

lynx_nd <- ts(as.numeric(lynx))                             # no dates, frequency 1
lynx_title <- "Annual Canadian Lynx trappings 1821-1934, as a series without dates"
lynx_source <- "Brockwell, P. J. and Davis, R. A. (1991) Time Series and Forecasting Methods. Second edition. Springer. Series G (page 557). [R datasets help page ?lynx]"

# --- stl ----------------------------------------------------------------
stl_fixture <- function(case, x, dsname, title, source, call, args, jumps1 = FALSE, transform = "none") {
  fit <- eval(parse(text = call), list(x = x))
  p <- frequency(x)
  spec <- c(sprintf("\"period\": %s", num(p)))
  for (a in names(args)) spec <- c(spec, sprintf("\"%s_arg\": %s", gsub(".", "_", a, fixed = TRUE), num(args[[a]])))
  periodic <- identical(args[["s.window"]], "periodic")
  robust <- isTRUE(args[["robust"]])
  spec <- c(spec,
    sprintf("\"periodic\": %s", num(periodic)),
    sprintf("\"robust\": %s", num(robust)),
    sprintf("\"jumps\": %s", str(if (jumps1) "all 1" else if (any(grepl("jump", names(args)))) "as given in the call (*_jump_arg), R defaults ceiling(window/10) for the others" else "R defaults: ceiling(window/10)")),
    sprintf("\"s_window\": %s", num(fit$win[["s"]])), sprintf("\"t_window\": %s", num(fit$win[["t"]])),
    sprintf("\"l_window\": %s", num(fit$win[["l"]])), sprintf("\"s_degree\": %s", num(fit$deg[["s"]])),
    sprintf("\"t_degree\": %s", num(fit$deg[["t"]])), sprintf("\"l_degree\": %s", num(fit$deg[["l"]])),
    sprintf("\"s_jump\": %s", num(fit$jump[["s"]])), sprintf("\"t_jump\": %s", num(fit$jump[["t"]])),
    sprintf("\"l_jump\": %s", num(fit$jump[["l"]])), sprintf("\"inner\": %s", num(fit$inner)),
    sprintf("\"outer\": %s", num(fit$outer)))
  spec <- paste0("{", paste(spec, collapse = ", "), "}")
  cmp <- fit$time.series
  expect <- obj(seasonal = arr(cmp[, "seasonal"]), trend = arr(cmp[, "trend"]),
                remainder = arr(cmp[, "remainder"]), weights = arr(fit$weights))
  tol <- obj(
    seasonal = obj(abs = num(1e-9), rel = num(1e-9), why = str("deterministic (no optimiser)")),
    trend = obj(abs = num(1e-9), rel = num(1e-9), why = str("deterministic")),
    remainder = obj(abs = num(1e-9), rel = num(1e-9), why = str("x - seasonal - trend")),
    weights = obj(abs = num(1e-9), why = str("robustness weights in [0,1] (all 1 when robust = FALSE)")))
  write_fixture(dec_dir, case, "decompose", "stl", paste(software, "stats::stl"), sub("\\bx\\b", dsname, call),
                dataset(dsname, title, source, x), transform, as.numeric(x), spec, expect, tol)
}

stl_fixture("stl_nottem_swin7_twin31", nottem, "nottem", "Average Monthly Temperatures at Nottingham, 1920-1939",
  "Anderson, O. D. (1976) Time Series Analysis and Forecasting: The Box-Jenkins approach. Butterworths. Series R. [R datasets help page ?nottem]",
  "stl(x, s.window = 7, t.window = 31)", list(s.window = 7, t.window = 31))
stl_fixture("stl_co2weekly_f52_swin7_twin20_robust", co2week, "co2week", co2w_title, co2w_source,
  "stl(x, s.window = 7, t.window = 20, robust = TRUE)", list(s.window = 7, t.window = 20, robust = TRUE))
stl_fixture("stl_nodates_f10_periodic_args", nodate, "nodate", nodate_title, nodate_source,
  "stl(x, s.window = \"periodic\", t.degree = 0, l.window = 15, inner = 3, outer = 2, t.jump = 1)",
  list(s.window = "periodic", t.degree = 0, l.window = 15, inner = 3, outer = 2, t.jump = 1))

# --- decompose ----------------------------------------------------------
dec_fixture <- function(case, x, dsname, title, source, type) {
  d <- decompose(x, type = type)
  f <- frequency(x)
  filt <- if (f %% 2 == 0) c(0.5, rep_len(1, f - 1), 0.5) / f else rep_len(1, f) / f
  spec <- obj(type = str(type), period = num(f), filter = arr(filt))
  expect <- obj(trend = arr(d$trend), seasonal = arr(d$seasonal), figure = arr(d$figure), random = arr(d$random))
  tol <- obj(trend = obj(rel = num(1e-12), why = str("centred moving average")),
             seasonal = obj(rel = num(1e-12), why = str("averages of detrended values")),
             figure = obj(rel = num(1e-12), why = str("averages of detrended values, centred")),
             random = obj(rel = num(1e-10), abs = num(1e-12), why = str("x - seasonal - trend or x/seasonal/trend")))
  call <- sprintf("decompose(%s, type = \"%s\")", dsname, type)
  write_fixture(dec_dir, case, "decompose", "classical_decomposition", paste(software, "stats::decompose"), call,
                dataset(dsname, title, source, x), "none", as.numeric(x), spec, expect, tol)
}
dec_fixture("decompose_co2weekly_f52_additive", co2week, "co2week", co2w_title, co2w_source, "additive")
dec_fixture("decompose_nodates_f10_multiplicative", nodate + 10, "nodate + 10", nodate_title, nodate_source, "multiplicative")

# --- acf / pacf ---------------------------------------------------------
acf_fixture <- function(case, x, dsname, title, source, lagmax) {
  v <- as.numeric(x)   # lags as plain counts
  a <- acf(v, lag.max = lagmax, plot = FALSE)
  cv <- acf(v, lag.max = lagmax, type = "covariance", plot = FALSE)
  pa <- pacf(v, lag.max = lagmax, plot = FALSE)
  spec <- obj(lag_max = num(lagmax), demean = num(TRUE), n = num(length(v)))
  expect <- obj(acf = obj(lags = arr(a$lag), values = arr(a$acf)),
                acov = obj(lags = arr(cv$lag), values = arr(cv$acf)),
                pacf = obj(lags = arr(pa$lag), values = arr(pa$acf)))
  tol <- obj(acf = obj(abs = num(1e-13), why = str("closed form")),
             acov = obj(rel = num(1e-12), why = str("closed form")),
             pacf = obj(abs = num(1e-11), why = str("Durbin-Levinson recursion on the acf")))
  call <- sprintf("v <- as.numeric(%s); acf(v, lag.max = %d, plot = FALSE); acf(v, lag.max = %d, type = \"covariance\", plot = FALSE); pacf(v, lag.max = %d, plot = FALSE)", dsname, lagmax, lagmax, lagmax)
  write_fixture(acc_dir, case, "tests", "acf_pacf", paste(software, "stats::acf, stats::pacf"), call,
                dataset(dsname, title, source, x), "none", v, spec, expect, tol)
}
acf_fixture("acf_co2weekly_f52", co2week, "co2week", co2w_title, co2w_source, 60)
acf_fixture("acf_lynx_nodates", lynx_nd, "lynx_nd", lynx_title, lynx_source, 25)

# --- Box.test -----------------------------------------------------------
box_fixture <- function(case, x, dsname, title, source, lags, fitdf) {
  r <- diff(as.numeric(x))
  res <- character(0)
  calls <- character(0)
  for (lag in lags) for (type in c("Ljung-Box", "Box-Pierce")) {
    b <- Box.test(r, lag = lag, type = type, fitdf = fitdf)
    res <- c(res, obj(type = str(type), lag = num(lag), fitdf = num(fitdf), statistic = num(unname(b$statistic)),
                      df = num(unname(b$parameter)), p_value = num(b$p.value)))
    calls <- c(calls, sprintf("Box.test(r, lag = %d, type = \"%s\", fitdf = %d)", lag, type, fitdf))
  }
  spec <- obj(input_is = str(sprintf("diff(as.numeric(%s))", dsname)), n = num(length(r)))
  expect <- paste0("{\"results\": [", paste(res, collapse = ", "), "]}")
  tol <- obj(statistic = obj(rel = num(1e-12), why = str("closed form from the sample autocorrelations")),
             p_value = obj(rel = num(1e-8), abs = num(1e-14), why = str("upper tail of chi-squared(lag - fitdf)")))
  call <- paste0(sprintf("r <- diff(as.numeric(%s)); ", dsname), paste(calls, collapse = "; "))
  write_fixture(acc_dir, case, "tests", "portmanteau", paste(software, "stats::Box.test"), call,
                dataset(dsname, title, source, x), "diff(x)", r, spec, expect, tol)
}
box_fixture("boxtest_co2weekly_f52_diff", co2week, "co2week", co2w_title, co2w_source, c(52, 10), 1)
