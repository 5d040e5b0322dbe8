package reconcile_test

import (
	"errors"
	"strings"
	"testing"

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
