package almanac_test

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
)

func TestForecastNormal(t *testing.T) {
	mean := []float64{10, 20}
	fc, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, mean, &almanac.Normal{Mean: mean, SD: []float64{2, 0}}, 95)
	if err != nil {
		t.Fatal(err)
	}
	// Standard normal 0.975 quantile 1.959963984540054 (printed as 1.96
	// in every normal table; scipy.stats.norm.ppf(0.975), recalled from
	// memory).
	numtest.Slice(t, "upper95", fc.Intervals[0].Upper, []float64{10 + 2*1.959963984540054, 20}, 1e-12, 0)
	// A level not requested comes from the distribution: 0.9 quantile
	// 1.2815515655446004 (scipy.stats.norm.ppf(0.9), recalled from
	// memory; 1.2816 in normal tables).
	lo, hi, err := fc.Bounds(80)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "lower80", lo, []float64{10 - 2*1.2815515655446004, 20}, 1e-12, 0)
	numtest.Slice(t, "upper80", hi, []float64{10 + 2*1.2815515655446004, 20}, 1e-12, 0)
	if !fc.Time(1).Equal(utc(2024, 2, 1)) || fc.Horizon() != 2 || fc.SamplePaths() != nil {
		t.Error("Time/Horizon/SamplePaths")
	}
}

func TestForecastSample(t *testing.T) {
	paths := [][]float64{{1, 5}, {2, math.NaN()}, {3, 7}, {4, 6}}
	fc, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{2.5, 6}, &almanac.Sample{Paths: paths}, 50)
	if err != nil {
		t.Fatal(err)
	}
	// Type 7 quantiles (Hyndman & Fan 1996; R's quantile default):
	// quantile(c(1,2,3,4), 0.25) = 1.75, quantile(c(5,6,7), 0.25) = 5.5;
	// NaN ignored.
	q, err := fc.Quantile(0.25)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "q25", q, []float64{1.75, 5.5}, 1e-15, 0)
	numtest.Slice(t, "lower50", fc.Intervals[0].Lower, []float64{1.75, 5.5}, 1e-15, 0)
	if len(fc.SamplePaths()) != 4 {
		t.Error("SamplePaths")
	}
}

func TestForecastErrors(t *testing.T) {
	fc := almanac.Forecast{Mean: []float64{1}}
	for _, tt := range []struct {
		name string
		err  error
		want error
	}{
		{"quantile 0", func() error { _, err := fc.Quantile(0); return err }(), almanac.ErrLevel},
		{"quantile 1", func() error { _, err := fc.Quantile(1); return err }(), almanac.ErrLevel},
		{"quantile NaN", func() error { _, err := fc.Quantile(math.NaN()); return err }(), almanac.ErrLevel},
		{"quantile without distribution", func() error { _, err := fc.Quantile(0.5); return err }(), almanac.ErrNoDistribution},
		{"bounds level 100", func() error { _, _, err := fc.Bounds(100); return err }(), almanac.ErrLevel},
		{"bounds without distribution", func() error { _, _, err := fc.Bounds(80); return err }(), almanac.ErrNoDistribution},
		{"new forecast without distribution", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1}, nil, 80)
			return err
		}(), almanac.ErrNoDistribution},
		{"new forecast bad level", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1}, nil, 180)
			return err
		}(), almanac.ErrLevel},
		// A distribution shorter than the point forecasts used to panic
		// (index out of range) when the intervals were filled.
		{"new forecast short normal", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1, 2}, &almanac.Normal{Mean: []float64{1, 2}, SD: []float64{1}}, 80)
			return err
		}(), almanac.ErrLength},
		{"new forecast short path", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1, 2}, &almanac.Sample{Paths: [][]float64{{1, 2}, {1}}}, 80)
			return err
		}(), almanac.ErrLength},
		{"new forecast short mapped base", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1, 2}, &almanac.Mapped{Base: &almanac.Normal{Mean: []float64{1}, SD: []float64{1}}, Map: math.Exp})
			return err
		}(), almanac.ErrLength},
		{"new forecast mapped without map", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1}, &almanac.Mapped{Base: &almanac.Normal{Mean: []float64{1}, SD: []float64{1}}}, 80)
			return err
		}(), almanac.ErrInvalid},
		{"new forecast negative sd", func() error {
			// Bounds would come out reversed (lower above upper).
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1}, &almanac.Normal{Mean: []float64{1}, SD: []float64{-2}}, 80)
			return err
		}(), almanac.ErrInvalid},
		{"new forecast sample without paths", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1}, &almanac.Sample{}, 80)
			return err
		}(), almanac.ErrInvalid},
		{"new forecast nil normal", func() error {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1}, (*almanac.Normal)(nil), 80)
			return err
		}(), almanac.ErrInvalid},
		{"quantile of a forecast built by hand with a short distribution", func() error {
			short := almanac.Forecast{Mean: []float64{1, 2}, Dist: &almanac.Normal{Mean: []float64{1}, SD: []float64{1}}}
			_, err := short.Quantile(0.5)
			return err
		}(), almanac.ErrLength},
		{"check horizon", almanac.CheckHorizon(0), almanac.ErrHorizon},
		{"check horizon too long", almanac.CheckHorizon(almanac.MaxHorizon + 1), almanac.ErrHorizon},
		{"naive forecast beyond the maximum horizon", func() error {
			fit, err := almanac.Naive{}.Fit(context.Background(), almanac.Series{Key: "k", Start: utc(2024, 1, 1), Freq: calendar.Monthly, Values: []float64{1, 2, 3}})
			if err != nil {
				return err
			}
			_, err = fit.Forecast(math.MaxInt, 80)
			return err
		}(), almanac.ErrHorizon},
		{"check levels", almanac.CheckLevels(80, -1), almanac.ErrLevel},
	} {
		t.Run(tt.name, func(t *testing.T) {
			if !errors.Is(tt.err, tt.want) {
				t.Errorf("err = %v, want %v", tt.err, tt.want)
			}
		})
	}
}

// TestNewForecastSampleBounds: the bounds NewForecast takes from sample
// paths (one sort per step) equal the distribution's own Quantile at each
// bound, NaN paths included; a hand case: paths 1..5 at step 0, the 80%
// interval is the type-7 quantiles at 0.1 and 0.9, 1.4 and 4.6.
func TestNewForecastSampleBounds(t *testing.T) {
	paths := [][]float64{{3, 10}, {1, math.NaN()}, {5, 7}, {2, 9}, {4, 8}}
	d := &almanac.Sample{Paths: paths}
	f, err := almanac.NewForecast(utc(2026, 1, 1), calendar.Monthly, []float64{3, 8.5}, d, 80, 50)
	if err != nil {
		t.Fatal(err)
	}
	for _, iv := range f.Intervals {
		for h := range 2 {
			lo, hi := d.Quantile(h, (1-iv.Level/100)/2), d.Quantile(h, (1+iv.Level/100)/2)
			if iv.Lower[h] != lo || iv.Upper[h] != hi {
				t.Errorf("level %v step %d: [%v, %v], Quantile gives [%v, %v]", iv.Level, h, iv.Lower[h], iv.Upper[h], lo, hi)
			}
		}
	}
	if got := f.Intervals[0]; math.Abs(got.Lower[0]-1.4) > 1e-12 || math.Abs(got.Upper[0]-4.6) > 1e-12 {
		t.Errorf("80%% interval at step 0 = [%v, %v], want [1.4, 4.6]", got.Lower[0], got.Upper[0])
	}
}
