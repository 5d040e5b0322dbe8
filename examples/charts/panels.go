package charts

import (
	"fmt"
	"strconv"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/decompose"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// panelHeight is the default height of one panel, in pixels.
const panelHeight = 170

// Panels returns the panels of a decomposition, one above the other on a
// shared time axis: the data, the trend, each seasonal component (one
// panel per period, for MSTL) and the remainder as dots around a
// reference line (0, or 1 for a multiplicative decomposition). The
// default height is 170 pixels a panel.
//
// Special cases: a nil decomposition gives an error wrapping
// almanac.ErrInvalid; components of another length than the data, or
// fewer seasonal periods than components, almanac.ErrLength; invalid
// data the error of Series.Validate; ±Inf or a value beyond ±1e300
// almanac.ErrNonFinite; a bad size almanac.ErrInvalid.
func Panels(d *decompose.Decomposition, o Options) (*Picture, error) {
	if d == nil {
		return nil, fmt.Errorf("charts: panels: %w: no decomposition", almanac.ErrInvalid)
	}
	y := d.Series
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("charts: panels: %w", err)
	}
	n := y.Len()
	type panel struct {
		name   string
		values []float64
		dots   bool
	}
	panels := []panel{{"data", y.Values, false}, {"trend", d.Trend, false}}
	if len(d.Periods) != len(d.Seasonals) {
		return nil, fmt.Errorf("charts: panels: %w: %d seasonal components, %d periods", almanac.ErrLength, len(d.Seasonals), len(d.Periods))
	}
	for k, s := range d.Seasonals {
		panels = append(panels, panel{"seasonal (" + strconv.Itoa(d.Periods[k]) + ")", s, false})
	}
	panels = append(panels, panel{"remainder", d.Remainder, true})
	for _, pn := range panels {
		if len(pn.values) != n {
			return nil, fmt.Errorf("charts: panels: %w: %s has %d values for %d observations", almanac.ErrLength, pn.name, len(pn.values), n)
		}
		if err := checkDrawable(pn.name, pn.values); err != nil {
			return nil, err
		}
	}
	w, h, err := o.size(960, panelHeight*len(panels)+30)
	if err != nil {
		return nil, err
	}
	title := o.Title
	if title == "" {
		key := y.Key
		if key == "" {
			key = "Series"
		}
		title = key + ": " + d.Method + " decomposition"
		if d.Multiplicative {
			title += " (multiplicative)"
		}
	}
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = float64(y.Time(i).Unix())
	}
	ticker := timeTicker{freq: y.Freq, loc: y.Start.Location()}
	plots := make([][]*plot.Plot, len(panels))
	for k, pn := range panels {
		t := ""
		if k == 0 {
			t = title
		}
		p := newPlot(t)
		p.Y.Label.Text = pn.name
		p.X.Tick.Marker = ticker
		if k < len(panels)-1 {
			p.X.Tick.Marker = blankTicker{ticker}
		}
		style := draw.LineStyle{Color: ink, Width: vg.Points(1)}
		if k > 0 {
			style.Color = teal
		}
		if pn.dots {
			ref := 0.0
			if d.Multiplicative {
				ref = 1
			}
			line, err := plotter.NewLine(plotter.XYs{{X: xs[0], Y: ref}, {X: xs[n-1], Y: ref}})
			if err != nil {
				return nil, fmt.Errorf("charts: %w: %w", ErrDraw, err)
			}
			line.LineStyle = draw.LineStyle{Color: muted, Width: vg.Points(0.6)}
			p.Add(line)
			for _, seg := range segments(xs, pn.values) {
				s, err := plotter.NewScatter(seg)
				if err != nil {
					return nil, fmt.Errorf("charts: %w: %w", ErrDraw, err)
				}
				s.GlyphStyle = draw.GlyphStyle{Color: ink, Radius: vg.Points(1.3), Shape: draw.CircleGlyph{}}
				p.Add(s)
			}
		} else if _, err := addLine(p, xs, pn.values, style); err != nil {
			return nil, err
		}
		plots[k] = []*plot.Plot{p}
	}
	return &Picture{w: w, h: h, draw: func(dc draw.Canvas) {
		tiles := draw.Tiles{Rows: len(plots), Cols: 1, PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(10), PadY: vg.Points(2)}
		canvases := plot.Align(plots, tiles, dc)
		for k := range plots {
			plots[k][0].Draw(canvases[k][0])
		}
	}}, nil
}
