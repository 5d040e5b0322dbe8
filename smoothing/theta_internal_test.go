package smoothing

import (
	"math"
	"testing"

	"github.com/almanac-go/almanac/internal/brent"
	"github.com/almanac-go/almanac/internal/numtest"
)

// sesSSE returns the sum of squared one-step errors of SES on y started
// from level l0 (the plain recursion, for the checks below).
func sesSSE(y []float64, alpha, l0 float64) float64 {
	level, sse := l0, 0.0
	for _, v := range y {
		e := v - level
		sse += e * e
		level += alpha * e
	}
	return sse
}

// nistSingle is the single-exponential-smoothing data of the NIST/SEMATECH
// e-Handbook of Statistical Methods, section 6.4.3.1–2 (printed; as
// transcribed in /work/shared/reference/published.md).
var nistSingle = []float64{71, 70, 69, 68, 64, 65, 72, 78, 75, 75, 75, 70}

// nistDouble is the data of the handbook's section 6.4.3.3–4 (printed).
var nistDouble = []float64{6.4, 5.6, 7.8, 8.8, 11, 11.6, 16.7, 15.3, 21.6, 22.4}

// TestSESKernelNIST reproduces the NIST e-Handbook single-smoothing worked
// example (section 6.4.3.1–2, values from published.md). The handbook's
// convention S2 = y1, S_t = α·y_{t−1} + (1−α)·S_{t−1} is our SES
// recursion started from ℓ_0 = y1: then ℓ_{t−1} (the one-step forecast of
// y_t) equals the handbook's S_t for t ≥ 2, and the error of the first
// observation is zero, so our sum of squares equals the handbook's SSE
// over t = 2..12.
func TestSESKernelNIST(t *testing.T) {
	cases := []struct {
		name  string
		alpha float64
		s     []float64 // S2..S12, "computed" column of published.md (4 decimals)
		sse   float64   // SSE, published.md (computed, 4 decimals)
	}{
		{"alpha0.1", 0.1, []float64{71, 70.9, 70.71, 70.439, 69.7951, 69.3156, 69.5840, 70.4256, 70.8831, 71.2948, 71.6653}, 208.8184},
		{"alpha0.5", 0.5, []float64{71, 70.5, 69.75, 68.875, 66.4375, 65.7188, 68.8594, 73.4297, 74.2148, 74.6074, 74.8037}, 181.4618},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			lev := make([]float64, len(nistSingle))
			last := sesFilterTo(lev, nistSingle, c.alpha, nistSingle[0])
			// Tolerance: the published values are rounded to 4 decimals,
			// so half a unit of the last digit, inclusive (65.71875 is
			// printed 65.7188); 1e-12 absorbs the binary representation
			// of the decimal value at that boundary.
			numtest.Slice(t, "S2..S12", lev[1:], c.s, 5e-5+1e-12, 0)
			numtest.Scalar(t, "SSE", sesSSE(nistSingle, c.alpha, nistSingle[0]), c.sse, 5e-5, 0)
			if c.alpha == 0.1 {
				// First bootstrapped forecast from origin 12 with α = 0.1:
				// 71.50 printed (2 decimals) in the handbook.
				numtest.Scalar(t, "S13", last, 71.50, 0.005, 0)
			}
		})
	}
}

// TestMinimize1DNIST checks the bounded minimiser on the handbook's
// statement (section 6.4.3.3–4, published.md) that single smoothing of the
// double-smoothing data with S1 = y1 is MSE-optimal at α = 0.977 (printed
// to 3 decimals), with next forecast 22.4 (printed; 22.3783 computed at
// α = 0.977).
func TestMinimize1DNIST(t *testing.T) {
	obj := func(a float64) float64 { return sesSSE(nistDouble, a, nistDouble[0]) }
	alpha, _ := minimize1D(obj, sesAlphaLower, 1, thetaGridN)
	numtest.Scalar(t, "alpha", alpha, 0.977, 0.0005, 0)
	lev := make([]float64, len(nistDouble))
	next := sesFilterTo(lev, nistDouble, alpha, nistDouble[0])
	numtest.Scalar(t, "next forecast", next, 22.4, 0.05, 0)
	// At the printed α the computed S2..S10 of published.md (3 decimals).
	sesFilterTo(lev, nistDouble, 0.977, nistDouble[0])
	want := []float64{6.4, 5.618, 7.750, 8.776, 10.949, 11.585, 16.582, 15.329, 21.456}
	numtest.Slice(t, "S2..S10", lev[1:], want, 5e-4, 0)
}

// TestSESProfileIsMinimum checks the closed-form initial level against a
// direct one-dimensional minimisation of the sum of squares over ℓ_0
// (property: the profile must be the minimum over ℓ_0 for each α).
func TestSESProfileIsMinimum(t *testing.T) {
	for _, alpha := range []float64{1e-4, 0.05, 0.3, 0.7, 0.9999} {
		l0, sse := sesProfile(nistDouble, alpha)
		numtest.Scalar(t, "sse at l0", sesSSE(nistDouble, alpha, l0), sse, 1e-9, 1e-12)
		direct, dsse := brent.Minimize(func(l float64) float64 { return sesSSE(nistDouble, alpha, l) }, -100, 100, 1e-12, 200)
		if dsse < sse*(1-1e-10)-1e-12 {
			t.Errorf("alpha %v: direct minimum %v at l0 = %v below the profile %v at %v", alpha, dsse, direct, sse, l0)
		}
		numtest.Scalar(t, "l0", l0, direct, 1e-5, 1e-6)
	}
}

// TestKernelsDoNotAllocate proves that an objective evaluation of every
// estimator in theta.go and intermittent.go allocates nothing.
func TestKernelsDoNotAllocate(t *testing.T) {
	y := make([]float64, 144)
	for i := range y {
		y[i] = 100 + float64(i) + 10*math.Sin(float64(i))
		if i%3 != 0 {
			y[i+0] *= float64(i % 2)
		}
	}
	sink := 0.0
	objs := map[string]func(){
		"sesProfile": func() { _, s := sesProfile(y, 0.3); sink += s },
		"crostonRun": func() { _, _, s := crostonRun(nil, y, 0, 0.2, 0.9); sink += s },
		"tsbRun":     func() { _, _, s := tsbRun(nil, y, 0, 0.2, 0.1); sink += s },
	}
	for name, f := range objs {
		if a := testing.AllocsPerRun(100, f); a != 0 {
			t.Errorf("%s: %v allocations per evaluation, want 0", name, a)
		}
	}
	if a := testing.AllocsPerRun(20, func() {
		x, _ := minimize1D(func(a float64) float64 { _, s := sesProfile(y, a); return s }, sesAlphaLower, sesAlphaUpper, thetaGridN)
		sink += x
	}); a != 0 {
		t.Errorf("minimize1D over sesProfile: %v allocations per search, want 0", a)
	}
	_ = sink
}
