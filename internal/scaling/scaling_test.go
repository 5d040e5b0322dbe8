package scaling

import (
	"math"
	"testing"
)

func TestExponent(t *testing.T) {
	tests := []struct {
		name string
		x    []float64
		want int
	}{
		{"empty", nil, 0},
		{"zeros and NaN", []float64{0, math.NaN(), 0}, 0},
		{"one", []float64{1}, Target - 1},                        // 1 = 0.5·2^1
		{"largest magnitude wins", []float64{-3, 2}, Target - 2}, // 3 = 0.75·2^2
		{"Inf ignored", []float64{math.Inf(1), 1}, Target - 1},
		{"near the float64 limit", []float64{math.MaxFloat64}, Target - 1024},
		{"smallest subnormal", []float64{math.SmallestNonzeroFloat64}, Target + 1073}, // 2^−1074 = 0.5·2^−1073
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			k := Exponent(tt.x)
			if k != tt.want {
				t.Fatalf("Exponent = %d, want %d", k, tt.want)
			}
			for _, v := range tt.x {
				if a := math.Abs(math.Ldexp(v, k)); v != 0 && !math.IsNaN(v) && !math.IsInf(v, 0) && a >= math.Ldexp(1, Target) {
					t.Errorf("%v scaled to %v, not below 2^%d", v, a, Target)
				}
			}
		})
	}
}

// TestScaleExact: scaling by a power of two and back gives the same bits
// whenever the scaled value stays in the normal range (IEEE 754 scaleB).
func TestScaleExact(t *testing.T) {
	x := []float64{1.1, -3.7e200, 2.5e-100, 123456.789, 0, math.NaN()}
	k := Exponent(x)
	y := Scale(nil, x, k)
	back := Scale(nil, y, -k)
	for i := range x {
		if !(back[i] == x[i] || math.IsNaN(back[i]) && math.IsNaN(x[i])) {
			t.Errorf("x[%d] = %v came back as %v", i, x[i], back[i])
		}
	}
	if !NoInf(y) || Finite(y) {
		t.Errorf("NoInf/Finite wrong on %v", y)
	}
}

// TestScaleMatchesLdexp: Scale's multiplications give the bits of
// math.Ldexp for every exponent, subnormal results included.
func TestScaleMatchesLdexp(t *testing.T) {
	x := []float64{1, -1.5, math.MaxFloat64, math.SmallestNonzeroFloat64, 0x1.fffffffffffffp-1022, 3e-310, 7e300, math.NaN(), math.Inf(-1), 0}
	for _, k := range []int{-2200, -1500, -1100, -1075, -1023, -1022, -600, -1, 1, 600, 1023, 1024, 1100, 1500, 2200} {
		got := Scale(nil, x, k)
		for i, v := range x {
			want := math.Ldexp(v, k)
			if !(got[i] == want || math.IsNaN(got[i]) && math.IsNaN(want)) {
				t.Errorf("Scale(%v, %d) = %v, Ldexp gives %v", v, k, got[i], want)
			}
		}
	}
}
