package arima

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

// meanAbsError is the mean absolute error of a model's forecasts of the
// held-out part.
func meanAbsError(t *testing.T, m almanac.Model, train, test almanac.Series) float64 {
	t.Helper()
	f, err := m.Fit(context.Background(), train)
	if err != nil {
		t.Fatalf("%T: %v", m, err)
	}
	fc, err := f.Forecast(test.Len())
	if err != nil {
		t.Fatal(err)
	}
	s := 0.0
	for i, v := range test.Values {
		s += math.Abs(v - fc.Mean[i])
	}
	return s / float64(test.Len())
}

// TestHarmonicWeekly: invented weekly store series (a year of exactly
// 365.25/7 weeks with two harmonics, holidays, AR(1) noise; see
// weeklyStore), three years to fit and half a year held out. The number
// of harmonics chosen is near the two planted (1 to 4), and the
// forecasts beat the seasonal naive and Theta (both with period 52) on
// the held-out weeks, on average over eight series (this test's own
// criterion; the invented data are for this property only).
func TestHarmonicWeekly(t *testing.T) {
	m := HarmonicRegression{Calendar: calendar.Design{Effects: []calendar.Effect{calendar.HolidayCount{Calendar: hardwareCalendar}}}}
	var dhr, snaive, theta float64
	for seed := range uint64(8) {
		y := weeklyStore(182, 200+seed, nil)
		train, test, err := y.Split(26)
		if err != nil {
			t.Fatal(err)
		}
		f, err := m.Fit(context.Background(), train)
		if err != nil {
			t.Fatal(err)
		}
		h := f.(*HarmonicFit)
		if len(h.Periods) != 1 || h.Periods[0] != 365.25/7 || h.Harmonics[0] < 1 || h.Harmonics[0] > 4 {
			t.Errorf("seed %d: %s", seed, h)
		}
		dhr += meanAbsError(t, m, train, test)
		snaive += meanAbsError(t, almanac.SeasonalNaive{Period: 52}, train, test)
		theta += meanAbsError(t, smoothing.Theta{Period: 52}, train, test)
	}
	t.Logf("mean absolute error over 8 series: harmonic regression %.1f, seasonal naive %.1f, Theta %.1f", dhr/8, snaive/8, theta/8)
	if !(dhr < snaive && dhr < theta) {
		t.Errorf("harmonic regression %.1f, seasonal naive %.1f, Theta %.1f", dhr/8, snaive/8, theta/8)
	}
}

// hourlyLoad is an invented hourly load: a daily cycle with two
// harmonics, a weekly one with one, AR(1) noise.
func hourlyLoad(n int, seed uint64) almanac.Series {
	rng := rand.New(rand.NewPCG(seed, 2))
	v := make([]float64, n)
	e := 0.0
	for i := range v {
		e = 0.6*e + rng.NormFloat64()
		hd, wk := float64(i%24), float64(i%168)
		v[i] = 50 + 10*math.Sin(2*math.Pi*hd/24) + 4*math.Cos(4*math.Pi*hd/24) + 6*math.Sin(2*math.Pi*wk/168) + 2*e
	}
	// Monday 3 January 2000 + whole weeks: the phases above are those of
	// calendar.Cycle.
	return almanac.Series{Key: "load", Start: time.Date(2024, time.March, 4, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, Values: v}
}

// TestHarmonicHourly: periods 24 and 168 from the frequency, harmonics
// near the planted (2, 1), and 48-hour forecasts better than the
// seasonal naive of either period.
func TestHarmonicHourly(t *testing.T) {
	y := hourlyLoad(768, 5)
	train, test, err := y.Split(48)
	if err != nil {
		t.Fatal(err)
	}
	f, err := HarmonicRegression{}.Fit(context.Background(), train)
	if err != nil {
		t.Fatal(err)
	}
	h := f.(*HarmonicFit)
	if fmt.Sprint(h.Periods) != "[24 168]" || h.Harmonics[0] < 2 || h.Harmonics[0] > 4 || h.Harmonics[1] < 1 || h.Harmonics[1] > 3 {
		t.Errorf("%s", h)
	}
	dhr := meanAbsError(t, HarmonicRegression{}, train, test)
	for _, p := range []int{24, 168} {
		if sn := meanAbsError(t, almanac.SeasonalNaive{Period: p}, train, test); !(dhr < sn) {
			t.Errorf("mean absolute error %.2f, seasonal naive (%d) %.2f", dhr, p, sn)
		}
	}
}

// TestHarmonicChoices: fixed harmonics are used as given; a daily series
// of two years uses both natural periods; the longer period stops below
// the first harmonic it shares with the shorter.
func TestHarmonicChoices(t *testing.T) {
	y := weeklyStore(156, 3, nil)
	f, err := HarmonicRegression{Harmonics: []int{5}}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	if h := f.(*HarmonicFit); h.Harmonics[0] != 5 || len(h.Screened) != 0 {
		t.Errorf("%s, screened %d", h, len(h.Screened))
	}
	rng := rand.New(rand.NewPCG(1, 1))
	v := make([]float64, 800)
	for i := range v {
		v[i] = 100 + 5*math.Sin(2*math.Pi*float64(i)/7) + 20*math.Cos(2*math.Pi*float64(i)/365.25) + rng.NormFloat64()
	}
	daily := almanac.Series{Start: time.Date(2023, time.January, 2, 0, 0, 0, 0, time.UTC), Freq: calendar.Daily, Values: v}
	f, err = HarmonicRegression{}.Fit(context.Background(), daily)
	if err != nil {
		t.Fatal(err)
	}
	if h := f.(*HarmonicFit); fmt.Sprint(h.Periods) != "[7 365.25]" {
		t.Errorf("%s", h)
	}
	// Missing weeks are allowed: the forecasts stay finite.
	gappy := weeklyStore(156, 4, nil)
	for _, i := range []int{10, 11, 80, 150} {
		gappy.Values[i] = math.NaN()
	}
	f, err = HarmonicRegression{}.Fit(context.Background(), gappy)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := f.Forecast(13, 80)
	if err != nil {
		t.Fatal(err)
	}
	for h, v := range fc.Mean {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("step %d: %v", h+1, v)
		}
	}
	if _, err := storeDetection().Fit(context.Background(), gappy); err != nil {
		t.Errorf("detection with missing weeks: %v", err)
	}
	if _, err := (HarmonicRegression{Harmonics: []int{0, 7}}).Fit(context.Background(), hourlyLoad(400, 1)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("7 harmonics of 168 beside 24: %v, want ErrInvalid", err)
	}
}

// TestHarmonicBadInput: errors wrap sentinels; a series too short for any
// harmonic wraps almanac.ErrTooShort.
func TestHarmonicBadInput(t *testing.T) {
	weekly := func(n int) almanac.Series { return weeklyStore(n, 1, nil) }
	yearly := almanac.Series{Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: seq(30)}
	tests := []struct {
		name string
		m    HarmonicRegression
		y    almanac.Series
		want error
	}{
		{"one year of weeks", HarmonicRegression{}, weekly(50), almanac.ErrTooShort},
		{"a few weeks", HarmonicRegression{}, weekly(5), almanac.ErrTooShort},
		{"short for one harmonic", HarmonicRegression{Periods: []float64{10}}, weekly(12), almanac.ErrTooShort},
		{"yearly data", HarmonicRegression{}, yearly, almanac.ErrInvalid},
		{"period 2", HarmonicRegression{Periods: []float64{2}}, weekly(100), almanac.ErrInvalid},
		{"period NaN", HarmonicRegression{Periods: []float64{math.NaN()}}, weekly(100), almanac.ErrInvalid},
		{"negative bound", HarmonicRegression{MaxHarmonics: -1}, weekly(100), almanac.ErrInvalid},
		{"too many harmonics", HarmonicRegression{Harmonics: []int{27}}, weekly(150), almanac.ErrInvalid},
		{"harmonics for no period", HarmonicRegression{Harmonics: []int{1, 1}}, weekly(150), almanac.ErrInvalid},
		{"empty", HarmonicRegression{}, almanac.Series{Start: time.Now(), Freq: calendar.Weekly}, almanac.ErrEmpty},
		{"constant", HarmonicRegression{}, almanac.Series{Start: time.Now(), Freq: calendar.Weekly, Values: make([]float64, 120)}, almanac.ErrConstant},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := tt.m.Fit(context.Background(), tt.y); !errors.Is(err, tt.want) {
				t.Errorf("got %v, want %v", err, tt.want)
			}
		})
	}
}

// BenchmarkHarmonic times the whole choice and fit on invented weekly
// series of two to five years (with a holiday count) and hourly series of
// 700 and 960 values (periods 24 and 168).
func BenchmarkHarmonic(b *testing.B) {
	m := HarmonicRegression{Calendar: calendar.Design{Effects: []calendar.Effect{calendar.HolidayCount{Calendar: hardwareCalendar}}}}
	for _, n := range []int{104, 156, 260} {
		b.Run(fmt.Sprintf("weekly/n=%d", n), func(b *testing.B) {
			y := weeklyStore(n, 9, nil)
			b.ReportAllocs()
			for b.Loop() {
				if _, err := m.Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
	for _, n := range []int{700, 960} {
		b.Run(fmt.Sprintf("hourly/n=%d", n), func(b *testing.B) {
			y := hourlyLoad(n, 5)
			b.ReportAllocs()
			for b.Loop() {
				if _, err := (HarmonicRegression{}).Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestHarmonicScaleInvariant: forecasts of c·y are c times those of y
// (DESIGN.md's scale invariance), and the detection finds the same
// interventions with sizes in proportion.
func TestHarmonicScaleInvariant(t *testing.T) {
	y := planted(156, 1002, 30, 80, 120)
	for _, c := range []float64{1e-6, 3e8} {
		yc := y.Clone()
		for i := range yc.Values {
			yc.Values[i] *= c
		}
		m := HarmonicRegression{Calendar: calendar.Design{Effects: []calendar.Effect{calendar.HolidayCount{Calendar: hardwareCalendar}}}}
		a, err := m.Fit(context.Background(), y)
		if err != nil {
			t.Fatal(err)
		}
		b, err := m.Fit(context.Background(), yc)
		if err != nil {
			t.Fatal(err)
		}
		fa, _ := a.Forecast(13)
		fb, _ := b.Forecast(13)
		for h := range fa.Mean {
			if math.Abs(fb.Mean[h]/c-fa.Mean[h]) > 1e-6*math.Abs(fa.Mean[h]) {
				t.Fatalf("c = %g, step %d: %v / c against %v", c, h+1, fb.Mean[h]/c, fa.Mean[h])
			}
		}
		da, err := storeDetection().Fit(context.Background(), y)
		if err != nil {
			t.Fatal(err)
		}
		db, err := storeDetection().Fit(context.Background(), yc)
		if err != nil {
			t.Fatal(err)
		}
		fa2, fb2 := da.(*DetectionResult).Found, db.(*DetectionResult).Found
		if len(fa2) != len(fb2) {
			t.Fatalf("c = %g: %d interventions, %d unscaled", c, len(fb2), len(fa2))
		}
		for i := range fa2 {
			if fa2[i].Name != fb2[i].Name || math.Abs(fb2[i].Size/c-fa2[i].Size) > 1e-4*math.Abs(fa2[i].Size) {
				t.Errorf("c = %g: %s %v against %s %v", c, fb2[i].Name, fb2[i].Size/c, fa2[i].Name, fa2[i].Size)
			}
		}
	}
}
