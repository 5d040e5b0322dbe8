package charts

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// fanBand is one band of a fan chart.
type fanBand struct {
	level        float64
	lower, upper []float64
}

// Fan returns a fan chart of series y and its forecast fc: the history as
// a line broken at missing values, the one-step fitted values dashed
// (fitted may be nil), the forecast joined to the last observation, and
// the bands around it, the widest lightest, with a dotted line where the
// forecast begins. The bands are fc's Intervals, or those at o.Levels.
//
// Special cases: an invalid y gives the error of Series.Validate; fitted
// of another length than y, or bands of another length than the
// forecast, almanac.ErrLength; an empty forecast almanac.ErrEmpty; NaN in
// the forecast or a band, ±Inf anywhere, or a value beyond ±1e300
// almanac.ErrNonFinite; a forecast at another frequency, or starting
// before the second observation or after the period following the last,
// almanac.ErrInvalid; a level outside (0, 100) almanac.ErrLevel, and one
// the forecast can give neither from its Intervals nor its distribution
// almanac.ErrNoDistribution; a bad size almanac.ErrInvalid.
func Fan(y almanac.Series, fitted []float64, fc almanac.Forecast, o Options) (*Picture, error) {
	w, h, err := o.size(960, 420)
	if err != nil {
		return nil, err
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("charts: fan: %w", err)
	}
	if err := checkDrawable("observation", y.Values); err != nil {
		return nil, err
	}
	if fitted != nil {
		if len(fitted) != y.Len() {
			return nil, fmt.Errorf("charts: fan: %w: %d fitted values for %d observations", almanac.ErrLength, len(fitted), y.Len())
		}
		if err := checkDrawable("fitted value", fitted); err != nil {
			return nil, err
		}
	}
	if len(fc.Mean) == 0 {
		return nil, fmt.Errorf("charts: fan: %w: the forecast has no steps", almanac.ErrEmpty)
	}
	if !fc.Freq.Equal(y.Freq) {
		return nil, fmt.Errorf("charts: fan: %w: forecast %v, history %v", almanac.ErrInvalid, fc.Freq, y.Freq)
	}
	off, err := y.Index(fc.Start)
	if err != nil {
		return nil, fmt.Errorf("charts: fan: %w: forecast start: %w", almanac.ErrInvalid, err)
	}
	if off < 1 || off > y.Len() {
		return nil, fmt.Errorf("charts: fan: %w: the forecast starts at observation %d of %d", almanac.ErrInvalid, off+1, y.Len())
	}
	if err := finiteAll("forecast", fc.Mean); err != nil {
		return nil, err
	}
	bands, err := fanBands(fc, o.Levels)
	if err != nil {
		return nil, err
	}

	title := o.Title
	if title == "" {
		title = fanTitle(y.Key, bands)
	}
	n := y.Len()
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = float64(y.Time(i).Unix())
	}
	fx := make([]float64, len(fc.Mean))
	for k := range fx {
		fx[k] = float64(fc.Time(k).Unix())
	}
	build := func() (*plot.Plot, error) {
		p := newPlot(title)
		p.X.Tick.Marker = timeTicker{freq: y.Freq, loc: y.Start.Location()}
		var thumbs []legendThumb
		var bandThumbs []legendThumb
		for k, b := range bands {
			ring := make(plotter.XYs, 0, 2*len(b.upper))
			for s, v := range b.upper {
				ring = append(ring, plotter.XY{X: fx[s], Y: v})
			}
			for s := len(b.lower) - 1; s >= 0; s-- {
				ring = append(ring, plotter.XY{X: fx[s], Y: b.lower[s]})
			}
			if len(b.upper) == 1 { // one step: a thin box around it
				half := 0.2 * float64(y.Freq.Add(fc.Start, 1).Unix()-fc.Start.Unix())
				ring = plotter.XYs{{X: fx[0] - half, Y: b.upper[0]}, {X: fx[0] + half, Y: b.upper[0]}, {X: fx[0] + half, Y: b.lower[0]}, {X: fx[0] - half, Y: b.lower[0]}}
			}
			poly, err := plotter.NewPolygon(ring)
			if err != nil {
				return nil, fmt.Errorf("charts: %w: %w", ErrDraw, err)
			}
			poly.Color = bandTints[min(len(bands)-1-k, len(bandTints)-1)]
			poly.LineStyle.Width = 0
			p.Add(poly)
			bandThumbs = append([]legendThumb{{pct(b.level) + " band", poly}}, bandThumbs...)
		}
		// Where the forecast begins.
		lo, hi := valueRange(y.Values, fitted, fc.Mean, bands)
		start, err := plotter.NewLine(plotter.XYs{{X: fx[0], Y: lo}, {X: fx[0], Y: hi}})
		if err != nil {
			return nil, fmt.Errorf("charts: %w: %w", ErrDraw, err)
		}
		start.LineStyle = draw.LineStyle{Color: muted, Width: vg.Points(0.7), Dashes: []vg.Length{vg.Points(1.5), vg.Points(2.5)}}
		p.Add(start)

		th, err := addLine(p, xs, y.Values, draw.LineStyle{Color: ink, Width: vg.Points(1.2)})
		if err != nil {
			return nil, err
		}
		thumbs = append(thumbs, legendThumb{"history", th})
		if fitted != nil {
			th, err := addLine(p, xs, fitted, draw.LineStyle{Color: muted, Width: vg.Points(0.9), Dashes: []vg.Length{vg.Points(3), vg.Points(2)}})
			if err != nil {
				return nil, err
			}
			if th != nil {
				thumbs = append(thumbs, legendThumb{"one-step fit", th})
			}
		}
		mx, my := fx, fc.Mean
		if off == n && !math.IsNaN(y.Values[n-1]) {
			mx = append([]float64{xs[n-1]}, fx...)
			my = append([]float64{y.Values[n-1]}, fc.Mean...)
		}
		th, err = addLine(p, mx, my, draw.LineStyle{Color: teal, Width: vg.Points(1.8)})
		if err != nil {
			return nil, err
		}
		thumbs = append(thumbs, legendThumb{"forecast", th})
		for _, t := range append(thumbs, bandThumbs...) {
			p.Legend.Add(t.name, t.thumb)
		}
		headroom(p)
		return p, nil
	}
	p, err := build()
	if err != nil {
		return nil, err
	}
	return &Picture{w: w, h: h, draw: p.Draw}, nil
}

// legendThumb is one legend entry.
type legendThumb struct {
	name  string
	thumb plot.Thumbnailer
}

// fanBands returns the bands of fc to draw, widest first.
func fanBands(fc almanac.Forecast, levels []float64) ([]fanBand, error) {
	var out []fanBand
	if levels == nil {
		for _, iv := range fc.Intervals {
			out = append(out, fanBand{iv.Level, iv.Lower, iv.Upper})
		}
	} else {
		for _, l := range levels {
			lo, hi, err := fc.Bounds(l)
			if err != nil {
				if errors.Is(err, almanac.ErrNoDistribution) {
					return nil, fmt.Errorf("charts: fan: %w: no %v%% band and no distribution to compute it from", almanac.ErrNoDistribution, l)
				}
				return nil, fmt.Errorf("charts: fan: %w", err)
			}
			out = append(out, fanBand{l, lo, hi})
		}
	}
	for _, b := range out {
		if len(b.lower) != len(fc.Mean) || len(b.upper) != len(fc.Mean) {
			return nil, fmt.Errorf("charts: fan: %w: %v%% band of %d and %d steps for a forecast of %d", almanac.ErrLength, b.level, len(b.lower), len(b.upper), len(fc.Mean))
		}
		if err := finiteAll(pct(b.level)+" band", b.lower, b.upper); err != nil {
			return nil, err
		}
	}
	slices.SortStableFunc(out, func(a, b fanBand) int {
		switch {
		case a.level > b.level:
			return -1
		case a.level < b.level:
			return 1
		}
		return 0
	})
	return out, nil
}

// finiteAll returns an error wrapping almanac.ErrNonFinite when a value
// is NaN, ±Inf or beyond ±limit.
func finiteAll(what string, xs ...[]float64) error {
	for _, x := range xs {
		for i, v := range x {
			if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > limit {
				return fmt.Errorf("charts: %w: %s at step %d is %v", almanac.ErrNonFinite, what, i+1, v)
			}
		}
	}
	return nil
}

// valueRange returns the smallest and largest value drawn.
func valueRange(y, fitted, mean []float64, bands []fanBand) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	add := func(xs []float64) {
		for _, v := range xs {
			if !math.IsNaN(v) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	add(y)
	add(fitted)
	add(mean)
	for _, b := range bands {
		add(b.lower)
		add(b.upper)
	}
	return lo, hi
}

// pct formats a level: "80%".
func pct(l float64) string { return strconv.FormatFloat(l, 'f', -1, 64) + "%" }

// fanTitle is the default title of a fan chart.
func fanTitle(key string, bands []fanBand) string {
	if key == "" {
		key = "Series"
	}
	if len(bands) == 0 {
		return key + ": forecast"
	}
	var ls []string
	for k := len(bands) - 1; k >= 0; k-- {
		ls = append(ls, pct(bands[k].level))
	}
	list := ls[0]
	if len(ls) > 1 {
		list = strings.Join(ls[:len(ls)-1], ", ") + " and " + ls[len(ls)-1]
	}
	return key + ": forecast with " + list + " bands"
}
