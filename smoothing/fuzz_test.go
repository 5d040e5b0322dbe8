package smoothing

import (
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// FuzzFit: any input gives either a usable fit or an error wrapping one of
// the documented sentinels; never a panic.
func FuzzFit(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18}, uint8(0))
	f.Add([]byte{5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5}, uint8(37))
	f.Add([]byte{0, 255, 0, 255, 0, 255, 0, 255, 0, 255, 0, 255}, uint8(200))
	sentinels := []error{almanac.ErrEmpty, almanac.ErrAllMissing, almanac.ErrTooShort, almanac.ErrNonPositive, almanac.ErrMissing, almanac.ErrNonFinite, almanac.ErrNotFitted, almanac.ErrInvalid, ErrNoCandidate, ErrPeriodTooLong}
	f.Fuzz(func(t *testing.T, data []byte, kind uint8) {
		v := make([]float64, len(data))
		for i, b := range data {
			v[i] = float64(int(b)-64) * math.Pow(10, float64(kind%5)-2)
			if b == 255 && kind%7 == 3 {
				v[i] = math.NaN()
			}
		}
		y := almanac.Series{Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v}
		var m almanac.Model
		if kind%4 == 0 {
			m = Select{Workers: 1, MultiplicativeTrends: kind%8 == 0}
		} else {
			m = Spec{Error: ErrorType(kind % 2), Trend: TrendType(kind / 2 % 5), Season: SeasonType(kind / 10 % 3), Paths: 50}
		}
		fit, err := m.Fit(ctx, y)
		if err != nil {
			for _, s := range sentinels {
				if errors.Is(err, s) {
					return
				}
			}
			t.Fatalf("%v: error %v wraps no documented sentinel", m, err)
		}
		if _, err := fit.Forecast(5, 80); err != nil {
			t.Fatalf("%v: forecast: %v", fit, err)
		}
	})
}
