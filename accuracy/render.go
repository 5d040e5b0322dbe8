package accuracy

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// The text and CSV layouts below are for people and spreadsheets. They
// are not a stable API: rows, wording, widths and number formats may
// change in any release. Programs should read the Comparison and Scores
// fields instead.

// rowSpec is one line of the text table: a label and how to read the
// value from Scores.
type rowSpec struct {
	label string
	key   string // CSV measure name
	get   func(Scores) float64
}

var pointRows = []rowSpec{
	{"bias (mean error)", "mean_error", func(s Scores) float64 { return s.ME }},
	{"mean absolute error", "mae", func(s Scores) float64 { return s.MAE }},
	{"root mean squared error", "rmse", func(s Scores) float64 { return s.RMSE }},
	{"median absolute error", "mdae", func(s Scores) float64 { return s.MdAE }},
	{"mean absolute % error", "mape", func(s Scores) float64 { return s.MAPE }},
	{"symmetric % error (M3)", "smape", func(s Scores) float64 { return s.SMAPE }},
	{"scaled abs error (MASE)", "mase", func(s Scores) float64 { return s.MASE }},
	{"scaled sq error (RMSSE)", "rmsse", func(s Scores) float64 { return s.RMSSE }},
	{"tracking signal", "tracking_signal", func(s Scores) float64 { return s.TrackingSignal }},
	{"CRPS", "crps", func(s Scores) float64 { return s.CRPS }},
}

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

// table renders one block: a label column and one column per model.
type table struct {
	names    []string
	baseline string
	labelW   int
	colW     int
	w        *bufio.Writer
}

func newTable(w io.Writer, names []string, baseline string) *table {
	t := &table{names: names, baseline: baseline, labelW: 26, colW: 10, w: bufio.NewWriter(w)}
	for _, n := range names {
		t.colW = max(t.colW, len(n)+2)
	}
	return t
}

func (t *table) header() {
	fmt.Fprintf(t.w, "%-*s", t.labelW, "")
	for _, n := range t.names {
		if n == t.baseline {
			n = "[" + n + "]"
		}
		fmt.Fprintf(t.w, " %*s", t.colW, n)
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

func (t *table) scores(levels []float64, all []Scores, ratios []Ratios) {
	t.header()
	vals := make([]float64, len(all))
	for _, r := range pointRows {
		for i, s := range all {
			vals[i] = r.get(s)
		}
		t.row(r.label, vals)
	}
	for k, l := range levels {
		for _, part := range []struct {
			label string
			get   func(IntervalScores) float64
		}{
			{"inside", func(iv IntervalScores) float64 { return iv.Coverage }},
			{"interval score", func(iv IntervalScores) float64 { return iv.Score }},
			{"scaled (MSIS)", func(iv IntervalScores) float64 { return iv.MSIS }},
		} {
			for i, s := range all {
				vals[i] = math.NaN()
				if k < len(s.Intervals) {
					vals[i] = part.get(s.Intervals[k])
				}
			}
			t.row(levelLabel(l)+" band: "+part.label, vals)
		}
	}
	fmt.Fprintf(t.w, "\nratio to [%s], below 1 is better:\n", t.baseline)
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

// WriteText writes the comparison as a plain-text table readable in a
// terminal: measures down, models across (the baseline in brackets),
// then the ratios to the baseline and the scaled absolute error of every
// horizon step. The layout is not a stable API.
func (c *Comparison) WriteText(w io.Writer) error {
	names := make([]string, len(c.Runs))
	all := make([]Scores, len(c.Runs))
	ratios := make([]Ratios, len(c.Runs))
	for i, r := range c.Runs {
		names[i], all[i], ratios[i] = r.Name, r.Overall, r.Relative
	}
	t := newTable(w, names, c.Baseline)
	key := c.Key
	if key == "" {
		key = "(no key)"
	}
	fmt.Fprintf(t.w, "backtest of %s: %d origins, %d steps ahead each, %s window, errors scaled by lag-%d naive\n\n",
		key, len(c.Origins), c.Horizon, c.Window, c.Period)
	t.scores(c.Levels, all, ratios)
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
	return t.w.Flush()
}

// maxListed caps the left-out series listed by BatchComparison.WriteText.
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
// measures averaged over the scored series, models across, then the
// ratios of the averages to the baseline's. When series were left out it
// says how many and lists them (the first ten) with the reason. The
// layout is not a stable API.
func (b *BatchComparison) WriteText(w io.Writer) error {
	t := newTable(w, b.Names, b.Baseline)
	var levels []float64
	origins := 0
	for _, c := range b.Series {
		if c == nil {
			continue
		}
		if levels == nil {
			levels = c.Levels
		}
		origins += len(c.Origins)
	}
	if len(b.Failed) == 0 {
		fmt.Fprintf(t.w, "backtest of %d series (%d origins in all), each measure averaged over the series\n\n", len(b.Series), origins)
	} else {
		fmt.Fprintf(t.w, "backtest of %d series, %d scored (%d origins in all), each measure averaged over the scored series\n", len(b.Series), b.Scored(), origins)
		fmt.Fprintf(t.w, "%d of %d series left out, the backtest failed on them:\n", len(b.Failed), len(b.Series))
		for k, f := range b.Failed {
			if k == maxListed {
				fmt.Fprintf(t.w, "  ... and %d more\n", len(b.Failed)-maxListed)
				break
			}
			fmt.Fprintf(t.w, "  %s: %v\n", seriesLabel(f.Index, f.Key), f.Err)
		}
		fmt.Fprintln(t.w)
	}
	t.scores(levels, b.Mean, b.Relative)
	t.row("  abs error, geometric", b.AvgRelMAE)
	vals := make([]float64, len(b.Names))
	for i, s := range b.Mean {
		vals[i] = s.MASE
	}
	if n := best(b.Names, vals); n != "" {
		fmt.Fprintf(t.w, "\nlowest mean scaled abs error: %s\n", n)
	}
	return t.w.Flush()
}

// csvHeader is the header of the long CSV layout.
var csvHeader = []string{"series", "model", "step", "measure", "value"}

func csvScores(cw *csv.Writer, series, model, step string, s Scores) error {
	f := func(v float64) string {
		if math.IsNaN(v) {
			return "NaN"
		}
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	if err := cw.Write([]string{series, model, step, "n", strconv.Itoa(s.N)}); err != nil {
		return err
	}
	for _, r := range pointRows {
		if err := cw.Write([]string{series, model, step, r.key, f(r.get(s))}); err != nil {
			return err
		}
	}
	for _, iv := range s.Intervals {
		l := strconv.FormatFloat(iv.Level, 'f', -1, 64)
		for _, kv := range [][2]string{{"coverage_" + l, f(iv.Coverage)}, {"interval_score_" + l, f(iv.Score)}, {"msis_" + l, f(iv.MSIS)}} {
			if err := cw.Write([]string{series, model, step, kv[0], kv[1]}); err != nil {
				return err
			}
		}
	}
	return nil
}

func csvRatios(cw *csv.Writer, series, model string, r Ratios) error {
	for _, q := range ratioRows {
		v := q.get(r)
		s := "NaN"
		if !math.IsNaN(v) {
			s = strconv.FormatFloat(v, 'g', -1, 64)
		}
		if err := cw.Write([]string{series, model, "all", q.key, s}); err != nil {
			return err
		}
	}
	return nil
}

func (c *Comparison) writeCSVRows(cw *csv.Writer) error {
	for _, r := range c.Runs {
		if err := csvScores(cw, c.Key, r.Name, "all", r.Overall); err != nil {
			return err
		}
		if err := csvRatios(cw, c.Key, r.Name, r.Relative); err != nil {
			return err
		}
		for h, s := range r.ByStep {
			if err := csvScores(cw, c.Key, r.Name, strconv.Itoa(h+1), s); err != nil {
				return err
			}
		}
	}
	return nil
}

// WriteCSV writes the comparison in long form, one number per row under
// the header series,model,step,measure,value: step is "all" or the
// horizon step 1..Horizon; ratios to the baseline have measures ending
// in "_ratio"; an undefined value is written as NaN. The layout is not a
// stable API.
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

// WriteCSV writes every scored series' rows as Comparison.WriteCSV does;
// then one row per series left out, with an empty model and step, the
// measure "left_out" and the error message as the value; then the
// averages over the scored series with BatchMeanKey in the series column,
// including the measure "series", the number of series averaged.
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
	scored := strconv.Itoa(b.Scored())
	for i, name := range b.Names {
		if err := cw.Write([]string{BatchMeanKey, name, "all", "series", scored}); err != nil {
			return err
		}
		if err := csvScores(cw, BatchMeanKey, name, "all", b.Mean[i]); err != nil {
			return err
		}
		if err := csvRatios(cw, BatchMeanKey, name, b.Relative[i]); err != nil {
			return err
		}
		v := "NaN"
		if g := b.AvgRelMAE[i]; !math.IsNaN(g) {
			v = strconv.FormatFloat(g, 'g', -1, 64)
		}
		if err := cw.Write([]string{BatchMeanKey, name, "all", "avg_rel_mae", v}); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// String returns the text rendering of the comparison (WriteText).
func (c *Comparison) String() string {
	var sb strings.Builder
	_ = c.WriteText(&sb)
	return sb.String()
}
