package charts

import (
	"bufio"
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Options set the size and title of a picture. The zero value gives the
// defaults.
type Options struct {
	// Title heads the picture; "" means one made from the data (the
	// series' key and what is drawn).
	Title string
	// Width and Height are the size in pixels of the PNG (at 96 dots per
	// inch; the SVG has the same size in CSS pixels). 0 means the
	// default: 960 × 420 for Fan and StepErrors, 960 × 170 per panel for
	// Panels. Negative is invalid; each is capped at 8000.
	Width, Height int
	// Levels are the levels of the bands of a fan chart, percentages in
	// (0, 100), from the forecast's Intervals when it has them and from
	// its distribution otherwise. Nil means the forecast's own Intervals.
	Levels []float64
}

// dpi is the resolution of the PNG: the CSS pixel.
const dpi = 96

// maxSide caps a side, in pixels, so that a mistaken size cannot ask for
// gigabytes of image.
const maxSide = 8000

// size resolves the picture size in pixels.
func (o Options) size(w, h int) (int, int, error) {
	if o.Width < 0 || o.Height < 0 {
		return 0, 0, fmt.Errorf("charts: %w: size %d × %d", almanac.ErrInvalid, o.Width, o.Height)
	}
	if o.Width > 0 {
		w = o.Width
	}
	if o.Height > 0 {
		h = o.Height
	}
	if w > maxSide || h > maxSide {
		return 0, 0, fmt.Errorf("charts: %w: size %d × %d is larger than %d pixels a side", almanac.ErrInvalid, w, h, maxSide)
	}
	return w, h, nil
}

// Picture is a drawing ready to be written as PNG or SVG.
type Picture struct {
	w, h int // pixels
	draw func(dc draw.Canvas)
}

// Size returns the picture's width and height in pixels.
func (p *Picture) Size() (width, height int) { return p.w, p.h }

// points converts pixels to the plotting package's points (1/72 inch).
func points(px int) vg.Length { return vg.Length(px) * vg.Inch / dpi }

// render draws the picture on c, turning a panic of the plotting package
// into an error wrapping ErrDraw.
func (p *Picture) render(c draw.Canvas) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("charts: %w: %v", ErrDraw, r)
		}
	}()
	p.draw(c)
	return nil
}

// WritePNG writes the picture as a PNG image of Size pixels.
func (p *Picture) WritePNG(w io.Writer) error {
	c := vgimg.NewWith(vgimg.UseWH(points(p.w), points(p.h)), vgimg.UseDPI(dpi), vgimg.UseBackgroundColor(color.White))
	if err := p.render(draw.New(c)); err != nil {
		return err
	}
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(w); err != nil {
		return fmt.Errorf("charts: %w: %w", ErrDraw, err)
	}
	return nil
}

// WriteSVG writes the picture as an SVG document of Size CSS pixels
// (written in points, 3/4 of a pixel each).
func (p *Picture) WriteSVG(w io.Writer) error {
	c := vgsvg.New(points(p.w), points(p.h))
	// A white ground, as the PNG has.
	c.SetColor(color.White)
	var ground vg.Path
	ground.Move(vg.Point{})
	ground.Line(vg.Point{X: points(p.w)})
	ground.Line(vg.Point{X: points(p.w), Y: points(p.h)})
	ground.Line(vg.Point{Y: points(p.h)})
	ground.Close()
	c.Fill(ground)
	if err := p.render(draw.New(c)); err != nil {
		return err
	}
	if _, err := c.WriteTo(w); err != nil {
		return fmt.Errorf("charts: %w: %w", ErrDraw, err)
	}
	return nil
}

// Save writes the picture to the file path, as PNG when its extension is
// .png and as SVG when it is .svg (any case); another extension gives an
// error wrapping ErrFormat and writes nothing.
func (p *Picture) Save(path string) (err error) {
	var write func(io.Writer) error
	switch strings.ToLower(filepath.Ext(path)) {
	case ".png":
		write = p.WritePNG
	case ".svg":
		write = p.WriteSVG
	default:
		return fmt.Errorf("charts: %w: %q (use .png or .svg)", ErrFormat, path)
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := f.Close(); err == nil {
			err = cerr
		}
	}()
	bw := bufio.NewWriter(f)
	if err := write(bw); err != nil {
		return err
	}
	return bw.Flush()
}

// The palette: ink for data, teal for forecasts, amber and the rest for
// further candidates.
var (
	ink      = color.RGBA{0x1d, 0x24, 0x33, 0xff}
	muted    = color.RGBA{0x8d, 0x96, 0xa8, 0xff}
	teal     = color.RGBA{0x0f, 0x76, 0x6e, 0xff}
	gridTint = color.RGBA{0xe6, 0xe2, 0xd8, 0xff}
	// bandTints[k] fills the k-th narrowest band.
	bandTints = []color.Color{
		color.RGBA{0x93, 0xd0, 0xc6, 0xff},
		color.RGBA{0xc3, 0xe5, 0xdf, 0xff},
		color.RGBA{0xe0, 0xf1, 0xee, 0xff},
		color.RGBA{0xef, 0xf8, 0xf6, 0xff},
	}
	// series colours for StepErrors, in order.
	lineColors = []color.Color{
		teal,
		color.RGBA{0xb4, 0x53, 0x09, 0xff},
		color.RGBA{0x1e, 0x5a, 0xa8, 0xff},
		color.RGBA{0x7c, 0x3a, 0xad, 0xff},
		color.RGBA{0x4d, 0x7c, 0x0f, 0xff},
		color.RGBA{0xbe, 0x18, 0x5d, 0xff},
		ink,
		muted,
	}
)

// sans is the typeface variant of every text (the plotting package's
// Liberation fonts are built in, so pictures look the same everywhere).
const sans = "Sans"

// headroom raises the top of p's value axis by a quarter of its span, so
// that a legend along the top does not cover the data.
func headroom(p *plot.Plot) {
	if span := p.Y.Max - p.Y.Min; span > 0 && !math.IsInf(span, 0) {
		p.Y.Max += 0.25 * span
	}
}

// newPlot returns a plot in the house style.
func newPlot(title string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(13)
	p.Title.TextStyle.Color = ink
	p.Title.Padding = vg.Points(6)
	p.Title.TextStyle.Font.Variant = sans
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Color = muted
		ax.Tick.Color = muted
		ax.Tick.Label.Color = ink
		ax.Tick.Label.Font.Size = vg.Points(9)
		ax.Tick.Label.Font.Variant = sans
		ax.Label.TextStyle.Font.Size = vg.Points(10)
		ax.Label.TextStyle.Font.Variant = sans
		ax.Label.TextStyle.Color = ink
	}
	p.Y.Tick.Marker = numTicker{}
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.Legend.TextStyle.Font.Variant = sans
	p.Legend.TextStyle.Color = ink
	p.Legend.ThumbnailWidth = vg.Points(18)
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = gridTint, gridTint
	g.Vertical.Width, g.Horizontal.Width = vg.Points(0.5), vg.Points(0.5)
	p.Add(g)
	return p
}

// limit is the largest magnitude drawn: beyond it the plotting package's
// axis arithmetic (spans, padding) can overflow.
const limit = 1e300

// checkDrawable returns an error wrapping almanac.ErrNonFinite when a
// value is ±Inf or beyond ±limit (NaN is allowed: missing).
func checkDrawable(what string, xs []float64) error {
	for i, v := range xs {
		if math.IsInf(v, 0) || math.Abs(v) > limit {
			return fmt.Errorf("charts: %w: %s %v at index %d (values beyond ±1e300 cannot be drawn)", almanac.ErrNonFinite, what, v, i)
		}
	}
	return nil
}

// segments splits the points (x[i], y[i]) at NaN values of y into runs
// of consecutive defined points.
func segments(x, y []float64) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	for i, v := range y {
		if math.IsNaN(v) {
			if len(cur) > 0 {
				out = append(out, cur)
				cur = nil
			}
			continue
		}
		cur = append(cur, plotter.XY{X: x[i], Y: v})
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// addLine adds the points as lines broken at NaN (a lone point as a dot)
// in the given style, and returns a thumbnail for the legend, or nil
// when nothing was drawn.
func addLine(p *plot.Plot, x, y []float64, style draw.LineStyle) (plot.Thumbnailer, error) {
	var thumb plot.Thumbnailer
	for _, seg := range segments(x, y) {
		if len(seg) == 1 {
			s, err := plotter.NewScatter(seg)
			if err != nil {
				return nil, fmt.Errorf("charts: %w: %w", ErrDraw, err)
			}
			s.GlyphStyle = draw.GlyphStyle{Color: style.Color, Radius: style.Width * 1.2, Shape: draw.CircleGlyph{}}
			p.Add(s)
			continue
		}
		l, err := plotter.NewLine(seg)
		if err != nil {
			return nil, fmt.Errorf("charts: %w: %w", ErrDraw, err)
		}
		l.LineStyle = style
		p.Add(l)
		thumb = l
	}
	if thumb == nil && len(y) > 0 {
		// Only dots (or nothing): a line thumbnail still names the style.
		thumb = &plotter.Line{LineStyle: style}
	}
	return thumb, nil
}

// errNoData is the error for a picture with nothing to draw.
func errNoData(what string) error {
	return fmt.Errorf("charts: %w: %s", almanac.ErrAllMissing, what)
}
