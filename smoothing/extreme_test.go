package smoothing

import (
	"context"
	"errors"
	"fmt"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// sentinels are the errors a smoothing model may wrap.
var sentinels = []error{
	almanac.ErrEmpty, almanac.ErrTooShort, almanac.ErrAllMissing, almanac.ErrMissing,
	almanac.ErrNonFinite, almanac.ErrConstant, almanac.ErrNonPositive, almanac.ErrLength,
	almanac.ErrFrequency, almanac.ErrLevel, almanac.ErrHorizon, almanac.ErrNoDistribution,
	almanac.ErrInvalid, almanac.ErrNotFitted, ErrPeriodTooLong, ErrNoCandidate, ErrNotAdmissible,
}

func wrapsSentinel(err error) bool {
	for _, s := range sentinels {
		if errors.Is(err, s) {
			return true
		}
	}
	return false
}

// checkFiniteOrSentinel fits model to y and forecasts h steps with 80%
// and 95% intervals: either every mean and bound is finite, or the error
// wraps one of the package's or the root package's sentinels.
func checkFiniteOrSentinel(t *testing.T, model almanac.Model, y almanac.Series, h int) {
	t.Helper()
	fit, err := model.Fit(context.Background(), y)
	if err != nil {
		if !wrapsSentinel(err) {
			t.Errorf("%v: fit error wraps no sentinel: %v", model, err)
		}
		return
	}
	fc, err := fit.Forecast(h, 80, 95)
	if err != nil {
		if !wrapsSentinel(err) {
			t.Errorf("%v: forecast error wraps no sentinel: %v", fit, err)
		}
		return
	}
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
	for i, v := range fc.Mean {
		if bad(v) {
			t.Fatalf("%v: mean[%d] = %v with a nil error", fit, i, v)
		}
	}
	for _, iv := range fc.Intervals {
		for i := range iv.Lower {
			if bad(iv.Lower[i]) || bad(iv.Upper[i]) {
				t.Fatalf("%v: %v%% interval[%d] = [%v, %v] with a nil error", fit, iv.Level, i, iv.Lower[i], iv.Upper[i])
			}
		}
	}
}

// TestExtremeScales: every smoothing model, on series rescaled to
// 1e-300 … 1e300 and on the reproducers of issue 11 (invented data),
// returns finite forecasts and bands or an error wrapping a sentinel,
// never NaN or Inf with a nil error.
func TestExtremeScales(t *testing.T) {
	start := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
	// An invented monthly series with trend, season and noise (positive).
	base := make([]float64, 48)
	for i := range base {
		base[i] = 100 + float64(i) + 10*math.Sin(2*math.Pi*float64(i)/12) + float64((i*7)%5)
	}
	// An invented intermittent series.
	inter := make([]float64, 48)
	for i := range inter {
		if i%3 == 0 || i%7 == 0 {
			inter[i] = float64(1 + (i*5)%4)
		}
	}
	var models []almanac.Model
	for _, e := range []ErrorType{AdditiveError, MultiplicativeError} {
		for _, tr := range []TrendType{NoTrend, AdditiveTrend, DampedTrend, MultiplicativeTrend, DampedMultiplicativeTrend} {
			for _, se := range []SeasonType{NoSeason, AdditiveSeason, MultiplicativeSeason} {
				models = append(models, Spec{Error: e, Trend: tr, Season: se, Paths: 200})
			}
		}
	}
	models = append(models, Select{Paths: 200}, HoltWinters{Estimate: true}, HoltWinters{Estimate: true, Multiplicative: true},
		Theta{}, Croston{}, Croston{Variant: CrostonSBA}, Croston{EstimateAlpha: true}, TSB{}, TSB{Estimate: true})
	series := map[string]almanac.Series{}
	for _, k := range []float64{1e-300, 1e-150, 1, 1e150, 1e300} {
		for name, v := range map[string][]float64{"smooth": base, "intermittent": inter} {
			ys := make([]float64, len(v))
			for i := range v {
				ys[i] = v[i] * k
			}
			series[fmt.Sprintf("%s×%g", name, k)] = almanac.Series{Key: name, Start: start, Freq: calendar.Monthly, Values: ys}
		}
	}
	series["theta-1e308"] = almanac.Series{Key: "r", Start: start, Freq: calendar.Yearly, Values: []float64{1e308, 1e308, 1e308}}
	series["mult-wide"] = almanac.Series{Key: "r", Start: start, Freq: calendar.Yearly, Values: []float64{100, 101, 1e-300, 1e300, 99, 100}}
	series["pm-1e308"] = almanac.Series{Key: "r", Start: start, Freq: calendar.Yearly, Values: []float64{1e308, -1e308, 1e308, -1e308, 1e308, -1e308, 1e308}}
	for name, y := range series {
		for _, m := range models {
			t.Run(name+"/"+fmt.Sprint(m), func(t *testing.T) {
				checkFiniteOrSentinel(t, m, y, 12)
			})
		}
	}
}

// TestNonFiniteReproducers: the cases of issue 11 that gave NaN with a nil
// error now give finite answers (both are representable).
func TestNonFiniteReproducers(t *testing.T) {
	start := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
	// Theta on a constant series of 1e308: the forecast is 1e308.
	y := almanac.Series{Key: "r", Start: start, Freq: calendar.Yearly, Values: []float64{1e308, 1e308, 1e308}}
	fit, err := Theta{}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range fc.Mean {
		if v != 1e308 {
			t.Errorf("Theta on constant 1e308: forecast %v", v)
		}
	}
	// Multiplicative-error ETS on a series spanning 1e-300 … 1e300:
	// finite means and bounds, directly and through Select.
	y = almanac.Series{Key: "r", Start: start, Freq: calendar.Yearly, Values: []float64{100, 101, 1e-300, 1e300, 99, 100}}
	for _, m := range []almanac.Model{Spec{Error: MultiplicativeError}, Select{}} {
		fit, err := m.Fit(context.Background(), y)
		if err != nil {
			if !wrapsSentinel(err) {
				t.Errorf("%v: %v", m, err)
			}
			continue
		}
		fc, err := fit.Forecast(6, 80, 95)
		if err != nil {
			if !wrapsSentinel(err) {
				t.Errorf("%v: %v", fit, err)
			}
			continue
		}
		for _, iv := range fc.Intervals {
			for i := range iv.Lower {
				if math.IsNaN(iv.Lower[i]) || math.IsNaN(iv.Upper[i]) || math.IsInf(iv.Upper[i], 0) {
					t.Errorf("%v: %v%% bounds [%v, %v] at step %d", fit, iv.Level, iv.Lower[i], iv.Upper[i], i+1)
				}
			}
		}
	}
}
