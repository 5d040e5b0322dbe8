package stl

import (
	"encoding/binary"
	"errors"
	"math"
	"slices"
	"testing"
)

// FuzzDecompose: any data and parameters give either an error wrapping
// one of the package's sentinels or finite components of the right
// length that add back to the data; never a panic. The data are scaled
// by 2^exp, exp in [−1100, 1100], so values from subnormal to near the
// float64 limit are tried (issue 11: 1e308 used to panic robust STL).
func FuzzDecompose(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20}, uint8(4), uint8(7), uint8(0), uint8(1), uint8(1), uint8(2), uint8(1), false, false, int16(0))
	f.Add([]byte{9, 9, 9, 9, 0, 0, 0, 0, 9, 9, 9, 9, 0, 0, 0, 0, 9, 9, 9, 9, 1}, uint8(3), uint8(2), uint8(1), uint8(4), uint8(3), uint8(1), uint8(2), true, true, int16(0))
	f.Add([]byte{0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1}, uint8(4), uint8(7), uint8(0), uint8(0), uint8(0), uint8(1), uint8(16), false, true, int16(1012))
	f.Add([]byte{0, 128, 255, 127, 0, 1, 0, 1, 0, 128, 255, 127, 0, 1, 0, 1, 0, 128, 255, 127, 0, 1, 0, 1}, uint8(4), uint8(7), uint8(0), uint8(0), uint8(0), uint8(1), uint8(16), false, true, int16(1001))
	f.Fuzz(func(t *testing.T, data []byte, period, sw, sdeg, tw, jump, inner, outer uint8, periodic, robust bool, exp int16) {
		y := make([]float64, len(data)/2)
		for i := range y {
			y[i] = math.Ldexp(float64(int16(binary.LittleEndian.Uint16(data[2*i:])))/16, int(exp%1101))
		}
		p := Defaults(len(y), int(period%20), int(sw%30), periodic, robust)
		p.SDegree = int(sdeg % 3)
		if tw > 0 {
			p.TWindow = int(tw % 50)
		}
		if jump > 0 {
			p.SJump, p.TJump, p.LJump = int(jump%12), int(jump%7), int(jump%5)
		}
		p.Inner = int(inner % 4)
		p.Outer = int(outer%5) - 1
		s, tr, r, w, err := Decompose(y, p)
		if err != nil {
			if errors.Is(err, ErrNonFinite) && slices.ContainsFunc(y, func(v float64) bool { return math.IsInf(v, 0) }) {
				return // the scaled data overflowed: refused, as it must be
			}
			if !errors.Is(err, ErrPeriod) && !errors.Is(err, ErrTooShort) && !errors.Is(err, ErrParams) && !errors.Is(err, ErrOverflow) {
				t.Fatalf("unexpected error %v", err)
			}
			return
		}
		for i := range y {
			for _, v := range []float64{s[i], tr[i], r[i], w[i]} {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite component at %d", i)
				}
			}
			// Compared at a scale where the sum cannot overflow.
			const h = 0x1p-4
			if math.Abs(s[i]*h+tr[i]*h+r[i]*h-y[i]*h) > 1e-9*(math.Ldexp(1, int(exp%1101))*h+math.Abs(y[i]*h)+math.Abs(s[i]*h)+math.Abs(tr[i]*h)) {
				t.Fatalf("components do not add back at %d", i)
			}
		}
	})
}
