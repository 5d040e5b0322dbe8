package nightly

import (
	"context"
	"strconv"

	"github.com/almanac-go/almanac"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"
)

// Names of the output files (each written as NAME-SSSSS-of-NNNNN.csv
// shards, every shard with its header row).
const (
	OutputForecasts  = "forecasts"
	OutputAccuracy   = "accuracy"
	OutputStatus     = "status"
	OutputDeadLetter = "deadletter"
)

// Outputs lists the output files in the order they are described.
var Outputs = []string{OutputForecasts, OutputAccuracy, OutputStatus, OutputDeadLetter}

// StatusHeader is the header of the status file: one row for every
// series named in the input (data or hierarchy file) and one for every
// aggregate of a hierarchy.
//
//	series        the series key, or the aggregate's path ("N03/PNT")
//	role          "input" or "aggregate"
//	tree          the root of the series' hierarchy ("" outside one)
//	state         StateReconciled, StateForecast, StateFailed or StateSkipped
//	reason        why it failed, was skipped, or was not reconciled
//	model         the fitted model in its published notation
//	bands         where its bands come from: "pooled errors (N)" or
//	              "own errors (N)" when calibrated on N out-of-sample
//	              error trajectories (accuracy.Pilot), BandsModel for the
//	              model's own bands, empty without a forecast
//	observations  number of periods in the series as forecast
//	detail        the error or explanation in words
var StatusHeader = []string{"series", "role", "tree", "state", "reason", "model", "bands", "observations", "detail"}

// States of a series in the status file.
const (
	StateReconciled = "reconciled" // forecast, and reconciled with its hierarchy
	StateForecast   = "forecast"   // forecast (outside a hierarchy, or its hierarchy could not be reconciled)
	StateFailed     = "failed"     // no forecast; the dead-letter file says why
	StateSkipped    = "skipped"    // nothing to forecast (a hierarchy entry without data)
)

// Roles of a series in the status file.
const (
	RoleInput     = "input"
	RoleAggregate = "aggregate"
)

// DeadLetterHeader is the header of the dead-letter file: one row for
// every rejected input row and every series or hierarchy that failed.
//
//	source  the input file of a rejected row; "series" for a failed series,
//	        "tree" for a hierarchy that could not be reconciled
//	line    the row's line number in its file (1 is the header), or empty
//	series  the series key (or hierarchy root) concerned, if known
//	reason  a short code (the Reason... constants)
//	detail  the error in words
var DeadLetterHeader = []string{"source", "line", "series", "reason", "detail"}

// Dead-letter sources that are not files.
const (
	SourceSeries = "series"
	SourceTree   = "tree"
)

// ForecastHeader returns the header of the forecast file for the given
// interval levels:
//
//	series   the series key or aggregate path
//	period   the forecast period (a date for daily and coarser data)
//	step     1 for the first period after the data, ...
//	kind     "base" (the series' own model) or "reconciled"
//	point    the point forecast
//	bandL_low, bandL_high  the central L% prediction band, per level
//	         (almanac.BandColumns)
//
// Numbers are written with strconv 'g' -1: they read back as exactly the
// float64 computed.
func ForecastHeader(levels []float64) []string {
	h := []string{"series", "period", "step", "kind", "point"}
	for _, l := range levels {
		lo, hi := almanac.BandColumns(l)
		h = append(h, lo, hi)
	}
	return h
}

// Kinds of forecast rows.
const (
	KindBase       = "base"
	KindReconciled = "reconciled"
)

// AccuracyHeader returns the header of the accuracy file: one row per
// series (input or aggregate) and candidate of its rolling-origin
// backtest (the model, then the naive and seasonal naive benchmarks).
//
//	series, candidate  the series and the model or benchmark
//	origins            forecast origins the candidate completed
//	cells              (origin, step) pairs scored
//	mae, rmse, mase, rmsse, crps   accuracy.Scores over all cells
//	coverageL          share of actual values inside the L% band, per level
//	relative_mase      MASE divided by the baseline's (same origins)
//	baseline           the candidate relative_mase is against
func AccuracyHeader(levels []float64) []string {
	h := []string{"series", "candidate", "origins", "cells", "mae", "rmse", "mase", "rmsse", "crps"}
	for _, l := range levels {
		h = append(h, "coverage"+strconv.FormatFloat(l, 'g', -1, 64))
	}
	return append(h, "relative_mase", "baseline")
}

func deadRecord(source string, line int64, key, reason, detail string) Record {
	l := ""
	if line > 0 {
		l = strconv.FormatInt(line, 10)
	}
	return Record{Output: OutputDeadLetter, Key: key, Line: csvLine(source, l, key, reason, detail)}
}

// status describes one row of the status file.
type status struct {
	key, role, tree, state, reason, model, bands string
	obs                                          int
	detail                                       string
}

func (s status) record() Record {
	n := ""
	if s.obs > 0 {
		n = strconv.Itoa(s.obs)
	}
	return Record{Output: OutputStatus, Key: s.key, Line: csvLine(s.key, s.role, s.tree, s.state, s.reason, s.model, s.bands, n, s.detail)}
}

// counterNamespace is the namespace of the pipeline's Beam counters.
const counterNamespace = "almanac"

// count increments the counter of a series outcome: series_forecast,
// series_failed_REASON, series_skipped for input series and the same
// with "aggregates" for aggregates.
func (s status) count(ctx context.Context) {
	prefix := "series_"
	if s.role == RoleAggregate {
		prefix = "aggregates_"
	}
	name := prefix + "forecast"
	switch s.state {
	case StateFailed:
		name = prefix + "failed_" + s.reason
	case StateSkipped:
		name = prefix + "skipped"
	}
	beam.NewCounter(counterNamespace, name).Inc(ctx, 1)
}

// report writes a status row, counts it, and for a failure writes the
// dead-letter row too.
func (s status) report(ctx context.Context, emit func(Record)) {
	s.count(ctx)
	emit(s.record())
	if s.state == StateFailed {
		emit(deadRecord(SourceSeries, 0, s.key, s.reason, s.detail))
	}
}
