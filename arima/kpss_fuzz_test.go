package arima_test

import (
	"encoding/binary"
	"math"
	"testing"

	"github.com/almanac-go/almanac/arima"
)

// floatsFrom decodes fuzz bytes into float64 values (NaN and ±Inf
// included, as bad input must be rejected cleanly).
func floatsFrom(b []byte) []float64 {
	out := make([]float64, 0, len(b)/8)
	for len(b) >= 8 {
		out = append(out, math.Float64frombits(binary.LittleEndian.Uint64(b)))
		b = b[8:]
	}
	return out
}

func bytesOf(v ...float64) []byte {
	b := make([]byte, 8*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(x))
	}
	return b
}

// FuzzOrderSelectionTools: KPSS, Differences and the seasonal
// strength never panic, and either fail with an error or return values in
// their documented ranges.
func FuzzOrderSelectionTools(f *testing.F) {
	f.Add(bytesOf(selLH[:20]...), uint8(3), uint8(0))
	f.Add(bytesOf(1, 2, 3, 4, 5, 6, 7, 8, 9), uint8(2), uint8(1))
	f.Add(bytesOf(1, math.NaN(), 3, 1, 2, 3, 1, 2, 3), uint8(3), uint8(2))
	f.Add(bytesOf(1e300, -1e300, 1e300, -1e300, 5, 6), uint8(2), uint8(3))
	f.Fuzz(func(t *testing.T, b []byte, period, rule uint8) {
		y := floatsFrom(b)
		spec := arima.KPSSSpec{Null: arima.KPSSNull(rule % 2), LagRule: arima.LagRule(rule % 5), Lags: int(period)}
		if r, err := arima.KPSS(y, spec); err == nil {
			if math.IsNaN(r.Statistic) || r.Statistic < 0 || r.PValue < 0.01 || r.PValue > 0.10 || r.Lags < 0 || r.Lags >= len(y) {
				t.Errorf("KPSS(%v) = %+v", y, r)
			}
		}
		if d, err := arima.Differences(y, arima.DifferencesSpec{}); err == nil && (d < 0 || d > 2) {
			t.Errorf("Differences = %d", d)
		}
		if fs, err := arima.SeasonalStrength(y, int(period), 0); err == nil && !(fs >= 0 && fs <= 1) {
			t.Errorf("SeasonalStrength = %v", fs)
		}
		if d, err := arima.SeasonalDifferences(y, int(period), arima.SeasonalDifferencesSpec{}); err == nil && (d < 0 || d > 1) {
			t.Errorf("SeasonalDifferences = %d", d)
		}
	})
}
