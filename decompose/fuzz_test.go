package decompose_test

import (
	"encoding/binary"
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/decompose"
)

// FuzzRepairScreen: arbitrary data with gaps, periods and disrupted
// indices never panic; errors wrap a sentinel; Fill keeps every observed,
// undisrupted value bit for bit and leaves no NaN.
func FuzzRepairScreen(f *testing.F) {
	f.Add([]byte{1, 0, 2, 0, 3, 0, 255, 255, 5, 0, 6, 0, 7, 0, 8, 0, 9, 0, 10, 0, 11, 0, 12, 0, 13, 0}, uint8(3), uint8(2), uint8(1))
	f.Fuzz(func(t *testing.T, data []byte, period, disrupt, k uint8) {
		v := make([]float64, len(data)/2)
		for i := range v {
			u := binary.LittleEndian.Uint16(data[2*i:])
			if u == 0xffff {
				v[i] = math.NaN()
			} else {
				v[i] = float64(int16(u)) / 8
			}
		}
		y := monthly(v)
		var dis []int
		if len(v) > 0 && disrupt > 0 {
			dis = []int{int(disrupt) % len(v)}
		}
		out, changes, err := decompose.Repair{Period: int(period % 8), Disrupted: dis}.Fill(y)
		if err != nil {
			if !errors.Is(err, almanac.ErrInvalid) && !errors.Is(err, almanac.ErrTooShort) && !errors.Is(err, almanac.ErrAllMissing) && !errors.Is(err, almanac.ErrEmpty) {
				t.Fatalf("unexpected error %v", err)
			}
		} else {
			changed := map[int]bool{}
			for _, c := range changes {
				changed[c.Index] = true
			}
			for i := range v {
				if math.IsNaN(out.Values[i]) || math.IsInf(out.Values[i], 0) {
					t.Fatalf("value %d not finite after fill", i)
				}
				if !changed[i] && math.Float64bits(out.Values[i]) != math.Float64bits(v[i]) {
					t.Fatalf("observed value %d altered", i)
				}
			}
		}
		_, _, err = decompose.Screen{Period: int(period % 8), K: float64(k % 6)}.Apply(y)
		if err != nil && !errors.Is(err, almanac.ErrInvalid) && !errors.Is(err, almanac.ErrTooShort) && !errors.Is(err, almanac.ErrAllMissing) && !errors.Is(err, almanac.ErrEmpty) {
			t.Fatalf("unexpected screen error %v", err)
		}
	})
}
