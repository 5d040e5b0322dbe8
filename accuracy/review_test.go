package accuracy_test

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
)

// storeSeries returns an invented monthly series of a fictional chain of
// hardware stores: a level, a trend, a spring peak and a wobble.
func storeSeries(key string, level, trend float64, n int) almanac.Series {
	season := []float64{-20, -15, 10, 35, 40, 25, 5, 0, -5, -10, -25, -40}
	v := make([]float64, n)
	for i := range v {
		v[i] = level + trend*float64(i) + season[i%12] + 7*math.Sin(1.3*float64(i))
	}
	return almanac.Series{Key: key, Start: time.Date(2019, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// storeReview builds the review of a small invented batch run with cheap
// models: the drift method against the default benchmarks, the winner of
// the backtest refitted, one series with a gap filled, one whose last
// year jumps (biased one-step errors), one that cannot be fitted.
func storeReview(t testing.TB) accuracy.Review {
	t.Helper()
	ctx := context.Background()
	paint := storeSeries("paint", 400, 0, 72)
	ladders := storeSeries("ladders", 120, 0.2, 72)
	ladders.Values[30], ladders.Values[31] = math.NaN(), math.NaN()
	filled, changes, err := decompose.Repair{}.Fill(ladders)
	if err != nil {
		t.Fatal(err)
	}
	jump := storeSeries("garden <tools> & hoses", 300, 0, 72)
	for i := 60; i < 72; i++ {
		jump.Values[i] += 150 + 10*float64(i-60)
	}
	short := almanac.Series{Key: "gift cards", Start: time.Date(2024, 11, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: []float64{math.NaN(), math.NaN()}}
	ys := []almanac.Series{paint, filled, jump, short}

	bt := accuracy.Backtest{Horizon: 6, Origins: 3, Step: 6, Levels: []float64{80, 95}, Workers: 1}
	cmp, err := bt.RunBatch(ctx, ys, accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil {
		t.Fatal(err)
	}
	if len(cmp.Failed) != 1 || cmp.Failed[0].Index != 3 {
		t.Fatalf("left out of the backtest: %+v, want the last series", cmp.Failed)
	}
	fits, err := almanac.BatchFit(ctx, almanac.SeasonalNaive{}, ys, almanac.BatchOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	fcs := almanac.ForecastAll(fits, 12, 80, 95)
	entries, err := accuracy.ReviewFromBatch(ys, fits, fcs, cmp)
	if err != nil {
		t.Fatal(err)
	}
	for i := range entries {
		entries[i].Route = "set by hand"
		entries[i].Chosen = accuracy.SeasonalNaiveName
		if entries[i].Backtest == nil {
			entries[i].Chosen = ""
		}
	}
	entries[1].Repairs = changes
	entries[2].Notes = []string{"The last year runs well above the years before."}
	return accuracy.Review{
		Title:  "Hardware stores: monthly units (invented data)",
		About:  "Seasonal naive forecasts for four product groups, backtested against the drift and naive methods.",
		Series: entries,
	}
}

// pageShape is what parsePage finds on a page.
type pageShape struct {
	rows, sections, charts int
	rowFlags               map[string]string // row id -> data-flags
	text                   string
}

// parsePage checks that the page is well-formed XML that loads nothing
// from elsewhere, and counts its summary rows (with their flags), series
// sections and charts.
func parsePage(t *testing.T, page []byte) pageShape {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(page))
	d.Strict = true
	var s pageShape
	s.rowFlags = map[string]string{}
	var text strings.Builder
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("page is not well-formed: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			attr := func(name string) (string, bool) {
				for _, a := range el.Attr {
					if a.Name.Local == name {
						return a.Value, true
					}
				}
				return "", false
			}
			switch el.Name.Local {
			case "tr":
				if f, ok := attr("data-flags"); ok {
					s.rows++
					id, _ := attr("id")
					s.rowFlags[id] = f
				}
			case "section":
				if c, _ := attr("class"); c == "series" {
					s.sections++
				}
			case "svg":
				if c, _ := attr("class"); c == "chart" {
					s.charts++
				}
			case "script", "link", "img", "iframe":
				if src, ok := attr("src"); ok {
					t.Errorf("page loads %s from %q", el.Name.Local, src)
				}
				if href, ok := attr("href"); ok && href != "data:," {
					t.Errorf("page links %q", href)
				}
			}
		case xml.CharData:
			text.Write(el)
		}
	}
	s.text = text.String()
	return s
}

func TestWriteReview(t *testing.T) {
	r := storeReview(t)
	var buf bytes.Buffer
	if err := accuracy.WriteReview(&buf, r); err != nil {
		t.Fatal(err)
	}
	page := buf.Bytes()
	s := parsePage(t, page)
	if s.rows != len(r.Series) || s.sections != len(r.Series) || s.charts != len(r.Series) {
		t.Errorf("%d rows, %d sections, %d charts for %d series", s.rows, s.sections, s.charts, len(r.Series))
	}
	for _, want := range []string{"paint", "ladders", "garden <tools> & hoses", "gift cards", "What the flags mean", "Trigg"} {
		if !strings.Contains(s.text, want) {
			t.Errorf("page text lacks %q", want)
		}
	}
	if bytes.Contains(page, []byte("<tools>")) {
		t.Error("a series key reached the page unescaped")
	}
	// The failed series is listed with its reason.
	if !strings.Contains(s.text, "No forecast.") || !strings.Contains(s.text, "all observations missing") {
		t.Error("the failed series' reason is not on the page")
	}
	tests := []struct {
		row  string
		want []string
		not  []string
	}{
		{"row-s1", nil, []string{"failed", "bias", "filled"}},
		{"row-s2", []string{"filled"}, []string{"failed"}},
		{"row-s3", []string{"bias"}, []string{"failed"}},
		{"row-s4", []string{"failed"}, []string{"untested"}},
	}
	for _, tc := range tests {
		t.Run(tc.row, func(t *testing.T) {
			flags := " " + s.rowFlags[tc.row] + " "
			for _, f := range tc.want {
				if !strings.Contains(flags, " "+f+" ") {
					t.Errorf("flags %q lack %q", flags, f)
				}
			}
			for _, f := range tc.not {
				if strings.Contains(flags, " "+f+" ") {
					t.Errorf("flags %q hold %q", flags, f)
				}
			}
		})
	}
	// No number that cannot be drawn.
	for _, bad := range []string{"NaN", "Inf"} {
		if bytes.Contains(page, []byte(bad)) {
			t.Errorf("page holds %q", bad)
		}
	}
	// The same input gives the same bytes.
	var again bytes.Buffer
	if err := accuracy.WriteReview(&again, r); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(page, again.Bytes()) {
		t.Error("two writes of the same review differ")
	}
}

// simpleEntry returns a valid entry with a three-step forecast.
func simpleEntry() accuracy.ReviewSeries {
	y := almanac.Series{Key: "hinges", Start: time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: []float64{10, 12, math.NaN(), 13, 15, 14}}
	fc := almanac.Forecast{Start: y.Time(6), Freq: calendar.Monthly, Mean: []float64{15, 15, 15},
		Intervals: []almanac.Interval{{Level: 80, Lower: []float64{13, 12, 11}, Upper: []float64{17, 18, 19}}}}
	return accuracy.ReviewSeries{History: y, Fitted: []float64{math.NaN(), 10, 12, 12, 13, 15}, Forecast: fc, Model: "drift"}
}

func TestWriteReviewBadInput(t *testing.T) {
	tests := []struct {
		name   string
		change func(r *accuracy.Review)
		want   error
	}{
		{"no series", func(r *accuracy.Review) { r.Series = nil }, almanac.ErrEmpty},
		{"bad level", func(r *accuracy.Review) { r.Levels = []float64{100} }, almanac.ErrLevel},
		{"negative shown", func(r *accuracy.Review) { r.Shown = -1 }, almanac.ErrInvalid},
		{"empty history", func(r *accuracy.Review) { r.Series[0].History.Values = nil }, almanac.ErrEmpty},
		{"infinite history", func(r *accuracy.Review) { r.Series[0].History.Values[1] = math.Inf(1) }, almanac.ErrNonFinite},
		{"all missing", func(r *accuracy.Review) {
			r.Series[0].History.Values = []float64{math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()}
		}, almanac.ErrAllMissing},
		{"no frequency", func(r *accuracy.Review) { r.Series[0].History.Freq = calendar.Frequency{} }, almanac.ErrFrequency},
		{"fitted too short", func(r *accuracy.Review) { r.Series[0].Fitted = r.Series[0].Fitted[:3] }, almanac.ErrLength},
		{"infinite fitted", func(r *accuracy.Review) { r.Series[0].Fitted[2] = math.Inf(-1) }, almanac.ErrNonFinite},
		{"empty forecast", func(r *accuracy.Review) { r.Series[0].Forecast = almanac.Forecast{} }, almanac.ErrEmpty},
		{"NaN forecast", func(r *accuracy.Review) { r.Series[0].Forecast.Mean[1] = math.NaN() }, almanac.ErrNonFinite},
		{"infinite bound", func(r *accuracy.Review) { r.Series[0].Forecast.Intervals[0].Upper[2] = math.Inf(1) }, almanac.ErrNonFinite},
		{"short band", func(r *accuracy.Review) { r.Series[0].Forecast.Intervals[0].Lower = []float64{1} }, almanac.ErrLength},
		{"other frequency", func(r *accuracy.Review) { r.Series[0].Forecast.Freq = calendar.Quarterly }, almanac.ErrInvalid},
		{"starts before", func(r *accuracy.Review) { r.Series[0].Forecast.Start = r.Series[0].History.Start }, almanac.ErrInvalid},
		{"starts after a gap", func(r *accuracy.Review) { r.Series[0].Forecast.Start = r.Series[0].History.Time(9) }, almanac.ErrInvalid},
		{"not aligned", func(r *accuracy.Review) { r.Series[0].Forecast.Start = r.Series[0].History.Time(6).Add(time.Hour) }, almanac.ErrInvalid},
		{"repair outside", func(r *accuracy.Review) {
			r.Series[0].Repairs = []decompose.Change{{Time: r.Series[0].History.Time(7), New: 3}}
		}, almanac.ErrInvalid},
		{"repair NaN", func(r *accuracy.Review) {
			r.Series[0].Repairs = []decompose.Change{{Time: r.Series[0].History.Time(2), New: math.NaN()}}
		}, almanac.ErrNonFinite},
		{"chosen without backtest", func(r *accuracy.Review) { r.Series[0].Chosen = "drift" }, almanac.ErrInvalid},
		{"chosen unknown", func(r *accuracy.Review) {
			r.Series[0].Backtest = &accuracy.Comparison{Runs: []accuracy.Run{{Name: "naive"}}}
			r.Series[0].Chosen = "drift"
		}, almanac.ErrInvalid},
		{"failed with a bad repair", func(r *accuracy.Review) {
			r.Series[0].Err = errors.New("no fit")
			r.Series[0].Repairs = []decompose.Change{{Time: r.Series[0].History.Time(-1), New: 3}}
		}, almanac.ErrInvalid},
		{"no band from a forecast without distribution", func(r *accuracy.Review) { r.Levels = []float64{80, 95} }, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := accuracy.Review{Series: []accuracy.ReviewSeries{simpleEntry()}}
			tc.change(&r)
			var buf bytes.Buffer
			err := accuracy.WriteReview(&buf, r)
			if tc.want == nil {
				if err != nil {
					t.Fatal(err)
				}
				if !strings.Contains(buf.String(), "The 95% band is not drawn") {
					t.Error("the band that could not be drawn is not noted")
				}
				parsePage(t, buf.Bytes())
				return
			}
			if !errors.Is(err, tc.want) {
				t.Fatalf("error %v, want one wrapping %v", err, tc.want)
			}
			if buf.Len() != 0 {
				t.Errorf("%d bytes written beside an error", buf.Len())
			}
		})
	}
}

// TestWriteReviewEdgeData draws what a planner may meet: failed series
// with odd or no data, values next to the float64 limit, a constant
// series, one observation, a single-step forecast, and long histories of
// every frequency. Each page must be well-formed with finite coordinates.
func TestWriteReviewEdgeData(t *testing.T) {
	start := time.Date(2020, 2, 29, 0, 0, 0, 0, time.UTC)
	entry := func(freq calendar.Frequency, vals []float64, h int) accuracy.ReviewSeries {
		y := almanac.Series{Key: "x", Start: start, Freq: freq, Values: vals}
		last := vals[len(vals)-1]
		mean := make([]float64, h)
		lo := make([]float64, h)
		hi := make([]float64, h)
		for i := range mean {
			mean[i], lo[i], hi[i] = last, last-math.Abs(last)/4, last
		}
		return accuracy.ReviewSeries{History: y, Forecast: almanac.Forecast{Start: y.Time(len(vals)), Freq: freq, Mean: mean,
			Intervals: []almanac.Interval{{Level: 90, Lower: lo, Upper: hi}}}}
	}
	ramp := func(n int, scale float64) []float64 {
		v := make([]float64, n)
		for i := range v {
			v[i] = scale * (1 + float64(i%17)/17)
		}
		return v
	}
	tests := []struct {
		name string
		rs   accuracy.ReviewSeries
	}{
		{"near the float64 limit", entry(calendar.Monthly, []float64{math.MaxFloat64, -math.MaxFloat64, math.MaxFloat64 / 3}, 2)},
		{"largest value constant", entry(calendar.Monthly, []float64{math.MaxFloat64, math.MaxFloat64}, 3)},
		{"tiny values", entry(calendar.Monthly, ramp(30, 1e-300), 4)},
		{"constant", entry(calendar.Quarterly, []float64{5, 5, 5, 5}, 4)},
		{"zero", entry(calendar.Yearly, []float64{0, 0, 0}, 2)},
		{"one observation", entry(calendar.Weekly, []float64{7}, 1)},
		{"hourly, long", entry(calendar.Hourly, ramp(2000, 40), 48)},
		{"daily, long", entry(calendar.Daily, ramp(1500, 900), 28)},
		{"yearly, long", entry(calendar.Yearly, ramp(120, 3), 10)},
		{"every 15 minutes", entry(calendar.Every(15, calendar.Minute), ramp(300, 2), 8)},
		{"failed, no data", accuracy.ReviewSeries{Key: "y", Err: errors.New("could not read")}},
		{"failed, infinite data", accuracy.ReviewSeries{History: almanac.Series{Key: "z", Start: start, Freq: calendar.Monthly, Values: []float64{1, math.Inf(1)}}, Err: errors.New("bad")}},
		{"failed, all missing", accuracy.ReviewSeries{History: almanac.Series{Key: "w", Start: start, Freq: calendar.Monthly, Values: []float64{math.NaN()}}, Err: errors.New("nothing")}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := accuracy.WriteReview(&buf, accuracy.Review{Series: []accuracy.ReviewSeries{tc.rs}}); err != nil {
				t.Fatal(err)
			}
			s := parsePage(t, buf.Bytes())
			if s.charts != 1 || s.rows != 1 {
				t.Errorf("%d charts, %d rows", s.charts, s.rows)
			}
			for _, bad := range []string{"NaN", "Inf"} {
				if bytes.Contains(buf.Bytes(), []byte(bad)) {
					t.Errorf("page holds %q", bad)
				}
			}
		})
	}
}

func TestReviewFromBatchLengths(t *testing.T) {
	ys := []almanac.Series{storeSeries("a", 100, 1, 36)}
	fits, _ := almanac.BatchFit(context.Background(), almanac.Naive{}, ys, almanac.BatchOptions{Workers: 1})
	fcs := almanac.ForecastAll(fits, 3)
	for _, tc := range []struct {
		name string
		run  func() error
	}{
		{"fits", func() error { _, err := accuracy.ReviewFromBatch(ys, nil, fcs, nil); return err }},
		{"forecasts", func() error { _, err := accuracy.ReviewFromBatch(ys, fits, fcs[:0], nil); return err }},
		{"backtest", func() error {
			_, err := accuracy.ReviewFromBatch(ys, fits, fcs, &accuracy.BatchComparison{})
			return err
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if err := tc.run(); !errors.Is(err, almanac.ErrLength) {
				t.Fatalf("error %v, want one wrapping ErrLength", err)
			}
		})
	}
	got, err := accuracy.ReviewFromBatch(ys, fits, fcs, nil)
	if err != nil || len(got) != 1 || got[0].Model != fmt.Sprint(fits[0].Fitted) {
		t.Fatalf("got %+v, %v", got, err)
	}
}

// BenchmarkWriteReview writes the page of the four-series review, and of
// 200 series (the same entries repeated), to io.Discard.
func BenchmarkWriteReview(b *testing.B) {
	r := storeReview(b)
	for _, n := range []int{4, 200} {
		big := r
		big.Series = nil
		for len(big.Series) < n {
			big.Series = append(big.Series, r.Series...)
		}
		b.Run(fmt.Sprintf("series=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := accuracy.WriteReview(io.Discard, big); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
