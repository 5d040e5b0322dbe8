package accuracy

import (
	"fmt"
	"html/template"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// pageData is what the review template renders.
type pageData struct {
	Title, About string
	Levels       []string // coverage columns, "80%"
	Marks        []reviewMark
	Glance       []glance
	Rows         []rowData
	Script       template.JS
}

// glance is one count in the line under the title.
type glance struct {
	N    int
	What string
	Cls  string
}

// cell is a value of the summary table: its text, the value the table
// sorts by ("" sorts last), and an optional class and tooltip.
type cell struct {
	Text, Sort, Cls, Tip string
}

type rowData struct {
	ID, Key          string
	N                int
	Status           cell
	Route, Model     string
	MASE, Ratio      cell
	Coverage         []cell
	Bias, Filled     cell
	Flags            []reviewMark
	FlagIDs, Find    string
	Chart            template.HTML
	Reason           string
	Facts            []fact
	Members          []string
	Fallbacks, Notes []string
	Repairs          []repairRow
	Backtest         *backtestData
	BacktestErr      string
}

type fact struct{ Label, Value string }

type repairRow struct{ When, Was, Now, Why string }

type backtestData struct {
	Summary string
	Levels  []string
	Runs    []backtestRun
	Notes   []string
}

type backtestRun struct {
	Name, Tag, MASE, Ratio, MAE, Bias, Failed string
	Coverage                                  []string
	Used                                      bool
}

// num2 formats a score with two decimals, "–" when undefined.
func num2(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "–"
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// sortKey is the value a numeric cell sorts by, "" when undefined.
func sortKey(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// percent formats a fraction as a whole percentage.
func percent(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "–"
	}
	return strconv.FormatFloat(100*v, 'f', 0, 64) + "%"
}

// periodLabel formats the time of an observation of y.
func periodLabel(t time.Time, y almanac.Series) string {
	switch y.Freq.Unit {
	case calendar.Year:
		return t.Format("2006")
	case calendar.Month, calendar.Quarter:
		return t.Format("Jan 2006")
	case calendar.Minute, calendar.Hour:
		return t.Format("2006-01-02 15:04")
	}
	return t.Format(time.DateOnly)
}

// buildPage validates r and lays out everything the template shows.
func buildPage(r Review) (*pageData, error) {
	if len(r.Series) == 0 {
		return nil, fmt.Errorf("accuracy: review: %w: no series", almanac.ErrEmpty)
	}
	if err := almanac.CheckLevels(r.Levels...); err != nil {
		return nil, fmt.Errorf("accuracy: review: %w", err)
	}
	if r.Shown < 0 {
		return nil, fmt.Errorf("accuracy: review: %w: %d observations shown", almanac.ErrInvalid, r.Shown)
	}
	shown := r.Shown
	if shown == 0 {
		shown = DefaultReviewShown
	}
	p := &pageData{Title: r.Title, About: r.About, Marks: reviewMarks, Script: template.JS(reviewScript)}
	if p.Title == "" {
		p.Title = "Forecast review"
	}
	// The coverage columns: every level of every backtest, ascending.
	var levels []float64
	for _, rs := range r.Series {
		if rs.Backtest != nil {
			for _, l := range rs.Backtest.Levels {
				if !slices.Contains(levels, l) {
					levels = append(levels, l)
				}
			}
		}
	}
	slices.Sort(levels)
	for _, l := range levels {
		p.Levels = append(p.Levels, pct(l))
	}
	counts := map[string]int{}
	for i, rs := range r.Series {
		row, err := buildRow(i, rs, r.Levels, levels, shown)
		if err != nil {
			return nil, err
		}
		for _, m := range row.Flags {
			counts[m.ID]++
		}
		p.Rows = append(p.Rows, row)
	}
	p.Glance = append(p.Glance, glance{len(r.Series), "series", ""})
	for _, m := range reviewMarks {
		if counts[m.ID] > 0 {
			p.Glance = append(p.Glance, glance{counts[m.ID], m.Label, "flag-" + m.ID})
		}
	}
	return p, nil
}

// buildRow validates one entry and lays out its row and section.
func buildRow(i int, rs ReviewSeries, drawLevels, levels []float64, shown int) (rowData, error) {
	key := seriesKey(i, rs)
	row := rowData{ID: "s" + strconv.Itoa(i+1), Key: key, N: i + 1, Route: rs.Route, Model: rs.Model,
		Members: rs.Members, Fallbacks: rs.Fallbacks, Notes: slices.Clone(rs.Notes)}
	failed := rs.Err != nil
	in := chartInput{title: key, shown: shown}
	if failed {
		row.Reason = rs.Err.Error()
		row.Model = "–"
		if err := checkCommon(key, rs); err != nil {
			return rowData{}, err
		}
		// Draw what can be drawn of the data.
		y := rs.History
		if y.Freq.Validate() == nil && !slices.ContainsFunc(y.Values, func(v float64) bool { return math.IsInf(v, 0) }) {
			in.y = y
			if len(rs.Fitted) == y.Len() && !slices.ContainsFunc(rs.Fitted, func(v float64) bool { return math.IsInf(v, 0) }) {
				in.fitted = rs.Fitted
			}
		}
	} else {
		if err := checkReviewSeries(key, rs); err != nil {
			return rowData{}, err
		}
		bands, notes, err := bandsOf(key, rs.Forecast, drawLevels)
		if err != nil {
			return rowData{}, err
		}
		row.Notes = append(row.Notes, notes...)
		off, _ := rs.History.Index(rs.Forecast.Start)
		fc := rs.Forecast
		in.y, in.fitted, in.fc, in.off, in.bands = rs.History, rs.Fitted, &fc, off, bands
	}
	if in.y.Len() > 0 {
		for _, c := range rs.Repairs {
			k, _ := in.y.Index(c.Time)
			in.repairs = append(in.repairs, k)
			in.filled = append(in.filled, c.New)
		}
	}
	row.Chart = template.HTML(drawChart(in))

	// Status.
	switch {
	case failed:
		row.Status = cell{Text: "failed", Sort: "3", Cls: "st-failed"}
	case len(rs.Fallbacks) > 0:
		row.Status = cell{Text: "fell back", Sort: "2", Cls: "st-fallback"}
	default:
		row.Status = cell{Text: "forecast", Sort: "1", Cls: "st-ok"}
	}
	if row.Route == "" {
		row.Route = "–"
	}
	if row.Model == "" {
		row.Model = "–"
	}
	flags := map[string]bool{"failed": failed, "fallback": len(rs.Fallbacks) > 0, "filled": len(rs.Repairs) > 0}

	// Backtest scores of the run that made the forecast.
	run := chosenRun(rs.Backtest, rs.Chosen)
	row.MASE, row.Ratio = cell{Text: "–"}, cell{Text: "–"}
	row.Coverage = make([]cell, len(levels))
	for k := range row.Coverage {
		row.Coverage[k] = cell{Text: "–"}
	}
	if run != nil {
		c := rs.Backtest
		row.MASE = cell{Text: num2(run.Overall.MASE), Sort: sortKey(run.Overall.MASE)}
		if run.Name != c.Baseline {
			q := run.Relative.MASE
			row.Ratio = cell{Text: num2(q), Sort: sortKey(q), Tip: "scaled error of " + run.Name + " divided by that of " + c.Baseline}
			if q > 1 {
				row.Ratio.Cls = "warn"
				flags["behind"] = true
			}
		} else {
			row.Ratio = cell{Text: "baseline", Sort: "1", Tip: run.Name + " is the baseline itself"}
		}
		for k, l := range levels {
			iv, ok := run.Overall.Interval(l)
			if !ok || math.IsNaN(iv.Coverage) {
				continue
			}
			row.Coverage[k] = cell{Text: percent(iv.Coverage), Sort: sortKey(iv.Coverage),
				Tip: fmt.Sprintf("%s of %d outcomes in the backtest fell inside the %s band", percent(iv.Coverage), run.Overall.N, pct(l))}
			if iv.Coverage < l/100-narrowBy {
				row.Coverage[k].Cls = "warn"
				flags["narrow"] = true
			}
		}
	}
	if run == nil && !failed {
		flags["untested"] = true
	}
	if rs.BacktestErr != nil {
		row.BacktestErr = rs.BacktestErr.Error()
	}

	// Bias signal of the one-step errors.
	row.Bias = cell{Text: "–"}
	if !failed {
		if s := biasSignal(rs); !math.IsNaN(s) {
			row.Bias = cell{Text: signed(s), Sort: sortKey(math.Abs(s)), Tip: "Trigg's tracking signal of the one-step errors at the last observation"}
			if math.Abs(s) > TriggLimit {
				row.Bias.Cls = "warn"
				flags["bias"] = true
			}
		}
	}
	row.Filled = cell{Text: strconv.Itoa(len(rs.Repairs)), Sort: strconv.Itoa(len(rs.Repairs))}
	var ids []string
	for _, m := range reviewMarks {
		if flags[m.ID] {
			row.Flags = append(row.Flags, m)
			ids = append(ids, m.ID)
		}
	}
	row.FlagIDs = strings.Join(ids, " ")
	row.Find = strings.ToLower(strings.Join([]string{key, rs.Model, rs.Route}, " "))

	// Details.
	row.Facts = append(row.Facts, fact{"Chosen by", row.Route}, fact{"Model", row.Model})
	if y := in.y; y.Len() > 0 {
		h := fmt.Sprintf("%d %s observations, %s to %s", y.Len(), y.Freq, periodLabel(y.Start, y), periodLabel(y.End(), y))
		if m := y.Missing(); m > 0 {
			h += fmt.Sprintf(", %d missing", m)
		}
		if y.Len() > shown {
			h += fmt.Sprintf(" (the latest %d drawn)", shown)
		}
		row.Facts = append(row.Facts, fact{"History", h})
	}
	if !failed {
		f := rs.Forecast
		row.Facts = append(row.Facts, fact{"Forecast", fmt.Sprintf("%d steps, %s to %s", len(f.Mean), periodLabel(f.Start, rs.History), periodLabel(f.Time(len(f.Mean)-1), rs.History))})
		if row.Bias.Sort != "" {
			row.Facts = append(row.Facts, fact{"Bias signal", row.Bias.Text + " (flagged beyond ±" + strconv.FormatFloat(TriggLimit, 'f', -1, 64) + ")"})
		}
	}
	for _, c := range rs.Repairs {
		row.Repairs = append(row.Repairs, repairRow{periodLabel(c.Time, rs.History), formatValue(c.Old), formatValue(c.New), c.Reason.String()})
	}
	if rs.Backtest != nil {
		row.Backtest = backtestOf(rs.Backtest, run, rs.History)
	}
	return row, nil
}

// signed formats the bias signal with its sign.
func signed(v float64) string {
	s := strconv.FormatFloat(v, 'f', 2, 64)
	if v >= 0 && s != "0.00" {
		s = "+" + s
	}
	if s == "-0.00" {
		s = "0.00"
	}
	return s
}

// backtestOf lays out the backtest of one series for its details.
func backtestOf(c *Comparison, used *Run, y almanac.Series) *backtestData {
	b := &backtestData{}
	win := c.Window.String()
	b.Summary = fmt.Sprintf("%d origins, %d steps ahead from each, %s window; errors scaled by the in-sample error of the lag-%d naive forecast.", len(c.Origins), c.Horizon, win, c.Period)
	if len(c.Origins) > 0 {
		first, last := c.Origins[0].Time, c.Origins[len(c.Origins)-1].Time
		b.Summary = fmt.Sprintf("%d origins, the first forecasting from %s and the last from %s, %d steps ahead from each, %s window; errors scaled by the in-sample error of the lag-%d naive forecast.",
			len(c.Origins), periodLabel(first, y), periodLabel(last, y), c.Horizon, win, c.Period)
	}
	if c.Partial {
		b.Notes = append(b.Notes, "The backtest was cancelled before every fit was done; the scores cover the fits done.")
	}
	for _, l := range c.Levels {
		b.Levels = append(b.Levels, pct(l))
	}
	for k := range c.Runs {
		r := &c.Runs[k]
		br := backtestRun{Name: r.Name, MASE: num2(r.Overall.MASE), MAE: formatScore(r.Overall.MAE), Bias: formatScore(r.Overall.ME), Used: r == used}
		switch {
		case r == used && r.Name == c.Baseline:
			br.Tag = "used; baseline"
		case r == used:
			br.Tag = "used"
		case r.Name == c.Baseline:
			br.Tag = "baseline"
		}
		if r.Name == c.Baseline {
			br.Ratio = "1.00"
		} else {
			br.Ratio = num2(r.Relative.MASE)
		}
		for _, l := range c.Levels {
			iv, ok := r.Overall.Interval(l)
			if ok {
				br.Coverage = append(br.Coverage, percent(iv.Coverage))
			} else {
				br.Coverage = append(br.Coverage, "–")
			}
		}
		if n := len(r.Failures); n > 0 {
			f := r.Failures[0]
			br.Failed = fmt.Sprintf("%d of %d (first: %v)", n, len(c.Origins), f.Cause)
		}
		b.Runs = append(b.Runs, br)
	}
	return b
}

// formatScore formats an error in data units, "–" when undefined.
func formatScore(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "–"
	}
	return formatValue(v)
}
