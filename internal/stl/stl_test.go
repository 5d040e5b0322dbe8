package stl

import (
	"errors"
	"math"
	"slices"
	"testing"

	"github.com/almanac-go/almanac/internal/reftest"
)

func loadInput(t testing.TB, name string) []float64 {
	t.Helper()
	f, err := reftest.Load("testdata/reference/" + name + ".json")
	if err != nil {
		t.Fatal(err)
	}
	return f.Floats(t, "input")
}

func TestBadInput(t *testing.T) {
	y := make([]float64, 30)
	for i := range y {
		y[i] = float64(i%4) + 0.1*float64(i)
	}
	ok := Defaults(len(y), 4, 7, false, false)
	nan := append([]float64(nil), y...)
	nan[5] = math.NaN()
	inf := append([]float64(nil), y...)
	inf[7] = math.Inf(1)
	for _, c := range []struct {
		name string
		y    []float64
		p    func() Params
		want error
	}{
		{"period 1", y, func() Params { p := ok; p.Period = 1; return p }, ErrPeriod},
		{"exactly two periods", y[:8], func() Params { return ok }, ErrTooShort},
		{"zero window", y, func() Params { p := ok; p.SWindow = 0; return p }, ErrParams},
		{"degree 2", y, func() Params { p := ok; p.TDegree = 2; return p }, ErrParams},
		{"zero jump", y, func() Params { p := ok; p.LJump = 0; return p }, ErrParams},
		{"zero inner", y, func() Params { p := ok; p.Inner = 0; return p }, ErrParams},
		{"negative outer", y, func() Params { p := ok; p.Outer = -1; return p }, ErrParams},
		{"NaN", nan, func() Params { return ok }, ErrNonFinite},
		{"Inf", inf, func() Params { return ok }, ErrNonFinite},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, _, _, _, err := Decompose(c.y, c.p())
			if !errors.Is(err, c.want) {
				t.Fatalf("err = %v, want %v", err, c.want)
			}
		})
	}
	var w Workspace
	if err := w.DecomposeTo(make([]float64, 3), y, y, y, y, ok); !errors.Is(err, ErrLength) {
		t.Fatalf("short buffer: err = %v", err)
	}
}

// TestEvenWindowsRoundedUp: the Fortran raises spans to ≥ 3 and odd, so
// an even span gives the same result as the next odd one.
func TestEvenWindowsRoundedUp(t *testing.T) {
	y := loadInput(t, "stl_co2_swin7")
	p := Defaults(len(y), 12, 7, false, false)
	q := p
	q.SWindow, q.TWindow, q.LWindow = 6, 22, 12
	s1, t1, _, _, err := Decompose(y, p)
	if err != nil {
		t.Fatal(err)
	}
	s2, t2, _, _, err := Decompose(y, q)
	if err != nil {
		t.Fatal(err)
	}
	for i := range s1 {
		if s1[i] != s2[i] || t1[i] != t2[i] {
			t.Fatalf("index %d differs", i)
		}
	}
	if e := q.Effective(); e.SWindow != 7 || e.TWindow != 23 || e.LWindow != 13 {
		t.Fatalf("Effective = %+v", e)
	}
	if e := (Params{SWindow: 1, TWindow: 2, LWindow: -5}).Effective(); e.SWindow != 3 || e.TWindow != 3 || e.LWindow != 3 {
		t.Fatalf("Effective small = %+v", e)
	}
}

func TestPropertiesAddBackAndPeriodic(t *testing.T) {
	y := loadInput(t, "stl_nottem_periodic")
	for _, robust := range []bool{false, true} {
		p := Defaults(len(y), 12, 0, true, robust)
		s, tr, r, w, err := Decompose(y, p)
		if err != nil {
			t.Fatal(err)
		}
		for i := range y {
			if s[i]+tr[i]+r[i] != y[i] && math.Abs(s[i]+tr[i]+r[i]-y[i]) > 1e-12*math.Abs(y[i]) {
				t.Fatalf("robust=%v: components do not add back at %d", robust, i)
			}
			if i >= 12 && s[i] != s[i-12] {
				t.Fatalf("robust=%v: seasonal not periodic at %d", robust, i)
			}
			if w[i] < 0 || w[i] > 1 {
				t.Fatalf("weight %v outside [0,1]", w[i])
			}
		}
	}
}

// TestPsortOddAndIncreasing: with increasing positions (and for odd n,
// where both positions coincide) psort places the exact order statistic.
func TestPsortOddAndIncreasing(t *testing.T) {
	y := loadInput(t, "stl_co2_swin7")
	for _, n := range []int{1, 2, 3, 11, 12, 101, 468} {
		a := append([]float64(nil), y[:n]...)
		sorted := append([]float64(nil), a...)
		insertionSort(sorted)
		lo, hi := (n+1)/2, n/2+1
		psort(a, []int{lo, hi})
		if n >= 2 && (a[lo-1] != sorted[lo-1] || a[hi-1] != sorted[hi-1]) {
			t.Fatalf("n %d: got %v %v want %v %v", n, a[lo-1], a[hi-1], sorted[lo-1], sorted[hi-1])
		}
	}
}

func insertionSort(a []float64) {
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && a[j] < a[j-1]; j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}

func TestWorkspaceNoAllocs(t *testing.T) {
	y := loadInput(t, "stl_airpassengers_log_swin13_robust")
	n := len(y)
	p := Defaults(n, 12, 13, false, true)
	s, tr, r, w := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	var ws Workspace
	// Reuse across sizes n-1, n, n+1 (grown once to the largest).
	for _, m := range []int{n, n - 1, n} {
		if err := ws.DecomposeTo(s[:m], tr[:m], r[:m], w[:m], y[:m], p); err != nil {
			t.Fatal(err)
		}
	}
	allocs := testing.AllocsPerRun(20, func() {
		if err := ws.DecomposeTo(s, tr, r, w, y, p); err != nil {
			t.Fatal(err)
		}
	})
	if allocs != 0 {
		t.Fatalf("DecomposeTo allocates %v times per run", allocs)
	}
}

// TestPsortLong: beyond the Fortran's 2^16 limit psort must neither
// panic nor misplace the median of an odd-length sample.
func TestPsortLong(t *testing.T) {
	const n = 200001
	a := make([]float64, n)
	x := uint64(88172645463325252)
	for i := range a {
		x ^= x << 13
		x ^= x >> 7
		x ^= x << 17
		a[i] = float64(x>>11) / (1 << 53)
	}
	sorted := append([]float64(nil), a...)
	slices.Sort(sorted)
	m := n/2 + 1
	psort(a, []int{m, m})
	if a[m-1] != sorted[m-1] {
		t.Fatalf("median %v, want %v", a[m-1], sorted[m-1])
	}
}

// TestWorkspaceReuse: a Workspace reused across lengths n−1, n+1 and n
// gives bit-identical results to a fresh one.
func TestWorkspaceReuse(t *testing.T) {
	y := loadInput(t, "stl_co2_swin7")
	var ws Workspace
	for _, n := range []int{144, 143, 145, 144, 468, 144} {
		p := Defaults(n, 12, 7, false, true)
		s, tr, r, w := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
		if err := ws.DecomposeTo(s, tr, r, w, y[:n], p); err != nil {
			t.Fatal(err)
		}
		s2, tr2, r2, w2, err := Decompose(y[:n], p)
		if err != nil {
			t.Fatal(err)
		}
		for i := range s {
			if s[i] != s2[i] || tr[i] != tr2[i] || r[i] != r2[i] || w[i] != w2[i] {
				t.Fatalf("n %d: reused workspace differs at %d", n, i)
			}
		}
	}
}

// TestScaleByTwo: loess and the bisquare weights are equivariant under
// scaling, and multiplying by 2 is exact in floating point, so the
// components of 2y are exactly twice those of y and the weights equal.
func TestScaleByTwo(t *testing.T) {
	y := loadInput(t, "stl_airpassengers_log_swin13_robust")
	y2 := make([]float64, len(y))
	for i := range y {
		y2[i] = 2 * y[i]
	}
	p := Defaults(len(y), 12, 13, false, true)
	s, tr, r, w, err := Decompose(y, p)
	if err != nil {
		t.Fatal(err)
	}
	s2, tr2, r2, w2, err := Decompose(y2, p)
	if err != nil {
		t.Fatal(err)
	}
	for i := range y {
		if s2[i] != 2*s[i] || tr2[i] != 2*tr[i] || r2[i] != 2*r[i] || w2[i] != w[i] {
			t.Fatalf("index %d: scaling by 2 is not exact", i)
		}
	}
}

// TestExactMedian: with ExactMedian the weights of a run with one
// robustness pass are the bisquare weights of the residuals of the run
// without it, scaled by six times the median (Cleveland et al. 1990,
// section 2, robustness weights); for odd n R's partial sort is exact,
// so both options agree.
func TestExactMedian(t *testing.T) {
	y := loadInput(t, "stl_airpassengers_log_swin13_robust") // n = 144, even
	p := Defaults(len(y), 12, 13, false, true)
	p.Outer, p.ExactMedian = 0, true
	s0, t0, _, _, err := Decompose(y, p)
	if err != nil {
		t.Fatal(err)
	}
	p.Outer = 1
	_, _, _, w1, err := Decompose(y, p)
	if err != nil {
		t.Fatal(err)
	}
	r := make([]float64, len(y))
	for i := range y {
		r[i] = math.Abs(y[i] - s0[i] - t0[i])
	}
	sorted := slices.Clone(r)
	slices.Sort(sorted)
	h := 6 * (sorted[len(y)/2-1] + sorted[len(y)/2]) / 2
	for i, ri := range r {
		want := 0.0
		switch u := ri / h; {
		case ri <= 0.001*h:
			want = 1
		case ri <= 0.999*h:
			want = (1 - u*u) * (1 - u*u)
		}
		if math.Abs(w1[i]-want) > 1e-15 {
			t.Fatalf("weight %d = %v, want %v", i, w1[i], want)
		}
	}
	// Odd length: both options give identical results.
	odd := loadInput(t, "stl_co2_swin7")[:467]
	q := Defaults(len(odd), 12, 7, false, true)
	a, _, _, wa, _ := Decompose(odd, q)
	q.ExactMedian = true
	b, _, _, wb, _ := Decompose(odd, q)
	for i := range a {
		if a[i] != b[i] || wa[i] != wb[i] {
			t.Fatalf("odd n: options differ at %d", i)
		}
	}
}

// TestExtremeValues (issue 11, item 1): data near the float64 limit used
// to overflow inside the smoothers, giving NaN components, and with
// robustness passes NaN residuals reached the partial sort, which ran off
// its array (index out of range [-1]). Now every case gives finite
// components that add back to the data, or ErrOverflow when a component
// itself is beyond the float64 range.
func TestExtremeValues(t *testing.T) {
	rep := func(n int, f func(i int) float64) []float64 {
		y := make([]float64, n)
		for i := range y {
			y[i] = f(i)
		}
		return y
	}
	const big = 1e308
	tests := []struct {
		name     string
		y        []float64
		overflow bool
	}{
		{"twelve values of 1e308", rep(12, func(int) float64 { return big }), false},
		{"alternating ±1e308", rep(12, func(i int) float64 { return big * float64(1-2*(i%2)) }), false},
		{"one 1e308 spike", rep(24, func(i int) float64 {
			if i == 9 {
				return big
			}
			return 10 + float64(i%4)
		}), false},
		{"tiny values", rep(16, func(i int) float64 { return 1e-300 * float64(1+i%4) }), false},
		{"mixed tiny and huge", rep(16, func(i int) float64 { return []float64{1e-300, 1e300, 3, -1e300}[i%4] }), false},
		// A +1.7e308 spike in a series at −1.7e308: the remainder there is
		// about 3.4e308, which no float64 holds.
		{"remainder beyond the range", rep(20, func(i int) float64 {
			if i == 10 {
				return math.MaxFloat64
			}
			return -math.MaxFloat64
		}), true},
	}
	for _, tt := range tests {
		for _, v := range []struct {
			name string
			p    func(n int) Params
		}{
			{"plain", func(n int) Params { return Defaults(n, 4, 7, false, false) }},
			{"periodic", func(n int) Params { return Defaults(n, 4, 0, true, false) }},
			{"robust", func(n int) Params { return Defaults(n, 4, 7, false, true) }},
			{"robust exact median", func(n int) Params { p := Defaults(n, 4, 7, false, true); p.ExactMedian = true; return p }},
		} {
			t.Run(tt.name+"/"+v.name, func(t *testing.T) {
				s, tr, r, w, err := Decompose(tt.y, v.p(len(tt.y)))
				if tt.overflow {
					if !errors.Is(err, ErrOverflow) {
						t.Fatalf("err = %v, want ErrOverflow", err)
					}
					return
				}
				if err != nil {
					t.Fatal(err)
				}
				for i := range tt.y {
					for _, c := range []float64{s[i], tr[i], r[i], w[i]} {
						if math.IsNaN(c) || math.IsInf(c, 0) {
							t.Fatalf("index %d: components %v %v %v %v", i, s[i], tr[i], r[i], w[i])
						}
					}
					// y = s + t + r, compared at half scale so the sum
					// itself cannot overflow.
					sum := s[i]/2 + tr[i]/2 + r[i]/2
					if math.Abs(sum-tt.y[i]/2) > 1e-12*math.Max(math.Abs(tt.y[i]/2), 1e-300)+math.Abs(s[i])*1e-12 {
						t.Errorf("index %d: %v + %v + %v does not add back to %v", i, s[i], tr[i], r[i], tt.y[i])
					}
				}
			})
		}
	}
}

// TestPowerOfTwoScaling: the components of y·2^j are exactly 2^j times
// those of y (the rescaling and STL's equivariance), so scale invariance
// is exact for powers of two.
func TestPowerOfTwoScaling(t *testing.T) {
	y := loadInput(t, "stl_airpassengers_log_swin13_robust")
	p := Defaults(len(y), 12, 13, false, true)
	s0, t0, r0, w0, err := Decompose(y, p)
	if err != nil {
		t.Fatal(err)
	}
	for _, j := range []int{-900, -20, 7, 900} {
		yj := make([]float64, len(y))
		for i, v := range y {
			yj[i] = math.Ldexp(v, j)
		}
		s, tr, r, w, err := Decompose(yj, p)
		if err != nil {
			t.Fatal(err)
		}
		for i := range y {
			if s[i] != math.Ldexp(s0[i], j) || tr[i] != math.Ldexp(t0[i], j) || r[i] != math.Ldexp(r0[i], j) || w[i] != w0[i] {
				t.Fatalf("2^%d: index %d differs", j, i)
			}
		}
	}
}

// TestRobustnessWeightsRefuseNaN: a NaN or infinite residual is refused
// before the partial sort (which indexes outside its array on NaN).
func TestRobustnessWeightsRefuseNaN(t *testing.T) {
	y := []float64{1, 2, 3, 4, 5, 6}
	for _, bad := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		fit := []float64{1, 2, bad, 4, 5, 6}
		rw := make([]float64, len(y))
		for _, exact := range []bool{false, true} {
			if robustnessWeights(rw, y, fit, make([]float64, len(y)), exact) {
				t.Errorf("fit with %v accepted (exact %v)", bad, exact)
			}
		}
	}
}
