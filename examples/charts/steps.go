package charts

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// StepErrors returns a backtest comparison as a picture: for every
// candidate of c, its scaled absolute error (MASE, Comparison's
// Run.ByStep) at each step ahead, as a line with a dot per step. The
// benchmarks — the runs named accuracy.NaiveName or
// accuracy.SeasonalNaiveName, and the baseline — are dashed. A step at
// which a measure is undefined leaves a gap.
//
// Special cases: a nil comparison or one without runs or steps gives an
// error wrapping almanac.ErrEmpty; a run whose ByStep has another length
// than the horizon almanac.ErrLength; no defined value at all
// almanac.ErrAllMissing; ±Inf or a value beyond ±1e300
// almanac.ErrNonFinite; a bad size almanac.ErrInvalid.
func StepErrors(c *accuracy.Comparison, o Options) (*Picture, error) {
	if c == nil || len(c.Runs) == 0 || c.Horizon < 1 {
		return nil, fmt.Errorf("charts: step errors: %w: no backtest runs", almanac.ErrEmpty)
	}
	w, h, err := o.size(960, 420)
	if err != nil {
		return nil, err
	}
	steps := make([]float64, c.Horizon)
	for k := range steps {
		steps[k] = float64(k + 1)
	}
	vals := make([][]float64, len(c.Runs))
	defined := false
	for i, r := range c.Runs {
		if len(r.ByStep) != c.Horizon {
			return nil, fmt.Errorf("charts: step errors: %w: %s has %d steps, the horizon is %d", almanac.ErrLength, r.Name, len(r.ByStep), c.Horizon)
		}
		vals[i] = make([]float64, c.Horizon)
		for k, s := range r.ByStep {
			vals[i][k] = s.MASE
			defined = defined || !math.IsNaN(s.MASE)
		}
		if err := checkDrawable(r.Name+" error", vals[i]); err != nil {
			return nil, err
		}
	}
	if !defined {
		return nil, errNoData("no candidate has a defined scaled error at any step")
	}
	title := o.Title
	if title == "" {
		key := c.Key
		if key == "" {
			key = "Backtest"
		}
		title = fmt.Sprintf("%s: scaled error by steps ahead (%d origins)", key, len(c.Origins))
	}
	p := newPlot(title)
	p.X.Label.Text = "steps ahead"
	p.Y.Label.Text = "scaled abs error (MASE)"
	p.X.Tick.Marker = stepTicker{c.Horizon}
	p.Legend.Left = false
	p.Y.Min = 0
	for i, r := range c.Runs {
		col := lineColors[i%len(lineColors)]
		style := draw.LineStyle{Color: col, Width: vg.Points(1.6)}
		bench := r.Name == accuracy.NaiveName || r.Name == accuracy.SeasonalNaiveName || r.Name == c.Baseline
		if bench {
			style.Width = vg.Points(1.1)
			style.Dashes = []vg.Length{vg.Points(4), vg.Points(2.5)}
		}
		th, err := addLine(p, steps, vals[i], style)
		if err != nil {
			return nil, err
		}
		for _, seg := range segments(steps, vals[i]) {
			s, err := plotter.NewScatter(seg)
			if err != nil {
				return nil, fmt.Errorf("charts: %w: %w", ErrDraw, err)
			}
			s.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(2), Shape: draw.CircleGlyph{}}
			p.Add(s)
		}
		name := r.Name
		if r.Name == c.Baseline {
			name += " (baseline)"
		}
		if th != nil {
			p.Legend.Add(name, th)
		}
	}
	headroom(p)
	return &Picture{w: w, h: h, draw: p.Draw}, nil
}
