package reconcile_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// FuzzHierarchyFromPaths: any list of paths either gives an error wrapping
// one of the package's structure sentinels, or a hierarchy whose S ends
// in the identity and whose bottom-up reconciliation of S·1 is S·1.
func FuzzHierarchyFromPaths(f *testing.F) {
	f.Add("all/a/x\nall/a/y\nall/b")
	f.Add("all/a\nall/a/x")
	f.Add("t//x")
	f.Add("a/b\nc/d")
	f.Add("only")
	f.Fuzz(func(t *testing.T, text string) {
		paths := strings.Split(text, "\n")
		h, err := reconcile.HierarchyFromPaths(paths, "/")
		if err != nil {
			for _, s := range []error{reconcile.ErrStructure, reconcile.ErrDuplicateName, reconcile.ErrNoBottom, reconcile.ErrCycle, reconcile.ErrUnknownParent} {
				if errors.Is(err, s) {
					return
				}
			}
			t.Fatalf("error %v wraps no structure sentinel", err)
		}
		n, m := h.Len(), h.NumBottom()
		if m != len(paths) {
			t.Fatalf("%d bottom series for %d paths", m, len(paths))
		}
		s := h.Summing()
		for j := 0; j < m; j++ {
			for k := 0; k < m; k++ {
				want := 0.0
				if j == k {
					want = 1
				}
				if s.At(n-m+j, k) != want {
					t.Fatalf("S bottom block not the identity at %d,%d", j, k)
				}
			}
		}
		ones := mat.NewDense(1, m, nil)
		for j := 0; j < m; j++ {
			ones.Set(0, j, 1)
		}
		var y mat.Dense
		y.Mul(ones, s.T())
		got, err := reconcile.BottomUp(h, &y)
		if err != nil {
			t.Fatal(err)
		}
		if !mat.Equal(got, &y) {
			t.Fatal("bottom-up changed coherent values")
		}
	})
}

// FuzzReconcile: base forecasts and residual scales of any size, every
// method. Either an error wrapping a sentinel, or finite, coherent
// forecasts — never ±Inf or NaN with a nil error, never a panic.
func FuzzReconcile(f *testing.F) {
	f.Add(100.0, 60.0, 40.0, 30.0, 30.0, 25.0, 15.0, 1.0, uint8(0))
	f.Add(1.7e308, 1.1e308, 1.1e308, 9e307, 9e307, 9e307, 9e307, 1e300, uint8(3))
	f.Add(1e-310, -5e-311, 0.0, 1e-320, 3e-311, -1e-315, 2e-311, 1e-300, uint8(7))
	f.Add(5.0, 1.0, 1.0, 1.0, -1.0, 1.0, 0.0, 1.0, uint8(2))
	f.Fuzz(func(t *testing.T, a, b, c, d, e, g, k, rscale float64, which uint8) {
		h, err := reconcile.HierarchyFromPaths([]string{"t/r0/a", "t/r0/b", "t/r1/c", "t/r1/d"}, "/")
		if err != nil {
			t.Fatal(err)
		}
		base := mat.NewDense(1, 7, []float64{a, b, c, d, e, g, k})
		resid := mat.NewDense(12, 7, nil)
		for r := 0; r < 12; r++ {
			for j := 0; j < 7; j++ {
				resid.Set(r, j, rscale*float64((r*7+j*3)%11-5+j%2))
			}
		}
		hist := mat.NewDense(3, 7, []float64{
			10, 6, 4, 3, 3, 2, 2,
			12, 7, 5, 4, 3, 3, 2,
			11, 6, 5, 3, 3, 2, 3,
		})
		specs := []reconcile.Spec{
			{Method: reconcile.MethodBottomUp},
			{Method: reconcile.MethodTopDown},
			{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions, History: hist},
			{Method: reconcile.MethodMiddleOut, Level: 1},
			{Method: reconcile.MethodOLS},
			{Method: reconcile.MethodWLSStructural},
			{Method: reconcile.MethodWLSVariance, Residuals: resid},
			{Method: reconcile.MethodMinTSample, Residuals: resid},
			{Method: reconcile.MethodMinTShrink, Residuals: resid},
			{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true},
		}
		spec := specs[int(which)%len(specs)]
		got, err := reconcile.Reconcile(h, base, spec)
		if err != nil {
			for _, s := range []error{almanac.ErrMissing, almanac.ErrNonFinite, almanac.ErrTooShort, almanac.ErrAllMissing, reconcile.ErrSingular, reconcile.ErrProportion, reconcile.ErrNoConvergence} {
				if errors.Is(err, s) {
					return
				}
			}
			t.Fatalf("%v: error %v wraps no sentinel", spec.Method, err)
		}
		var scale float64
		for _, v := range got.RawMatrix().Data {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%v: %v with a nil error", spec.Method, mat.Formatted(got))
			}
			scale = math.Max(scale, math.Abs(v))
		}
		// Coherence, relative to the largest value (computed on halves so
		// that the check itself cannot overflow).
		for i := 0; i < 3; i++ {
			var sum float64
			for _, j := range h.Bottoms(i) {
				sum += got.At(0, 3+j) / 2
			}
			if d := math.Abs(sum - got.At(0, i)/2); d > 1e-9*scale {
				t.Fatalf("%v: node %d is %v, its bottom series add up to %v", spec.Method, i, got.At(0, i), 2*sum)
			}
		}
	})
}
