package accuracy_test

import (
	"encoding/binary"
	"math"
	"testing"

	"github.com/almanac-go/almanac/accuracy"
)

// floats decodes b into up to n float64 values, 8 bytes each.
func floats(b []byte, n int) []float64 {
	out := make([]float64, 0, n)
	for len(b) >= 8 && len(out) < n {
		out = append(out, math.Float64frombits(binary.LittleEndian.Uint64(b)))
		b = b[8:]
	}
	return out
}

// FuzzMeasures: no input makes a measure panic, an error always comes
// with NaN, never with a number, and neither NaN nor ±Inf ever comes
// without an error.
func FuzzMeasures(f *testing.F) {
	f.Add([]byte{}, uint8(1), 0.5)
	f.Add(make([]byte, 64), uint8(2), 0.9)
	f.Add([]byte("0123456789abcdef0123456789abcdef0123456789abcdef"), uint8(12), 0.1)
	// Values near the float64 limit, whose errors overflow.
	var big []byte
	for _, v := range []float64{1e308, -1e308, -1e308, 1e308, 1e308, -1e308} {
		big = binary.LittleEndian.AppendUint64(big, math.Float64bits(v))
	}
	f.Add(big, uint8(1), 0.5)
	f.Fuzz(func(t *testing.T, data []byte, m uint8, tau float64) {
		x := floats(data, 64)
		k := len(x) / 3
		a, fc, w := x[:k], x[k:2*k], x[2*k:]
		lo := make([]float64, len(a))
		hi := make([]float64, len(a))
		for i := range a {
			lo[i], hi[i] = math.Min(fc[i], w[min(i, len(w)-1)]), math.Max(fc[i], w[min(i, len(w)-1)])
		}
		check := func(name string, v float64, err error) {
			if err != nil && !math.IsNaN(v) {
				t.Errorf("%s: %v alongside error %v", name, v, err)
			}
			if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
				t.Errorf("%s: silent %v without an error", name, v)
			}
		}
		for name, fn := range map[string]accuracy.PointMeasure{
			"ME": accuracy.ME, "MAE": accuracy.MAE, "MSE": accuracy.MSE, "RMSE": accuracy.RMSE,
			"MAPE": accuracy.MAPE, "sMAPE": accuracy.SMAPE, "MdAE": accuracy.MdAE, "TS": accuracy.TrackingSignal,
		} {
			v, err := fn(a, fc)
			check(name, v, err)
			v, err = accuracy.Relative(fn, a, fc, w[:len(a)])
			check("relative "+name, v, err)
		}
		v, err := accuracy.MASE(a, fc, w, int(m))
		check("MASE", v, err)
		v, err = accuracy.RMSSE(a, fc, w, int(m))
		check("RMSSE", v, err)
		v, err = accuracy.Coverage(a, lo, hi)
		check("coverage", v, err)
		v, err = accuracy.IntervalScore(a, lo, hi, tau*100)
		check("interval score", v, err)
		v, err = accuracy.MSIS(a, lo, hi, tau*100, w, int(m))
		check("MSIS", v, err)
		v, err = accuracy.Pinball(a, fc, tau)
		check("pinball", v, err)
		v, err = accuracy.CRPSNormal(a, fc, w[:len(a)])
		check("CRPS normal", v, err)
		v, err = accuracy.CRPSSample(a, [][]float64{fc, w[:len(a)]})
		check("CRPS sample", v, err)
		if _, err := accuracy.LjungBox(x, int(m), 0); err == nil {
			_, _ = accuracy.PACF(x, int(m))
		}
		_, _ = accuracy.Residuals{Period: int(m)}.DiagnoseValues(x)
	})
}
