package accuracy_test

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// publishedSeasonal evaluates Naive2's seasonality test exactly as
// published (../shared/reference/published.md, "Forecast-competition
// definitions", from the M4 code): seasonal iff n ≥ 3m and
// |r_m| > 1.645·√((1 + 2 Σ_{i=1}^{m−1} r_i²)/n), with r the sample
// autocorrelations (accuracy.ACF, itself checked against R's acf).
func publishedSeasonal(t *testing.T, y []float64, m int) bool {
	t.Helper()
	if m <= 1 || len(y) < 3*m {
		return false
	}
	c, err := accuracy.ACF(y, m)
	if err != nil {
		t.Fatal(err)
	}
	r := c.Values
	s := 1.0
	for i := 1; i < m; i++ {
		s += 2 * r[i] * r[i]
	}
	return math.Abs(r[m]) > 1.645*math.Sqrt(s/float64(len(y)))
}

func monthly(key string, v []float64) almanac.Series {
	return almanac.Series{Key: key, Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

func TestNaive2SeasonalityTest(t *testing.T) {
	f, err := reftest.Load("testdata/reference/m3_n1402_monthly_snaive.json")
	if err != nil {
		t.Fatal(err)
	}
	n1402 := f.Floats(t, "spec.insample") // M3 N1402, 50 monthly values
	air := airPassengers(t).Values
	lh := lhSeries(t).Values
	for _, c := range []struct {
		name string
		y    []float64
		m    int
	}{
		{"AirPassengers m=12", air, 12},
		{"AirPassengers first 35 (n < 3m)", air[:35], 12},
		{"AirPassengers first 36", air[:36], 12},
		{"AirPassengers first 48", air[:48], 12},
		{"AirPassengers last 60", air[84:], 12},
		{"AirPassengers m=6", air, 6},
		{"M3 N1402 m=12", n1402, 12},
		{"lh m=4", lh, 4},
		{"lh m=12 (n = 48 ≥ 36)", lh, 12},
	} {
		t.Run(c.name, func(t *testing.T) {
			fit, err := accuracy.Naive2{Period: c.m}.Fit(context.Background(), monthly(c.name, c.y))
			if err != nil {
				t.Fatal(err)
			}
			got := fit.(*accuracy.Naive2Fit).Seasonal()
			t.Logf("seasonal: %v", got)
			if want := publishedSeasonal(t, c.y, c.m); got != want {
				t.Errorf("seasonal = %v, the published test says %v", got, want)
			}
		})
	}
	// AirPassengers is the textbook seasonal series: the test must find it.
	fit, _ := accuracy.Naive2{}.Fit(context.Background(), airPassengers(t))
	if !fit.(*accuracy.Naive2Fit).Seasonal() || fit.String() != "Naive2(12)" {
		t.Errorf("AirPassengers: %s, seasonal %v", fit, fit.(*accuracy.Naive2Fit).Seasonal())
	}
}

func TestNaive2Forecast(t *testing.T) {
	y := airPassengers(t)
	fit, err := accuracy.Naive2{}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	idx := fit.(*accuracy.Naive2Fit).Indices()
	fc, err := fit.Forecast(14, 80)
	if err != nil {
		t.Fatal(err)
	}
	// Published method: the last value divided by its season's index,
	// times the index of each forecast's season (positions counted from
	// the first observation, n = 144).
	last := y.Values[143] / idx[143%12]
	for j, got := range fc.Mean {
		numtest.Scalar(t, "forecast", got, last*idx[(144+j)%12], 0, 1e-15)
	}
	if !fc.Start.Equal(y.Time(144)) {
		t.Errorf("start %v", fc.Start)
	}
	// Without seasonality Naive2 is the naive method.
	lh := lhSeries(t)
	a, _ := accuracy.Naive2{}.Fit(context.Background(), lh)
	b, _ := almanac.Naive{}.Fit(context.Background(), lh)
	fa, _ := a.Forecast(5, 95)
	fb, _ := b.Forecast(5, 95)
	numtest.Slice(t, "mean", fa.Mean, fb.Mean, 0, 0)
	numtest.Slice(t, "upper", fa.Intervals[0].Upper, fb.Intervals[0].Upper, 0, 1e-14)
	if a.String() != "Naive2" {
		t.Errorf("String %q", a)
	}
	mase, _ := accuracy.MASE(lh.Values, a.FittedValues(), lh.Values, 1)
	if mase != 1 {
		t.Errorf("in-sample MASE %v, want exactly 1", mase)
	}
}

func TestNaive2Errors(t *testing.T) {
	air := airPassengers(t)
	neg := air.Clone()
	neg.Values[5] = -1
	gap := air.Clone()
	gap.Values[7] = math.NaN()
	for _, c := range []struct {
		name    string
		model   accuracy.Naive2
		y       almanac.Series
		wantErr error
	}{
		{"negative period", accuracy.Naive2{Period: -2}, air, almanac.ErrInvalid},
		{"missing value", accuracy.Naive2{}, gap, almanac.ErrMissing},
		{"negative value in a seasonal series", accuracy.Naive2{}, neg, almanac.ErrNonPositive},
		{"one observation", accuracy.Naive2{}, air.Head(1), almanac.ErrTooShort},
		{"empty", accuracy.Naive2{}, air.Head(0), almanac.ErrEmpty},
	} {
		t.Run(c.name, func(t *testing.T) {
			if _, err := c.model.Fit(context.Background(), c.y); !errors.Is(err, c.wantErr) {
				t.Errorf("error %v, want %v", err, c.wantErr)
			}
		})
	}
	fit, _ := accuracy.Naive2{}.Fit(context.Background(), air)
	if _, err := fit.Forecast(0); !errors.Is(err, almanac.ErrHorizon) || !strings.HasPrefix(err.Error(), "accuracy: ") {
		t.Errorf("h = 0: %v", err)
	}
	if _, err := fit.Forecast(3, 100); !errors.Is(err, almanac.ErrLevel) || !strings.HasPrefix(err.Error(), "accuracy: ") {
		t.Errorf("level 100: %v", err)
	}
	// A period too long for the seasonality test (n < 3m) gives the
	// naive method; a huge one once overflowed 3m and panicked.
	for _, p := range []int{49, math.MaxInt/3 + 1, math.MaxInt} {
		fit, err := accuracy.Naive2{Period: p}.Fit(context.Background(), air)
		if err != nil {
			t.Fatalf("period %d: %v", p, err)
		}
		if fit.(*accuracy.Naive2Fit).Seasonal() {
			t.Errorf("period %d: seasonal with %d observations", p, air.Len())
		}
	}
}

func TestOWA(t *testing.T) {
	// ½(10/12.5 + 1.2/1.5) = ½(0.8 + 0.8) = 0.8.
	got, err := accuracy.OWA(10, 1.2, 12.5, 1.5)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "OWA", got, 0.8, 0, 1e-15)
	if _, err := accuracy.OWA(10, 1, 0, 1); !errors.Is(err, accuracy.ErrUndefined) {
		t.Errorf("zero Naive2 sMAPE: %v", err)
	}
	if _, err := accuracy.OWA(math.NaN(), 1, 1, 1); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("NaN: %v", err)
	}

	// In a backtest, Naive2 against itself has OWA exactly 1.
	bt := accuracy.Backtest{Horizon: 12, Origins: 4, Benchmarks: []accuracy.Candidate{{Name: accuracy.Naive2Name, Model: accuracy.Naive2{}}}}
	c, err := bt.Run(context.Background(), airPassengers(t), accuracy.Candidate{Name: "seasonal naive", Model: almanac.SeasonalNaive{}})
	if err != nil {
		t.Fatal(err)
	}
	if c.Baseline != "seasonal naive" {
		t.Errorf("baseline %q", c.Baseline)
	}
	self, err := c.OWA(accuracy.Naive2Name, accuracy.Naive2Name)
	if err != nil || self != 1 {
		t.Errorf("OWA of Naive2 against itself %v, %v", self, err)
	}
	sn, _ := c.Run("seasonal naive")
	n2, _ := c.Run(accuracy.Naive2Name)
	want, _ := accuracy.OWA(sn.Overall.SMAPE, sn.Overall.MASE, n2.Overall.SMAPE, n2.Overall.MASE)
	got, err = c.OWA("seasonal naive", accuracy.Naive2Name)
	if err != nil || got != want {
		t.Errorf("OWA %v, %v; want %v", got, err, want)
	}
	if _, err := c.OWA("nobody", accuracy.Naive2Name); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("unknown name: %v", err)
	}
}

// TestNaive2ClassicalOverflow: a seasonal series repeating 1e300, 1e−75,
// 1e−75, 1e−75 (invented) passes the seasonality test, but the seasonal
// index of its small quarters falls below the float64 range and the
// decomposition's remainder overflows: the error wraps
// almanac.ErrNonFinite, not almanac.ErrTooShort as it did.
func TestNaive2ClassicalOverflow(t *testing.T) {
	var v []float64
	for range 4 {
		v = append(v, 1e300, 1e-75, 1e-75, 1e-75)
	}
	y := almanac.Series{Key: "q", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v}
	f, err := accuracy.Naive2{}.Fit(context.Background(), y)
	if !errors.Is(err, almanac.ErrNonFinite) || errors.Is(err, almanac.ErrTooShort) || f != nil {
		t.Fatalf("fit %v, error %v; want an error wrapping ErrNonFinite only", f, err)
	}
}
