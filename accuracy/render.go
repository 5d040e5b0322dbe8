package accuracy

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
)

// The text and CSV layouts below are for people and spreadsheets. They
// are not a stable API: rows, wording, widths and number formats may
// change in any release. Programs should read the Comparison and Scores
// fields instead.

// rowSpec is one line of the text table: a label and how to read the
// value from Scores, with the count behind a batch average and why a
// measure can be undefined.
type rowSpec struct {
	label string
	key   string // CSV measure name
	get   func(Scores) float64
	count func(SeriesCounts) int
	// undefined says when the measure is undefined on a series (empty:
	// it is defined whenever a cell is scored).
	undefined string
	// perSeries: shown for one series only, never averaged.
	perSeries bool
}

var pointRows = []rowSpec{
	{"bias (mean error)", "mean_error", func(s Scores) float64 { return s.ME }, func(c SeriesCounts) int { return c.ME }, "", false},
	{"mean absolute error", "mae", func(s Scores) float64 { return s.MAE }, func(c SeriesCounts) int { return c.MAE }, "", false},
	{"root mean squared error", "rmse", func(s Scores) float64 { return s.RMSE }, func(c SeriesCounts) int { return c.RMSE }, "", false},
	{"median absolute error", "mdae", func(s Scores) float64 { return s.MdAE }, func(c SeriesCounts) int { return c.MdAE }, "", false},
	{"mean absolute % error", "mape", func(s Scores) float64 { return s.MAPE }, func(c SeriesCounts) int { return c.MAPE }, "an actual value is 0", false},
	{"symmetric % error (M3)", "smape", func(s Scores) float64 { return s.SMAPE }, func(c SeriesCounts) int { return c.SMAPE }, "an actual value and its forecast are both 0", false},
	{"scaled abs error (MASE)", "mase", func(s Scores) float64 { return s.MASE }, func(c SeriesCounts) int { return c.MASE }, "a training window is constant (no naive scale)", false},
	{"scaled sq error (RMSSE)", "rmsse", func(s Scores) float64 { return s.RMSSE }, func(c SeriesCounts) int { return c.RMSSE }, "a training window is constant (no naive scale)", false},
	{"tracking signal", "tracking_signal", func(s Scores) float64 { return s.TrackingSignal }, nil, "", true},
	{"CRPS", "crps", func(s Scores) float64 { return s.CRPS }, func(c SeriesCounts) int { return c.CRPS }, "a forecast has neither a normal nor a sample-path distribution", false},
}

// trackingNote explains the tracking signal wherever it is shown.
const trackingNote = "tracking signal = sum of the errors / mean absolute error (the cumulative form, Brown 1959, of the signal Trigg 1964 smooths): near 0 the forecasts are unbiased; beyond about +4 they run persistently low, below -4 persistently high"

type ratioSpec struct {
	label string
	key   string
	get   func(Ratios) float64
}

var ratioRows = []ratioSpec{
	{"absolute error", "mae_ratio", func(r Ratios) float64 { return r.MAE }},
	{"squared error (root)", "rmse_ratio", func(r Ratios) float64 { return r.RMSE }},
	{"symmetric % error", "smape_ratio", func(r Ratios) float64 { return r.SMAPE }},
	{"scaled abs error", "mase_ratio", func(r Ratios) float64 { return r.MASE }},
	{"CRPS", "crps_ratio", func(r Ratios) float64 { return r.CRPS }},
}

// num formats a value for the text table: "n/a" for NaN (undefined), a
// fixed three decimals for moderate values, four significant digits for
// large ones.
func num(v float64) string {
	switch {
	case math.IsNaN(v):
		return "n/a"
	case math.Abs(v) >= 1e6:
		return strconv.FormatFloat(v, 'g', 4, 64)
	}
	return strconv.FormatFloat(v, 'f', 3, 64)
}

func levelLabel(l float64) string { return strconv.FormatFloat(l, 'f', -1, 64) + "%" }

// baselineTag is printed under the baseline's column.
const baselineTag = "(baseline)"

// table renders one block: a label column and one column per model, with
// notes gathered for the end.
type table struct {
	names    []string
	baseline string
	labelW   int
	colW     int
	w        *bufio.Writer
	notes    []string
}

func newTable(w io.Writer, names []string, baseline string) *table {
	t := &table{names: names, baseline: baseline, labelW: 38, colW: 12, w: bufio.NewWriter(w)}
	for _, n := range names {
		t.colW = max(t.colW, len(n)+2)
	}
	return t
}

// note records a note and returns its marker, " (a)", " (b)", ...
func (t *table) note(text string) string {
	t.notes = append(t.notes, text)
	return fmt.Sprintf(" (%c)", 'a'+rune(len(t.notes)-1)%26)
}

// writeNotes prints the notes recorded, each under its marker.
func (t *table) writeNotes() {
	if len(t.notes) == 0 {
		return
	}
	fmt.Fprintln(t.w)
	for i, n := range t.notes {
		fmt.Fprintf(t.w, "(%c) %s\n", 'a'+rune(i)%26, n)
	}
}

// header prints the model names and, under the baseline's column, the
// word that marks it.
func (t *table) header() {
	fmt.Fprintf(t.w, "%-*s", t.labelW, "")
	for _, n := range t.names {
		fmt.Fprintf(t.w, " %*s", t.colW, n)
	}
	fmt.Fprintln(t.w)
	fmt.Fprintf(t.w, "%-*s", t.labelW, "")
	for _, n := range t.names {
		tag := ""
		if n == t.baseline {
			tag = baselineTag
		}
		fmt.Fprintf(t.w, " %*s", t.colW, tag)
	}
	fmt.Fprintln(t.w)
}

func (t *table) row(label string, vals []float64) {
	fmt.Fprintf(t.w, "%-*s", t.labelW, label)
	for _, v := range vals {
		fmt.Fprintf(t.w, " %*s", t.colW, num(v))
	}
	fmt.Fprintln(t.w)
}

// intervalPart is one interval measure row.
type intervalPart struct {
	label     string
	key       string
	get       func(IntervalScores) float64
	count     func(IntervalCounts) int
	undefined string
}

var intervalParts = []intervalPart{
	{"inside", "coverage", func(iv IntervalScores) float64 { return iv.Coverage }, func(c IntervalCounts) int { return c.Coverage }, "a forecast has no band at this level"},
	{"interval score", "interval_score", func(iv IntervalScores) float64 { return iv.Score }, func(c IntervalCounts) int { return c.Score }, "a forecast has no band at this level"},
	{"scaled (MSIS)", "msis", func(iv IntervalScores) float64 { return iv.MSIS }, func(c IntervalCounts) int { return c.MSIS }, "a forecast has no band, or a training window is constant"},
}

// counted says, for a batch table, over how many series the averages of
// one row were taken; nil for one series.
type counted struct {
	series int   // series compared
	n      []int // per candidate
	why    string
}

// mark returns the label with a note when some candidate's average
// covers fewer series than were compared.
func (t *table) mark(label string, c *counted) string {
	if c == nil {
		return label
	}
	short := false
	for _, n := range c.n {
		short = short || n < c.series
	}
	if !short {
		return label
	}
	var parts []string
	for i, n := range c.n {
		parts = append(parts, fmt.Sprintf("%s %d", t.names[i], n))
	}
	why := ""
	if c.why != "" {
		why = "; it is undefined on a series where " + c.why
	}
	return label + t.note(fmt.Sprintf("%s: averaged over the series where it is defined, of %d: %s%s", label, c.series, strings.Join(parts, ", "), why))
}

// scores prints the measures, the interval scores per level with the
// horizon totals beside them, and the ratios to the baseline. counts is
// nil for one series.
func (t *table) scores(levels []float64, h int, all []Scores, totals []TotalScores, ratios []Ratios, counts []SeriesCounts) {
	t.header()
	nc := len(all)
	vals := make([]float64, nc)
	cnt := func(f func(SeriesCounts) int, why string) *counted {
		if counts == nil {
			return nil
		}
		c := &counted{series: counts[0].Series, n: make([]int, nc), why: why}
		for i := range counts {
			c.n[i] = f(counts[i])
		}
		return c
	}
	for _, r := range pointRows {
		label := r.label
		if r.perSeries {
			if counts != nil {
				continue // not averaged across series
			}
			label += t.note(trackingNote)
		}
		for i, s := range all {
			vals[i] = r.get(s)
		}
		var c *counted
		if r.count != nil {
			c = cnt(r.count, r.undefined)
		}
		t.row(t.mark(label, c), vals)
	}
	total := fmt.Sprintf("%d-step total", h)
	for _, part := range []struct {
		label string
		get   func(TotalScores) float64
		count func(TotalCounts) int
	}{
		{total + ": mean abs error", func(s TotalScores) float64 { return s.MAE }, func(c TotalCounts) int { return c.MAE }},
		{total + ": scaled abs error", func(s TotalScores) float64 { return s.MASE }, func(c TotalCounts) int { return c.MASE }},
	} {
		for i, s := range totals {
			vals[i] = part.get(s)
		}
		var c *counted
		if counts != nil {
			c = cnt(func(sc SeriesCounts) int { return part.count(sc.Total) }, "a training window is constant (no naive scale)")
		}
		t.row(t.mark(part.label, c), vals)
	}
	for k, l := range levels {
		for _, p := range intervalParts {
			for i, s := range all {
				vals[i] = math.NaN()
				if k < len(s.Intervals) {
					vals[i] = p.get(s.Intervals[k])
				}
			}
			var c *counted
			if counts != nil {
				c = cnt(func(sc SeriesCounts) int {
					if k < len(sc.Intervals) {
						return p.count(sc.Intervals[k])
					}
					return 0
				}, p.undefined)
			}
			t.row(t.mark(levelLabel(l)+" band, each step: "+p.label, c), vals)
		}
		for _, p := range intervalParts {
			if p.key == "interval_score" {
				continue // in data units of a total: not comparable with the steps'
			}
			for i, s := range totals {
				vals[i] = math.NaN()
				if k < len(s.Intervals) {
					vals[i] = p.get(s.Intervals[k])
				}
			}
			var c *counted
			if counts != nil {
				c = cnt(func(sc SeriesCounts) int {
					if k < len(sc.Total.Intervals) {
						return p.count(sc.Total.Intervals[k])
					}
					return 0
				}, p.undefined)
			}
			t.row(t.mark(levelLabel(l)+" band, "+total+": "+p.label, c), vals)
		}
	}
	fmt.Fprintf(t.w, "\nratio to %s, the baseline (below 1 is better):\n", t.baseline)
	for _, r := range ratioRows {
		for i, q := range ratios {
			vals[i] = r.get(q)
		}
		t.row("  "+r.label, vals)
	}
}

// best returns the name of the model with the smallest value (ties: the
// first), or "" when every value is NaN.
func best(names []string, vals []float64) string {
	k := -1
	for i, v := range vals {
		if !math.IsNaN(v) && (k < 0 || v < vals[k]) {
			k = i
		}
	}
	if k < 0 {
		return ""
	}
	return names[k]
}

// stepBandModels names the runs whose bands of the total were summed
// from the step bounds at some origin.
func stepBandModels(runs []Run) []string {
	var out []string
	for _, r := range runs {
		for _, t := range r.Totals {
			if t.Source == TotalFromStepBands {
				out = append(out, r.Name)
				break
			}
		}
	}
	return out
}

// failureLines describes each run's failures: how many origins, and the
// first reason.
func failureLines(runs []Run, origins int) []string {
	var out []string
	for _, r := range runs {
		if len(r.Failures) == 0 {
			continue
		}
		f := r.Failures[0]
		out = append(out, fmt.Sprintf("%s failed at %d of %d origins and is scored over the others; first at %s, %s: %v", r.Name, len(r.Failures), origins, f.Time.Format(time.DateOnly), f.Stage, f.Cause))
	}
	return out
}

// WriteText writes the comparison as a plain-text table readable in a
// terminal: measures down, models across (the baseline marked under its
// name), the scores of the forecasts of the horizon total beside the
// per-step ones, then the ratios to the baseline and the scaled absolute
// error of every horizon step; notes at the end explain the marked rows.
// Failures and a cancellation are stated before the table. The layout is
// not a stable API.
func (c *Comparison) WriteText(w io.Writer) error {
	names := make([]string, len(c.Runs))
	all := make([]Scores, len(c.Runs))
	totals := make([]TotalScores, len(c.Runs))
	ratios := make([]Ratios, len(c.Runs))
	for i, r := range c.Runs {
		names[i], all[i], totals[i], ratios[i] = r.Name, r.Overall, r.Total, r.Relative
	}
	t := newTable(w, names, c.Baseline)
	key := c.Key
	if key == "" {
		key = "(no key)"
	}
	fmt.Fprintf(t.w, "backtest of %s: %d origins, %d steps ahead each, %s window, errors scaled by lag-%d naive\n",
		key, len(c.Origins), c.Horizon, c.Window, c.Period)
	if c.Partial {
		done, all := 0, 0
		for _, r := range c.Runs {
			for _, d := range r.Done {
				all++
				if d {
					done++
				}
			}
		}
		fmt.Fprintf(t.w, "PARTIAL: cancelled after %d of %d fits; the scores cover the fits done\n", done, all)
	}
	for _, l := range failureLines(c.Runs, len(c.Origins)) {
		fmt.Fprintf(t.w, "note: %s\n", l)
	}
	fmt.Fprintln(t.w)
	t.scores(c.Levels, c.Horizon, all, totals, ratios, nil)
	fmt.Fprintf(t.w, "\nscaled abs error by step ahead:\n")
	vals := make([]float64, len(c.Runs))
	for h := range c.Horizon {
		for i, r := range c.Runs {
			vals[i] = r.ByStep[h].MASE
		}
		t.row(fmt.Sprintf("  step %d", h+1), vals)
	}
	for i, r := range c.Runs {
		vals[i] = r.Overall.MASE
	}
	if b := best(names, vals); b != "" {
		fmt.Fprintf(t.w, "\nlowest scaled abs error: %s\n", b)
	}
	if m := stepBandModels(c.Runs); len(m) > 0 && len(c.Levels) > 0 {
		fmt.Fprintf(t.w, "\nthe bands of the total of %s are the sums of their step bounds (no sample paths): they assume the steps' errors move together and overstate coverage\n", strings.Join(m, ", "))
	}
	t.writeNotes()
	return t.w.Flush()
}

// maxListed caps the left-out series and fit failures listed by
// BatchComparison.WriteText.
const maxListed = 10

// seriesLabel names series i in the renderings: its key, or its position
// when it has none.
func seriesLabel(i int, key string) string {
	if key == "" {
		return fmt.Sprintf("(series %d)", i)
	}
	return key
}

// WriteText writes the batch comparison as a plain-text table: the
// measures averaged over the compared series, models across (the
// baseline marked under its name), the horizon totals beside the steps,
// then the ratios of the averages to the baseline's. A measure undefined
// on some series is averaged over the others and its row says so in a
// note; the tracking signal, which means nothing averaged across series,
// is left out. Series left out, fit failures and a cancellation are
// stated before the table (the first ten of each listed). The layout is
// not a stable API.
func (b *BatchComparison) WriteText(w io.Writer) error {
	t := newTable(w, b.Names, b.Baseline)
	var levels []float64
	origins, h := 0, 0
	for _, c := range b.Series {
		if c == nil {
			continue
		}
		if levels == nil {
			levels, h = c.Levels, c.Horizon
		}
		origins += len(c.Origins)
	}
	if len(b.Failed) == 0 {
		fmt.Fprintf(t.w, "backtest of %d series (%d origins in all), each measure averaged over the series\n", len(b.Series), origins)
	} else {
		fmt.Fprintf(t.w, "backtest of %d series, %d compared (%d origins in all), each measure averaged over the compared series\n", len(b.Series), b.Scored(), origins)
		fmt.Fprintf(t.w, "%d of %d series left out of the averages:\n", len(b.Failed), len(b.Series))
		for k, f := range b.Failed {
			if k == maxListed {
				fmt.Fprintf(t.w, "  ... and %d more\n", len(b.Failed)-maxListed)
				break
			}
			fmt.Fprintf(t.w, "  %s: %v\n", seriesLabel(f.Index, f.Key), f.Err)
		}
	}
	if b.Partial {
		fmt.Fprintln(t.w, "PARTIAL: cancelled before every fit was done; the averages cover the fits done")
	}
	if n := len(b.FitFailures); n > 0 {
		per := map[string]int{}
		for _, f := range b.FitFailures {
			per[f.Candidate]++
		}
		var parts []string
		for _, name := range b.Names {
			if per[name] > 0 {
				parts = append(parts, fmt.Sprintf("%s %d", name, per[name]))
			}
		}
		fmt.Fprintf(t.w, "%d fits failed (%s); each model is scored over the origins it completed:\n", n, strings.Join(parts, ", "))
		for k, f := range b.FitFailures {
			if k == maxListed {
				fmt.Fprintf(t.w, "  ... and %d more\n", n-maxListed)
				break
			}
			fmt.Fprintf(t.w, "  %s, %s, origin %s, %s: %v\n", seriesLabel(f.Series, f.Key), f.Candidate, f.Time.Format(time.DateOnly), f.Stage, f.Cause)
		}
	}
	fmt.Fprintln(t.w)
	if len(b.Names) == 0 || len(b.Mean) == 0 {
		fmt.Fprintln(t.w, "no series could be compared")
		return t.w.Flush()
	}
	t.scores(levels, h, b.Mean, b.Total, b.Relative, b.Counts)
	n := make([]int, len(b.Counts))
	for i, c := range b.Counts {
		n[i] = c.AvgRelMAE
	}
	label := t.mark("  abs error, geometric", &counted{series: b.Scored(), n: n, why: "the MAE of the model or the baseline is 0"})
	t.row(label, b.AvgRelMAE)
	vals := make([]float64, len(b.Names))
	for i, s := range b.Mean {
		vals[i] = s.MASE
	}
	if n := best(b.Names, vals); n != "" {
		fmt.Fprintf(t.w, "\nlowest mean scaled abs error: %s\n", n)
	}
	var runs []Run
	for _, c := range b.Series {
		if c != nil {
			runs = append(runs, c.Runs...)
		}
	}
	if m := uniq(stepBandModels(runs)); len(m) > 0 && len(levels) > 0 {
		fmt.Fprintf(t.w, "\nthe bands of the total of %s are, on some series, the sums of their step bounds (no sample paths): they assume the steps' errors move together and overstate coverage\n", strings.Join(m, ", "))
	}
	t.writeNotes()
	return t.w.Flush()
}

// uniq returns names without repeats, in first-seen order.
func uniq(names []string) []string {
	var out []string
	for _, n := range names {
		if !slices.Contains(out, n) {
			out = append(out, n)
		}
	}
	return out
}

// csvHeader is the header of the long CSV layout.
var csvHeader = []string{"series", "model", "step", "measure", "value"}

// csvNum formats a value for the CSV layout: NaN for undefined.
func csvNum(v float64) string {
	if math.IsNaN(v) {
		return "NaN"
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// csvScores writes the measures of s; perSeries rows (the tracking
// signal) only when series is one series, not the batch mean.
func csvScores(cw *csv.Writer, series, model, step string, s Scores, batch bool) error {
	if err := cw.Write([]string{series, model, step, "n", strconv.Itoa(s.N)}); err != nil {
		return err
	}
	for _, r := range pointRows {
		if r.perSeries && batch {
			continue
		}
		if err := cw.Write([]string{series, model, step, r.key, csvNum(r.get(s))}); err != nil {
			return err
		}
	}
	for _, iv := range s.Intervals {
		l := strconv.FormatFloat(iv.Level, 'f', -1, 64)
		for _, kv := range [][2]string{{"coverage_" + l, csvNum(iv.Coverage)}, {"interval_score_" + l, csvNum(iv.Score)}, {"msis_" + l, csvNum(iv.MSIS)}} {
			if err := cw.Write([]string{series, model, step, kv[0], kv[1]}); err != nil {
				return err
			}
		}
	}
	return nil
}

// csvTotal writes the horizon-total scores with measures prefixed
// "total_" and step "total".
func csvTotal(cw *csv.Writer, series, model string, s TotalScores) error {
	rows := [][2]string{{"total_n", strconv.Itoa(s.N)}, {"total_mean_error", csvNum(s.ME)}, {"total_mae", csvNum(s.MAE)}, {"total_mase", csvNum(s.MASE)}}
	for _, iv := range s.Intervals {
		l := strconv.FormatFloat(iv.Level, 'f', -1, 64)
		rows = append(rows, [2]string{"total_coverage_" + l, csvNum(iv.Coverage)}, [2]string{"total_interval_score_" + l, csvNum(iv.Score)}, [2]string{"total_msis_" + l, csvNum(iv.MSIS)})
	}
	for _, kv := range rows {
		if err := cw.Write([]string{series, model, "total", kv[0], kv[1]}); err != nil {
			return err
		}
	}
	return nil
}

func csvRatios(cw *csv.Writer, series, model string, r Ratios) error {
	for _, q := range ratioRows {
		if err := cw.Write([]string{series, model, "all", q.key, csvNum(q.get(r))}); err != nil {
			return err
		}
	}
	return nil
}

func (c *Comparison) writeCSVRows(cw *csv.Writer) error {
	if c.Partial {
		if err := cw.Write([]string{c.Key, "", "", "partial", "cancelled before every fit was done"}); err != nil {
			return err
		}
	}
	for _, r := range c.Runs {
		if err := csvScores(cw, c.Key, r.Name, "all", r.Overall, false); err != nil {
			return err
		}
		if err := csvRatios(cw, c.Key, r.Name, r.Relative); err != nil {
			return err
		}
		for h, s := range r.ByStep {
			if err := csvScores(cw, c.Key, r.Name, strconv.Itoa(h+1), s, false); err != nil {
				return err
			}
		}
		if err := csvTotal(cw, c.Key, r.Name, r.Total); err != nil {
			return err
		}
		for _, f := range r.Failures {
			if err := cw.Write([]string{c.Key, r.Name, "origin " + f.Time.Format(time.DateOnly), "fit_failed", f.Err.Error()}); err != nil {
				return err
			}
		}
	}
	return nil
}

// WriteCSV writes the comparison in long form, one number per row under
// the header series,model,step,measure,value: step is "all", the horizon
// step 1..Horizon, or "total" for the scores of the horizon totals
// (measures prefixed "total_"); ratios to the baseline have measures
// ending in "_ratio"; an undefined value is written as NaN. A failed fit
// is a row with step "origin DATE", measure "fit_failed" and the error as
// the value; a cancelled backtest has a row with measure "partial". The
// layout is not a stable API.
func (c *Comparison) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(csvHeader); err != nil {
		return err
	}
	if err := c.writeCSVRows(cw); err != nil {
		return err
	}
	cw.Flush()
	return cw.Error()
}

// BatchMeanKey is the series column of the rows that average over the
// series in BatchComparison.WriteCSV.
const BatchMeanKey = "(mean over series)"

// WriteCSV writes every series' rows as Comparison.WriteCSV does
// (including those left out of the averages, for the candidates that
// worked); then one row per series left out, with an empty model and
// step, the measure "left_out" and the reason as the value; then the
// averages over the compared series with BatchMeanKey in the series
// column: the measure "series" (the number of series compared), the
// averages (no tracking signal), and for each average the number of
// series it covers, as a measure named "series_" + the measure's. A
// cancelled batch has a row with measure "partial".
func (b *BatchComparison) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(csvHeader); err != nil {
		return err
	}
	for _, c := range b.Series {
		if c == nil {
			continue
		}
		if err := c.writeCSVRows(cw); err != nil {
			return err
		}
	}
	for _, f := range b.Failed {
		if err := cw.Write([]string{seriesLabel(f.Index, f.Key), "", "", "left_out", f.Err.Error()}); err != nil {
			return err
		}
	}
	if b.Partial {
		if err := cw.Write([]string{BatchMeanKey, "", "", "partial", "cancelled before every fit was done"}); err != nil {
			return err
		}
	}
	scored := strconv.Itoa(b.Scored())
	for i, name := range b.Names {
		if i >= len(b.Mean) {
			break
		}
		if err := cw.Write([]string{BatchMeanKey, name, "all", "series", scored}); err != nil {
			return err
		}
		if err := csvScores(cw, BatchMeanKey, name, "all", b.Mean[i], true); err != nil {
			return err
		}
		if err := csvRatios(cw, BatchMeanKey, name, b.Relative[i]); err != nil {
			return err
		}
		if err := cw.Write([]string{BatchMeanKey, name, "all", "avg_rel_mae", csvNum(b.AvgRelMAE[i])}); err != nil {
			return err
		}
		if err := csvTotal(cw, BatchMeanKey, name, b.Total[i]); err != nil {
			return err
		}
		if err := csvCounts(cw, name, b.Counts[i]); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// csvCounts writes how many series each batch average covers.
func csvCounts(cw *csv.Writer, name string, c SeriesCounts) error {
	var rows [][3]string
	for _, r := range pointRows {
		if r.count != nil {
			rows = append(rows, [3]string{"all", "series_" + r.key, strconv.Itoa(r.count(c))})
		}
	}
	for _, iv := range c.Intervals {
		l := strconv.FormatFloat(iv.Level, 'f', -1, 64)
		rows = append(rows, [3]string{"all", "series_coverage_" + l, strconv.Itoa(iv.Coverage)}, [3]string{"all", "series_interval_score_" + l, strconv.Itoa(iv.Score)}, [3]string{"all", "series_msis_" + l, strconv.Itoa(iv.MSIS)})
	}
	rows = append(rows, [3]string{"all", "series_avg_rel_mae", strconv.Itoa(c.AvgRelMAE)},
		[3]string{"total", "series_total_mae", strconv.Itoa(c.Total.MAE)}, [3]string{"total", "series_total_mase", strconv.Itoa(c.Total.MASE)})
	for _, iv := range c.Total.Intervals {
		l := strconv.FormatFloat(iv.Level, 'f', -1, 64)
		rows = append(rows, [3]string{"total", "series_total_coverage_" + l, strconv.Itoa(iv.Coverage)}, [3]string{"total", "series_total_msis_" + l, strconv.Itoa(iv.MSIS)})
	}
	for _, r := range rows {
		if err := cw.Write([]string{BatchMeanKey, name, r[0], r[1], r[2]}); err != nil {
			return err
		}
	}
	return nil
}

// String returns the text rendering of the comparison (WriteText).
func (c *Comparison) String() string {
	var sb strings.Builder
	_ = c.WriteText(&sb)
	return sb.String()
}
