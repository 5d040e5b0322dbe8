package accuracy_test

import (
	"bytes"
	"encoding/binary"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
)

// floatsOf reads little-endian float64 values from data.
func floatsOf(data []byte) []float64 {
	out := make([]float64, len(data)/8)
	for i := range out {
		out[i] = math.Float64frombits(binary.LittleEndian.Uint64(data[8*i:]))
	}
	return out
}

// FuzzWriteReview writes pages from arbitrary values — history, fitted
// values, forecast, band, a filled value, the frequency, where the
// forecast starts, the levels drawn — and checks that WriteReview either
// returns an error or a well-formed page with one row and one chart, and
// no NaN or Inf in its markup; it never panics.
func FuzzWriteReview(f *testing.F) {
	enc := func(xs ...float64) []byte {
		b := make([]byte, 8*len(xs))
		for i, x := range xs {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(x))
		}
		return b
	}
	f.Add(enc(10, 12, math.NaN(), 13, 15, 14), enc(math.NaN(), 10, 12, 12, 13, 15), enc(15, 15, 15), enc(2, 3, 4), uint8(5), int8(0), 80.0, false)
	f.Add(enc(math.MaxFloat64, -math.MaxFloat64), enc(0, 1), enc(1e308), enc(1e308), uint8(7), int8(0), 99.9, true)
	f.Add(enc(5), []byte{}, enc(5, 5), enc(1, 1), uint8(1), int8(-1), 50.0, false)
	f.Add(enc(1, 2, 3), enc(1, 2), enc(math.Inf(1)), enc(0), uint8(3), int8(2), 120.0, true)
	f.Fuzz(func(t *testing.T, hist, fitted, mean, spread []byte, unit uint8, shift int8, level float64, failed bool) {
		y := almanac.Series{Key: "fuzz <&>", Start: time.Date(2021, 1, 31, 0, 0, 0, 0, time.UTC),
			Freq: calendar.Frequency{Unit: calendar.Unit(unit % 9), N: 1}, Values: floatsOf(hist)}
		if len(y.Values) > 2000 {
			y.Values = y.Values[:2000]
		}
		fc := almanac.Forecast{Start: y.Time(len(y.Values) + int(shift)), Freq: y.Freq, Mean: floatsOf(mean)}
		if len(fc.Mean) > 500 {
			fc.Mean = fc.Mean[:500]
		}
		s := floatsOf(spread)
		lo, hi := make([]float64, len(fc.Mean)), make([]float64, len(fc.Mean))
		for h, m := range fc.Mean {
			d := 0.0
			if h < len(s) {
				d = s[h]
			}
			lo[h], hi[h] = m-math.Abs(d), m+math.Abs(d)
		}
		fc.Intervals = []almanac.Interval{{Level: level, Lower: lo, Upper: hi}}
		rs := accuracy.ReviewSeries{History: y, Fitted: floatsOf(fitted), Forecast: fc, Model: "m"}
		if len(rs.Fitted) == 0 {
			rs.Fitted = nil
		}
		if len(y.Values) > 0 && !math.IsNaN(y.Values[0]) {
			rs.Repairs = []decompose.Change{{Time: y.Start, Old: math.NaN(), New: y.Values[0]}}
		}
		if failed {
			rs.Err = almanac.ErrNotFitted
		}
		r := accuracy.Review{Series: []accuracy.ReviewSeries{rs}}
		if unit%2 == 0 {
			r.Levels = []float64{level, 95}
		}
		var buf bytes.Buffer
		if err := accuracy.WriteReview(&buf, r); err != nil {
			if buf.Len() != 0 {
				t.Fatalf("%d bytes written beside %v", buf.Len(), err)
			}
			return
		}
		page := parsePage(t, buf.Bytes())
		if page.rows != 1 || page.charts != 1 {
			t.Fatalf("%d rows, %d charts", page.rows, page.charts)
		}
		for _, bad := range []string{"NaN", "Inf"} {
			if bytes.Contains(buf.Bytes(), []byte(bad)) {
				t.Fatalf("page holds %q", bad)
			}
		}
	})
}
