package arima

import (
	"context"
	"encoding/binary"
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// FuzzFit fits small models to arbitrary short series: Fit and Forecast
// must not panic, every error must wrap one of the documented sentinels,
// and a forecast that is returned must be finite.
func FuzzFit(f *testing.F) {
	seed := func(vals ...float64) []byte {
		b := make([]byte, 8*len(vals))
		for i, v := range vals {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
		}
		return b
	}
	f.Add(uint8(1), uint8(0), uint8(1), uint8(0), seed(1, 3, 2, 5, 4, 6, 5, 8, 7, 9, 8, 10, 12, 11))
	f.Add(uint8(0), uint8(1), uint8(1), uint8(1), seed(5, 5, 5, 5, 6, 5, 5, 5, math.NaN(), 5, 5, 5, 5, 7, 5))
	f.Add(uint8(2), uint8(1), uint8(0), uint8(2), seed(1e300, -1e300, 0, 1, 2))
	sentinels := []error{almanac.ErrEmpty, almanac.ErrTooShort, almanac.ErrAllMissing, almanac.ErrMissing,
		almanac.ErrNonFinite, almanac.ErrConstant, almanac.ErrInvalid, almanac.ErrNotFitted, ErrCollinear, ErrNonStationary}
	f.Fuzz(func(t *testing.T, p, d, q, flags uint8, data []byte) {
		n := min(len(data)/8, 60)
		v := make([]float64, n)
		for i := range v {
			v[i] = math.Float64frombits(binary.LittleEndian.Uint64(data[8*i:]))
		}
		y := almanac.Series{Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v}
		s := Spec{P: int(p % 3), D: int(d % 3), Q: int(q % 3), SD: int(flags & 1), SQ: int(flags >> 1 & 1),
			Method: Method(flags >> 2 % 3), Constant: Constant(flags >> 4 % 3), Prior: Prior(flags >> 6 & 1)}
		fm, err := s.Fit(context.Background(), y)
		if err != nil {
			for _, e := range sentinels {
				if errors.Is(err, e) {
					return
				}
			}
			t.Fatalf("%v: error %v wraps no documented sentinel", s, err)
		}
		fc, err := fm.Forecast(4, 90)
		if err != nil {
			if !errors.Is(err, ErrNonStationary) {
				t.Fatalf("%v: forecast error %v", s, err)
			}
			return
		}
		// A forecast that is returned must be a number: no NaN or ±Inf
		// mean or standard error passed off as a result.
		sd := fc.Dist.(*almanac.Normal).SD
		for h := range fc.Mean {
			if math.IsNaN(fc.Mean[h]) || math.IsInf(fc.Mean[h], 0) || !(sd[h] >= 0) || math.IsInf(sd[h], 0) {
				t.Fatalf("%v on %v: forecast step %d mean %v sd %v", s, v, h, fc.Mean[h], sd[h])
			}
		}
	})
}
