package smoothing_test

import (
	"context"
	"errors"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

// TestClassicalOverflowIsNonFinite: when the classical decomposition
// behind the Holt-Winters start values or Theta's seasonal adjustment has
// a component beyond the float64 range, the error wraps
// almanac.ErrNonFinite; it used to wrap almanac.ErrTooShort, which sent
// the user looking for more data. Reproducers (invented data): a
// quarterly series whose first two years alternate ±1.7e308 around a
// spike (the detrended spike is 2.6e308), and one repeating 1e300,
// 1e−75, 1e−75, 1e−75, whose seasonal index of the small quarters falls
// below the float64 range, so the remainder overflows. Too few
// observations still wrap almanac.ErrTooShort.
func TestClassicalOverflowIsNonFinite(t *testing.T) {
	const big = 1.7e308
	spike := []float64{-big, -big, big, -big, -big, -big, -big, -big, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}
	var ratio []float64
	for range 4 {
		ratio = append(ratio, 1e300, 1e-75, 1e-75, 1e-75)
	}
	q := func(v []float64) almanac.Series {
		return almanac.Series{Key: "q", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v}
	}
	for _, c := range []struct {
		name  string
		model almanac.Model
		y     almanac.Series
		want  error
	}{
		{"Holt-Winters additive", smoothing.HoltWinters{}, q(spike), almanac.ErrNonFinite},
		{"Holt-Winters multiplicative", smoothing.HoltWinters{Multiplicative: true}, q(ratio), almanac.ErrNonFinite},
		{"Theta", smoothing.Theta{}, q(ratio), almanac.ErrNonFinite},
		{"Holt-Winters too short", smoothing.HoltWinters{}, q([]float64{1, 2, 3, 4, 5, 6, 7}), almanac.ErrTooShort},
	} {
		t.Run(c.name, func(t *testing.T) {
			f, err := c.model.Fit(context.Background(), c.y)
			if !errors.Is(err, c.want) || f != nil {
				t.Fatalf("fit %v, error %v; want an error wrapping %v", f, err, c.want)
			}
			if c.want == almanac.ErrNonFinite && errors.Is(err, almanac.ErrTooShort) {
				t.Errorf("error %v also wraps ErrTooShort", err)
			}
		})
	}
}
