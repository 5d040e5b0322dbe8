// Package calendar holds the time arithmetic that forecasting needs:
// observation frequencies, stepping a time by whole periods, counting
// periods between two times, natural seasonal periods, and ISO 8601 weeks.
//
// # Frequencies
//
// A [Frequency] is a unit (minute, hour, day, week, month, quarter, year)
// and a positive multiple, so that "every 15 minutes" is
// Frequency{Unit: Minute, N: 15}. The zero Frequency is unset and is
// rejected by [Frequency.Validate]. Months, quarters and years step in
// calendar terms (time.Time.AddDate), so a monthly series that starts on
// the 31st keeps to the end of month rather than drifting; sub-daily and
// daily frequencies step in elapsed time in the location of the start time.
//
// # Seasonal periods
//
// [Frequency.SeasonalPeriods] gives the natural cycles of a frequency as
// real numbers (weekly data: 365.25/7 ≈ 52.18 per year), and
// [Frequency.Period] gives the primary cycle rounded to a whole number of
// observations, which is what integer-period models need.
//
// # Concurrency
//
// Every function and method here is pure and safe for concurrent use.
//
// # References
//
// ISO 8601-1:2019, Date and time — Representations for information
// interchange, clause on week dates (a year has 53 weeks exactly when it
// starts on a Thursday, or is a leap year starting on a Wednesday).
package calendar
