package arima_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/internal/numtest"
)

// TestSeasonalDifferences checks the choice of D by STL seasonal strength.
func TestSeasonalDifferences(t *testing.T) {
	src := rand.New(rand.NewPCG(7, 11))
	noise := make([]float64, 120)
	for i := range noise {
		noise[i] = src.NormFloat64()
	}
	gappy := logOf(selAirPassengers)
	gappy[30], gappy[31], gappy[77] = math.NaN(), math.NaN(), math.NaN()
	tests := []struct {
		name   string
		y      []float64
		period int
		spec   arima.SeasonalDifferencesSpec
		want   int
		reason string
	}{
		{"log AirPassengers", logOf(selAirPassengers), 12, arima.SeasonalDifferencesSpec{}, 1,
			"Box & Jenkins difference log Series G once seasonally, (1−B)(1−B¹²) (published.md)"},
		{"log AirPassengers with gaps", gappy, 12, arima.SeasonalDifferencesSpec{}, 1,
			"same series with three interior values missing (property: interpolation keeps the decision)"},
		{"white noise", noise, 12, arima.SeasonalDifferencesSpec{}, 0,
			"invented Gaussian noise (fixed seed) has no seasonal pattern (property)"},
		{"constant", []float64{5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5}, 4, arima.SeasonalDifferencesSpec{}, 0,
			"a constant has no seasonality"},
		{"threshold near 1 keeps D = 0", logOf(selAirPassengers), 12, arima.SeasonalDifferencesSpec{Threshold: 0.999}, 0,
			"the strength of log AirPassengers is below 0.999 (F_s < 1 unless the remainder vanishes), so this threshold is not exceeded (property of the threshold)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := arima.SeasonalDifferences(tc.y, tc.period, tc.spec)
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				f, _ := arima.SeasonalStrength(tc.y, tc.period, 0)
				t.Errorf("D = %d, want %d (strength %.3f; %s)", got, tc.want, f, tc.reason)
			}
		})
	}
}

// TestSeasonalStrengthProperties: F_s lies in [0, 1] and does not change
// when the series is scaled or shifted (it is a ratio of variances of
// components that scale with the data).
func TestSeasonalStrengthProperties(t *testing.T) {
	y := logOf(selAirPassengers)
	f, err := arima.SeasonalStrength(y, 12, 0)
	if err != nil {
		t.Fatal(err)
	}
	if f < 0 || f > 1 {
		t.Fatalf("strength %v outside [0, 1]", f)
	}
	z := make([]float64, len(y))
	for i, v := range y {
		z[i] = 250*v - 40
	}
	g, err := arima.SeasonalStrength(z, 12, 0)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "strength of 250y − 40", g, f, 0, 1e-9)
}

func TestSeasonalBadInput(t *testing.T) {
	nan := math.NaN()
	short := make([]float64, 24)
	for i := range short {
		short[i] = float64(i % 12)
	}
	tests := []struct {
		name   string
		y      []float64
		period int
		spec   arima.SeasonalDifferencesSpec
		want   error
	}{
		{"two periods only", short, 12, arima.SeasonalDifferencesSpec{}, almanac.ErrTooShort},
		{"period 1", selLH, 1, arima.SeasonalDifferencesSpec{}, almanac.ErrInvalid},
		{"empty", nil, 4, arima.SeasonalDifferencesSpec{}, almanac.ErrEmpty},
		{"all missing", []float64{nan, nan, nan, nan, nan, nan, nan, nan, nan}, 4, arima.SeasonalDifferencesSpec{}, almanac.ErrAllMissing},
		{"infinite", []float64{1, 2, 3, 4, 1, 2, math.Inf(1), 4, 1, 2, 3, 4}, 4, arima.SeasonalDifferencesSpec{}, almanac.ErrNonFinite},
		{"negative MaxD", selLH, 4, arima.SeasonalDifferencesSpec{MaxD: -1}, almanac.ErrInvalid},
		{"threshold 1", selLH, 4, arima.SeasonalDifferencesSpec{Threshold: 1}, almanac.ErrInvalid},
		{"negative span", selLH, 4, arima.SeasonalDifferencesSpec{Span: -3}, almanac.ErrInvalid},
		// 2·period overflowed to a negative number and the STL fit
		// sliced with it (panic).
		{"period beyond half the largest int", selLH, math.MaxInt/2 + 1, arima.SeasonalDifferencesSpec{}, almanac.ErrTooShort},
		{"largest int as period", selLH, math.MaxInt, arima.SeasonalDifferencesSpec{}, almanac.ErrTooShort},
		{"overflowing values", []float64{1e300, -1e300, 1e300, -1e300, 1e300, -1e300, 1e300, -1e300, 5}, 2, arima.SeasonalDifferencesSpec{}, almanac.ErrNonFinite},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := arima.SeasonalDifferences(tc.y, tc.period, tc.spec); !errors.Is(err, tc.want) {
				t.Errorf("err = %v, want %v", err, tc.want)
			}
		})
	}
}

// TestSeasonalStrengthHugeSpan: a span near the largest int (which once
// overflowed the STL window arithmetic and panicked) gives the fit of the
// span 2^60 it is bounded to, and that equals the fit with span 2^40: for
// this monthly series the STL windows and jumps come out the same and the
// loess weights are all 1 at both (a property of the tricube weights, not
// a reference value).
func TestSeasonalStrengthHugeSpan(t *testing.T) {
	y := logOf(selAirPassengers)
	huge, err := arima.SeasonalStrength(y, 12, math.MaxInt)
	if err != nil {
		t.Fatal(err)
	}
	big, err := arima.SeasonalStrength(y, 12, 1<<40)
	if err != nil {
		t.Fatal(err)
	}
	if math.Float64bits(huge) != math.Float64bits(big) {
		t.Errorf("strength %v with span MaxInt, %v with span 2^40", huge, big)
	}
	if _, err := arima.SeasonalDifferences(y, 12, arima.SeasonalDifferencesSpec{Span: math.MaxInt}); err != nil {
		t.Errorf("SeasonalDifferences with span MaxInt: %v", err)
	}
}
