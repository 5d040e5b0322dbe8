package smoothing

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
)

// TestShiftInvariance: an additive model's likelihood does not change
// when a constant is added to the data (the fitted values shift with it),
// so a fit to y + c must reach the same maximum as a fit to y (relative
// 1e-6). M3 series N302 (yearly; Makridakis & Hibon 2000, via
// internal/m3data) is the case where ETS(A,A,N) reached −119.25 on y and
// −116.26 on y − mean(y) before the data were centred internally;
// AirPassengers (the reference fixtures' values) covers the seasonal
// models.
func TestShiftInvariance(t *testing.T) {
	var n302 []float64
	for _, s := range m3data.Load(t, "m3_yearly.csv") {
		if s.ID == "N302" {
			n302 = s.Train
		}
	}
	if n302 == nil {
		t.Fatal("M3 series N302 not found")
	}
	air := airPassengers(t)
	cases := []struct {
		name string
		y    almanac.Series
		spec Spec
	}{
		{"N302", almanac.Series{Key: "N302", Start: time.Date(1980, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: n302}, Spec{}},
		{"N302", almanac.Series{Key: "N302", Start: time.Date(1980, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: n302}, Spec{Trend: AdditiveTrend}},
		{"N302", almanac.Series{Key: "N302", Start: time.Date(1980, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: n302}, Spec{Trend: DampedTrend}},
		{"AirPassengers", air, Spec{Season: AdditiveSeason}},
		{"AirPassengers", air, Spec{Trend: AdditiveTrend, Season: AdditiveSeason}},
		{"AirPassengers", air, Spec{Trend: DampedTrend, Season: AdditiveSeason}},
	}
	for _, tc := range cases {
		t.Run(tc.name+"/"+tc.spec.String(), func(t *testing.T) {
			base, err := tc.spec.fit(context.Background(), tc.y)
			if err != nil {
				t.Fatal(err)
			}
			mean := 0.0
			for _, v := range tc.y.Values {
				mean += v
			}
			mean /= float64(tc.y.Len())
			for _, c := range []float64{-mean, 1e6, -3.5e4} {
				ys := tc.y.Clone()
				for i := range ys.Values {
					ys.Values[i] += c
				}
				fit, err := tc.spec.fit(context.Background(), ys)
				if err != nil {
					t.Fatal(err)
				}
				if d := math.Abs(fit.LogLik - base.LogLik); d > 1e-6*math.Abs(base.LogLik) {
					t.Errorf("shift %g: loglik %.10g, unshifted %.10g", c, fit.LogLik, base.LogLik)
				}
			}
		})
	}
}

// TestScaleInvarianceExtreme: multiplying the data by a power of ten
// multiplies the forecasts by it (relative 1e-6) and shifts the
// log-likelihood by −n·log(factor), for the models of the taxonomy
// (N, A, Ad and M trends), including factors near the float64 limits;
// with additive error at 1e300 the innovation variance itself (about
// 1e600) is not representable and the fit must say so with an error
// wrapping almanac.ErrNonFinite.
func TestScaleInvarianceExtreme(t *testing.T) {
	y := airPassengers(t)
	for _, e := range []ErrorType{AdditiveError, MultiplicativeError} {
		for _, tr := range []TrendType{NoTrend, AdditiveTrend, DampedTrend, MultiplicativeTrend} {
			for _, se := range []SeasonType{NoSeason, AdditiveSeason, MultiplicativeSeason} {
				sp := Spec{Error: e, Trend: tr, Season: se}
				t.Run(sp.String(), func(t *testing.T) {
					base, err := sp.fit(context.Background(), y)
					if err != nil {
						t.Fatal(err)
					}
					fb, err := base.Forecast(12)
					if err != nil {
						t.Fatal(err)
					}
					for _, k := range []float64{1e-300, 1e-5, 1e5, 1e300} {
						ys := y.Clone()
						for i := range ys.Values {
							ys.Values[i] *= k
						}
						fit, err := sp.fit(context.Background(), ys)
						if e == AdditiveError && k > 1e150 && errors.Is(err, almanac.ErrNonFinite) {
							// σ² of additive errors of order 1e300 is
							// of order 1e600: not representable.
							continue
						}
						if err != nil {
							t.Fatalf("factor %g: %v", k, err)
						}
						want := base.LogLik - float64(y.Len())*math.Log(k)
						if math.Abs(fit.LogLik-want) > 1e-6*math.Abs(want) {
							t.Errorf("factor %g: loglik %.10g, want %.10g", k, fit.LogLik, want)
						}
						fc, err := fit.Forecast(12)
						if err != nil {
							t.Fatalf("factor %g: %v", k, err)
						}
						for h := range fc.Mean {
							if w := fb.Mean[h] * k; math.Abs(fc.Mean[h]-w) > 1e-6*math.Abs(w) {
								t.Errorf("factor %g, step %d: forecast %g, want %g", k, h+1, fc.Mean[h], w)
								break
							}
						}
					}
				})
			}
		}
	}
}
