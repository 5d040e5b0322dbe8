package stl

import (
	"encoding/binary"
	"errors"
	"math"
	"testing"
)

// FuzzDecompose: any data and parameters give either an error wrapping
// one of the package's sentinels or finite components of the right
// length that add back to the data; never a panic.
func FuzzDecompose(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20}, uint8(4), uint8(7), uint8(0), uint8(1), uint8(1), uint8(2), uint8(1), false, false)
	f.Add([]byte{9, 9, 9, 9, 0, 0, 0, 0, 9, 9, 9, 9, 0, 0, 0, 0, 9, 9, 9, 9, 1}, uint8(3), uint8(2), uint8(1), uint8(4), uint8(3), uint8(1), uint8(2), true, true)
	f.Fuzz(func(t *testing.T, data []byte, period, sw, sdeg, tw, jump, inner, outer uint8, periodic, robust bool) {
		y := make([]float64, len(data)/2)
		for i := range y {
			y[i] = float64(int16(binary.LittleEndian.Uint16(data[2*i:]))) / 16
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
			if !errors.Is(err, ErrPeriod) && !errors.Is(err, ErrTooShort) && !errors.Is(err, ErrParams) {
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
			if math.Abs(s[i]+tr[i]+r[i]-y[i]) > 1e-9*(1+math.Abs(y[i])+math.Abs(s[i])+math.Abs(tr[i])) {
				t.Fatalf("components do not add back at %d", i)
			}
		}
	})
}
