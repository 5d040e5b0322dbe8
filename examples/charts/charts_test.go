package charts_test

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"image"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/examples/charts"
)

// sales is an invented monthly series of a fictional chain of hardware
// stores: a level, a slow trend, a spring peak, a wobble, and two
// missing months.
func sales() almanac.Series {
	season := []float64{-20, -15, 10, 35, 40, 25, 5, 0, -5, -10, -25, -40}
	v := make([]float64, 84)
	for i := range v {
		v[i] = 400 + 0.8*float64(i) + season[i%12] + 7*math.Sin(1.3*float64(i))
	}
	v[40], v[41] = math.NaN(), math.NaN()
	return almanac.Series{Key: "paint", Start: time.Date(2019, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// fanInputs fits the seasonal naive method to the sales and forecasts a
// year with 50%, 80% and 95% bands.
func fanInputs(t *testing.T) (almanac.Series, []float64, almanac.Forecast) {
	t.Helper()
	y := sales()
	fit, err := almanac.SeasonalNaive{}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := fit.Forecast(12, 50, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	return y, fit.FittedValues(), fc
}

// checkPNG decodes a PNG, checks its size and that it holds at least
// minInk pixels of a colour near want (a drawn element) — and returns
// the image.
func checkPNG(t *testing.T, data []byte, w, h int, want [3]uint8, minInk int) image.Image {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("PNG does not decode: %v", err)
	}
	if b := img.Bounds(); b.Dx() != w || b.Dy() != h {
		t.Fatalf("PNG is %d × %d, want %d × %d", b.Dx(), b.Dy(), w, h)
	}
	ink := 0
	match := func(r, g, b uint8) {
		if near(r, want[0]) && near(g, want[1]) && near(b, want[2]) {
			ink++
		}
	}
	// Straight to the pixels: img.At through an interface is slow under
	// the race detector.
	switch m := img.(type) {
	case *image.RGBA:
		for i := 0; i+3 < len(m.Pix); i += 4 {
			match(m.Pix[i], m.Pix[i+1], m.Pix[i+2])
		}
	case *image.NRGBA:
		for i := 0; i+3 < len(m.Pix); i += 4 {
			match(m.Pix[i], m.Pix[i+1], m.Pix[i+2])
		}
	default:
		b := img.Bounds()
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				r, g, bl, _ := img.At(x, y).RGBA()
				match(uint8(r>>8), uint8(g>>8), uint8(bl>>8))
			}
		}
	}
	if ink < minInk {
		t.Errorf("PNG has %d pixels of colour %v, want at least %d", ink, want, minInk)
	}
	return img
}

func near(c, want uint8) bool { return math.Abs(float64(c)-float64(want)) <= 12 }

// checkSVG parses an SVG document, checks the size of its root element
// (in points: 3/4 of a pixel) and returns the number of path elements.
func checkSVG(t *testing.T, data []byte, w, h int) int {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(data))
	root := true
	paths := 0
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		el, ok := tok.(xml.StartElement)
		if !ok {
			continue
		}
		if root {
			root = false
			if el.Name.Local != "svg" {
				t.Fatalf("root element %q, want svg", el.Name.Local)
			}
			for _, a := range el.Attr {
				want := 0
				switch a.Name.Local {
				case "width":
					want = w
				case "height":
					want = h
				default:
					continue
				}
				v, err := strconv.ParseFloat(strings.TrimSuffix(a.Value, "pt"), 64)
				if err != nil || !strings.HasSuffix(a.Value, "pt") || math.Abs(v-0.75*float64(want)) > 0.01 {
					t.Errorf("SVG %s = %q, want %gpt", a.Name.Local, a.Value, 0.75*float64(want))
				}
			}
		}
		if el.Name.Local == "path" {
			paths++
		}
	}
	if root {
		t.Fatal("SVG has no element")
	}
	return paths
}

// teal and ink are the colours of the forecast and the data (see
// picture.go); band80 the 80% band of three.
var (
	teal   = [3]uint8{0x0f, 0x76, 0x6e}
	ink    = [3]uint8{0x1d, 0x24, 0x33}
	band80 = [3]uint8{0xc3, 0xe5, 0xdf}
)

func TestFan(t *testing.T) {
	y, fitted, fc := fanInputs(t)
	// The PNG of the default size is left out: rasterising and encoding
	// it takes seconds under the race detector, and the small one checks
	// the same code.
	tests := []struct {
		name string
		o    charts.Options
		w, h int
		png  bool
	}{
		{"default size", charts.Options{}, 960, 420, false},
		{"small", charts.Options{Width: 480, Height: 240, Title: "Paint, next year"}, 480, 240, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			pic, err := charts.Fan(y, fitted, fc, tc.o)
			if err != nil {
				t.Fatal(err)
			}
			if w, h := pic.Size(); w != tc.w || h != tc.h {
				t.Fatalf("Size %d × %d, want %d × %d", w, h, tc.w, tc.h)
			}
			var p, s bytes.Buffer
			if tc.png {
				if err := pic.WritePNG(&p); err != nil {
					t.Fatal(err)
				}
				checkPNG(t, p.Bytes(), tc.w, tc.h, teal, 20)
				checkPNG(t, p.Bytes(), tc.w, tc.h, band80, 100)
				checkPNG(t, p.Bytes(), tc.w, tc.h, ink, 100)
			}
			if err := pic.WriteSVG(&s); err != nil {
				t.Fatal(err)
			}
			// History (two pieces around the gap), fit, forecast, three
			// bands, grid, axes: dozens of paths.
			if n := checkSVG(t, s.Bytes(), tc.w, tc.h); n < 10 {
				t.Errorf("SVG has %d paths", n)
			}
			// The same picture gives the same bytes.
			var again bytes.Buffer
			if err := pic.WriteSVG(&again); err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(s.Bytes(), again.Bytes()) {
				t.Error("two SVG writes of one picture differ")
			}
		})
	}
}

func TestFanBadInput(t *testing.T) {
	tests := []struct {
		name   string
		change func(y *almanac.Series, fitted *[]float64, fc *almanac.Forecast, o *charts.Options)
		want   error
	}{
		{"empty history", func(y *almanac.Series, _ *[]float64, _ *almanac.Forecast, _ *charts.Options) { y.Values = nil }, almanac.ErrEmpty},
		{"infinite history", func(y *almanac.Series, _ *[]float64, _ *almanac.Forecast, _ *charts.Options) {
			y.Values[3] = math.Inf(1)
		}, almanac.ErrNonFinite},
		{"beyond 1e300", func(y *almanac.Series, _ *[]float64, _ *almanac.Forecast, _ *charts.Options) { y.Values[3] = -1e301 }, almanac.ErrNonFinite},
		{"fitted too short", func(_ *almanac.Series, f *[]float64, _ *almanac.Forecast, _ *charts.Options) { *f = (*f)[:5] }, almanac.ErrLength},
		{"empty forecast", func(_ *almanac.Series, _ *[]float64, fc *almanac.Forecast, _ *charts.Options) { fc.Mean = nil }, almanac.ErrEmpty},
		{"NaN forecast", func(_ *almanac.Series, _ *[]float64, fc *almanac.Forecast, _ *charts.Options) {
			fc.Mean = append([]float64(nil), fc.Mean...)
			fc.Mean[2] = math.NaN()
		}, almanac.ErrNonFinite},
		{"short band", func(_ *almanac.Series, _ *[]float64, fc *almanac.Forecast, _ *charts.Options) {
			fc.Intervals = []almanac.Interval{{Level: 80, Lower: []float64{1}, Upper: []float64{2}}}
		}, almanac.ErrLength},
		{"other frequency", func(_ *almanac.Series, _ *[]float64, fc *almanac.Forecast, _ *charts.Options) {
			fc.Freq = calendar.Weekly
		}, almanac.ErrInvalid},
		{"starts too late", func(y *almanac.Series, _ *[]float64, fc *almanac.Forecast, _ *charts.Options) { fc.Start = y.Time(90) }, almanac.ErrInvalid},
		{"bad level", func(_ *almanac.Series, _ *[]float64, _ *almanac.Forecast, o *charts.Options) { o.Levels = []float64{0} }, almanac.ErrLevel},
		{"no distribution", func(_ *almanac.Series, _ *[]float64, fc *almanac.Forecast, o *charts.Options) {
			fc.Dist = nil
			o.Levels = []float64{70}
		}, almanac.ErrNoDistribution},
		{"negative width", func(_ *almanac.Series, _ *[]float64, _ *almanac.Forecast, o *charts.Options) { o.Width = -1 }, almanac.ErrInvalid},
		{"huge", func(_ *almanac.Series, _ *[]float64, _ *almanac.Forecast, o *charts.Options) { o.Height = 100000 }, almanac.ErrInvalid},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			y, fitted, fc := fanInputs(t)
			var o charts.Options
			tc.change(&y, &fitted, &fc, &o)
			pic, err := charts.Fan(y, fitted, fc, o)
			if !errors.Is(err, tc.want) || pic != nil {
				t.Fatalf("got %v, %v; want an error wrapping %v", pic, err, tc.want)
			}
		})
	}
}

// TestFanEdgeData draws what a user may meet: large values just inside
// the limit, a constant series, a single-step forecast from a forecast's
// distribution, weekly and hourly axes.
func TestFanEdgeData(t *testing.T) {
	mk := func(freq calendar.Frequency, vals []float64, h int) (almanac.Series, almanac.Forecast) {
		y := almanac.Series{Key: "x", Start: time.Date(2024, 2, 29, 0, 0, 0, 0, time.UTC), Freq: freq, Values: vals}
		fit, err := almanac.Naive{}.Fit(context.Background(), y)
		if err != nil {
			t.Fatal(err)
		}
		fc, err := fit.Forecast(h, 80)
		if err != nil {
			t.Fatal(err)
		}
		return y, fc
	}
	ramp := func(n int, scale float64) []float64 {
		v := make([]float64, n)
		for i := range v {
			v[i] = scale * (1 + float64(i%7)/7)
		}
		return v
	}
	// PNG for the cases where rasterising may differ from the SVG
	// (extreme coordinates, a one-step band); SVG for all.
	tests := []struct {
		name string
		freq calendar.Frequency
		vals []float64
		h    int
		png  bool
	}{
		{"large values", calendar.Monthly, ramp(24, 1e299), 6, true},
		{"constant", calendar.Quarterly, []float64{5, 5, 5, 5, 5}, 4, true},
		{"one step", calendar.Yearly, ramp(10, 3), 1, true},
		{"weekly", calendar.Weekly, ramp(160, 50), 13, false},
		{"hourly", calendar.Hourly, ramp(500, 20), 48, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			y, fc := mk(tc.freq, tc.vals, tc.h)
			pic, err := charts.Fan(y, nil, fc, charts.Options{Width: 320, Height: 200})
			if err != nil {
				t.Fatal(err)
			}
			var s bytes.Buffer
			if err := pic.WriteSVG(&s); err != nil {
				t.Fatal(err)
			}
			checkSVG(t, s.Bytes(), 320, 200)
			if !tc.png {
				return
			}
			var p bytes.Buffer
			if err := pic.WritePNG(&p); err != nil {
				t.Fatal(err)
			}
			checkPNG(t, p.Bytes(), 320, 200, teal, 1)
		})
	}
}

func TestPanels(t *testing.T) {
	y := sales()
	filled, _, err := decompose.Repair{}.Fill(y)
	if err != nil {
		t.Fatal(err)
	}
	stl, err := decompose.STL{Robust: true}.Decompose(filled)
	if err != nil {
		t.Fatal(err)
	}
	classical, err := decompose.Classical{Multiplicative: true}.Decompose(filled)
	if err != nil {
		t.Fatal(err)
	}
	// Two seasonal periods: an invented hourly series of a store's
	// tills, with a daily and a weekly cycle.
	hours := make([]float64, 24*7*4)
	for i := range hours {
		hours[i] = 50 + 20*math.Sin(2*math.Pi*float64(i)/24) + 8*math.Sin(2*math.Pi*float64(i)/168) + 3*math.Sin(float64(i))
	}
	tills := almanac.Series{Key: "tills", Start: time.Date(2025, 3, 3, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, Values: hours}
	mstl, err := decompose.MSTL{Periods: []float64{24, 168}}.Decompose(tills)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name   string
		d      *decompose.Decomposition
		panels int
	}{
		{"STL", stl, 4},
		{"classical, multiplicative", classical, 4},
		{"MSTL", mstl, 5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			def, err := charts.Panels(tc.d, charts.Options{})
			if err != nil {
				t.Fatal(err)
			}
			if w, h := def.Size(); w != 960 || h != 170*tc.panels+30 {
				t.Fatalf("Size %d × %d, want 960 × %d", w, h, 170*tc.panels+30)
			}
			// Drawn smaller, to keep the test quick under the race detector.
			w, h := 480, 90*tc.panels
			pic, err := charts.Panels(tc.d, charts.Options{Width: w, Height: h})
			if err != nil {
				t.Fatal(err)
			}
			var p, s bytes.Buffer
			if err := pic.WritePNG(&p); err != nil {
				t.Fatal(err)
			}
			checkPNG(t, p.Bytes(), w, h, teal, 100)
			if err := pic.WriteSVG(&s); err != nil {
				t.Fatal(err)
			}
			if n := checkSVG(t, s.Bytes(), w, h); n < 4*tc.panels {
				t.Errorf("SVG has %d paths for %d panels", n, tc.panels)
			}
		})
	}
	t.Run("bad input", func(t *testing.T) {
		short := *stl
		short.Trend = short.Trend[:10]
		noPeriods := *stl
		noPeriods.Periods = nil
		inf := *stl
		inf.Remainder = append([]float64(nil), stl.Remainder...)
		inf.Remainder[0] = math.Inf(-1)
		for _, c := range []struct {
			name string
			d    *decompose.Decomposition
			want error
		}{
			{"nil", nil, almanac.ErrInvalid},
			{"short trend", &short, almanac.ErrLength},
			{"no periods", &noPeriods, almanac.ErrLength},
			{"infinite remainder", &inf, almanac.ErrNonFinite},
		} {
			if _, err := charts.Panels(c.d, charts.Options{}); !errors.Is(err, c.want) {
				t.Errorf("%s: error %v, want one wrapping %v", c.name, err, c.want)
			}
		}
	})
}

func TestStepErrors(t *testing.T) {
	filled, _, err := decompose.Repair{}.Fill(sales())
	if err != nil {
		t.Fatal(err)
	}
	bt := accuracy.Backtest{Horizon: 12, Origins: 4, Step: 6, Workers: 1}
	c, err := bt.Run(context.Background(), filled, accuracy.Candidate{Name: "drift", Model: almanac.Drift{}}, accuracy.Candidate{Name: "mean", Model: almanac.Mean{}})
	if err != nil {
		t.Fatal(err)
	}
	pic, err := charts.StepErrors(c, charts.Options{Width: 480, Height: 240})
	if err != nil {
		t.Fatal(err)
	}
	var p, s bytes.Buffer
	if err := pic.WritePNG(&p); err != nil {
		t.Fatal(err)
	}
	checkPNG(t, p.Bytes(), 480, 240, teal, 50) // the first candidate's line
	if err := pic.WriteSVG(&s); err != nil {
		t.Fatal(err)
	}
	// Four candidates, each a line and twelve dots.
	if n := checkSVG(t, s.Bytes(), 480, 240); n < 4*13 {
		t.Errorf("SVG has %d paths", n)
	}

	undefined := *c
	undefined.Runs = []accuracy.Run{{Name: "x", ByStep: make([]accuracy.Scores, c.Horizon)}}
	for k := range undefined.Runs[0].ByStep {
		undefined.Runs[0].ByStep[k].MASE = math.NaN()
	}
	short := *c
	short.Runs = []accuracy.Run{{Name: "x", ByStep: make([]accuracy.Scores, 2)}}
	for _, tc := range []struct {
		name string
		c    *accuracy.Comparison
		want error
	}{
		{"nil", nil, almanac.ErrEmpty},
		{"no runs", &accuracy.Comparison{Horizon: 3}, almanac.ErrEmpty},
		{"all undefined", &undefined, almanac.ErrAllMissing},
		{"short run", &short, almanac.ErrLength},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := charts.StepErrors(tc.c, charts.Options{}); !errors.Is(err, tc.want) {
				t.Fatalf("error %v, want one wrapping %v", err, tc.want)
			}
		})
	}
}

func TestSave(t *testing.T) {
	y, fitted, fc := fanInputs(t)
	pic, err := charts.Fan(y, fitted, fc, charts.Options{Width: 320, Height: 200})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, name := range []string{"paint.png", "paint.SVG"} {
		path := filepath.Join(dir, name)
		if err := pic.Save(path); err != nil {
			t.Fatal(err)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if strings.HasSuffix(name, ".png") {
			cfg, err := png.DecodeConfig(bytes.NewReader(data))
			if err != nil || cfg.Width != 320 || cfg.Height != 200 {
				t.Errorf("%s: %+v, %v", name, cfg, err)
			}
		} else {
			checkSVG(t, data, 320, 200)
		}
	}
	path := filepath.Join(dir, "paint.pdf")
	if err := pic.Save(path); !errors.Is(err, charts.ErrFormat) {
		t.Fatalf("error %v, want one wrapping ErrFormat", err)
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("a file was written for an unknown format: %v", err)
	}
}

// BenchmarkFan builds the fan chart of the sales (84 months, 12 steps,
// three bands) at the default size and writes it as PNG or SVG.
func BenchmarkFan(b *testing.B) {
	y := sales()
	fit, err := almanac.SeasonalNaive{}.Fit(context.Background(), y)
	if err != nil {
		b.Fatal(err)
	}
	fc, err := fit.Forecast(12, 50, 80, 95)
	if err != nil {
		b.Fatal(err)
	}
	fitted := fit.FittedValues()
	for _, format := range []string{"png", "svg"} {
		b.Run(format, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				pic, err := charts.Fan(y, fitted, fc, charts.Options{})
				if err != nil {
					b.Fatal(err)
				}
				write := pic.WriteSVG
				if format == "png" {
					write = pic.WritePNG
				}
				if err := write(io.Discard); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
