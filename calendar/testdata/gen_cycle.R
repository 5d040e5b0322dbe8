# Generates calendar/testdata/reference/cycle_*.json: Fourier terms of a
# seasonal cycle anchored to absolute time, computed by R from the dates
# (difftime from Monday 2000-01-03 00:00 UTC, or whole months from January
# 2000), independently of the Go code. Run from the repository root:
#   Rscript calendar/testdata/gen_cycle.R
# Deterministic: a re-run reproduces every file byte for byte.
origin_date <- as.Date("2000-01-03")
origin_time <- as.POSIXct("2000-01-03 00:00:00", tz = "UTC")

num <- function(x) sprintf("%.17g", x)
vec <- function(x) paste0("[", paste(num(x), collapse = ", "), "]")
str <- function(x) paste0("\"", gsub("\"", "\\\\\"", x), "\"")

columns <- function(t, period, k) {
  cols <- list(); names <- character(0)
  for (j in 1:k) {
    if (!(2 * j == period)) {
      cols[[length(cols) + 1]] <- sin(2 * pi * j * t / period)
      names <- c(names, sprintf("sin%d", j))
    }
    cols[[length(cols) + 1]] <- cos(2 * pi * j * t / period)
    names <- c(names, sprintf("cos%d", j))
  }
  list(cols = cols, names = names)
}

write_fixture <- function(case, call, freq, start, n, period, k, t) {
  cc <- columns(t, period, k)
  out <- c(
    "{",
    sprintf(" \"case\": %s,", str(case)),
    " \"package\": \"calendar\",",
    " \"kind\": \"cycle\",",
    sprintf(" \"reference\": %s,", str(paste(R.version.string, "(Debian 12), base functions difftime, sin, cos"))),
    sprintf(" \"call\": %s,", str(call)),
    sprintf(" \"spec\": {\"frequency\": %s, \"start\": %s, \"n\": %d, \"period\": %s, \"harmonics\": %d},",
            str(freq), str(start), n, num(period), k),
    sprintf(" \"expect\": {\"names\": [%s], \"columns\": [%s]},",
            paste(str(cc$names), collapse = ", "),
            paste(sapply(cc$cols, vec), collapse = ", ")),
    " \"tolerance\": {\"columns\": {\"abs\": 1e-9, \"why\": \"R takes sin and cos of the whole angle 2*pi*j*t/period with t up to about 2e5; the library reduces the angle to one cycle first, so the two differ by the rounding of the large angle (about 1e-11 at t = 2e5)\"}}",
    "}")
  writeLines(out, file.path("calendar", "testdata", "reference", paste0(case, ".json")))
}

# Weekly, ISO weeks from Monday 1 March 2021, the year of 365.25/7 weeks.
start <- as.Date("2021-03-01"); n <- 60; p <- 365.25 / 7; k <- 3
t <- as.numeric(difftime(start + 7 * (0:(n - 1)), origin_date, units = "days")) / 7
write_fixture("cycle_weekly_year", "t <- as.numeric(difftime(as.Date('2021-03-01') + 7*(0:59), as.Date('2000-01-03'), units='days'))/7; sin(2*pi*j*t/(365.25/7)), cos(2*pi*j*t/(365.25/7)), j = 1..3",
              "weekly", "2021-03-01T00:00:00Z", n, p, k, t)

# Weekly stamped on Sundays (weeks ending on Sunday).
start <- as.Date("2020-12-27"); n <- 40
t <- as.numeric(difftime(start + 7 * (0:(n - 1)), origin_date, units = "days")) / 7
write_fixture("cycle_weekly_sunday", "t <- as.numeric(difftime(as.Date('2020-12-27') + 7*(0:39), as.Date('2000-01-03'), units='days'))/7; sin/cos(2*pi*j*t/(365.25/7)), j = 1..2",
              "weekly", "2020-12-27T00:00:00Z", n, p, 2, t)

# Daily, the week and the year.
start <- as.Date("2023-03-01"); n <- 50
t <- as.numeric(difftime(start + 0:(n - 1), origin_date, units = "days"))
write_fixture("cycle_daily_week", "t <- as.numeric(difftime(as.Date('2023-03-01') + 0:49, as.Date('2000-01-03'), units='days')); sin/cos(2*pi*j*t/7), j = 1..3",
              "daily", "2023-03-01T00:00:00Z", n, 7, 3, t)
write_fixture("cycle_daily_year", "t <- as.numeric(difftime(as.Date('2023-03-01') + 0:49, as.Date('2000-01-03'), units='days')); sin/cos(2*pi*j*t/365.25), j = 1..4",
              "daily", "2023-03-01T00:00:00Z", n, 365.25, 4, t)

# Hourly from 05:00 UTC on 6 May 2024: the day (12 harmonics, the last
# sine left out) and the week.
start <- as.POSIXct("2024-05-06 05:00:00", tz = "UTC"); n <- 200
t <- as.numeric(difftime(start + 3600 * (0:(n - 1)), origin_time, units = "hours"))
write_fixture("cycle_hourly_day", "t <- as.numeric(difftime(as.POSIXct('2024-05-06 05:00', tz='UTC') + 3600*(0:199), as.POSIXct('2000-01-03 00:00', tz='UTC'), units='hours')); sin/cos(2*pi*j*t/24), j = 1..12 (sin12 left out)",
              "hourly", "2024-05-06T05:00:00Z", n, 24, 12, t)
write_fixture("cycle_hourly_week", "same t; sin/cos(2*pi*j*t/168), j = 1..3",
              "hourly", "2024-05-06T05:00:00Z", n, 168, 3, t)

# Monthly from July 1995: months since January 2000.
n <- 30
t <- (1995 - 2000) * 12 + (7 - 1) + 0:(n - 1)
write_fixture("cycle_monthly_year", "t <- (1995-2000)*12 + (7-1) + 0:29; sin/cos(2*pi*j*t/12), j = 1..6 (sin6 left out)",
              "monthly", "1995-07-01T00:00:00Z", n, 12, 6, t)
