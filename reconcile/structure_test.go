package reconcile_test

import (
	"errors"
	"slices"
	"strconv"
	"testing"

	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

func TestHierarchyUnbalanced(t *testing.T) {
	// A leaf ("web") directly under the top next to a two-level branch:
	// aggregates come first breadth-first, leaves depth-first.
	h, err := reconcile.NewHierarchy(
		reconcile.Link{Name: "shop-2", Parent: "stores"},
		reconcile.Link{Name: "all"},
		reconcile.Link{Name: "stores", Parent: "all"},
		reconcile.Link{Name: "web", Parent: "all"},
		reconcile.Link{Name: "shop-1", Parent: "stores"},
	)
	if err != nil {
		t.Fatal(err)
	}
	wantNames := []string{"all", "stores", "shop-2", "shop-1", "web"}
	if got := h.Names(); !slices.Equal(got, wantNames) {
		t.Errorf("names %v, want %v", got, wantNames)
	}
	wantLevels := []int{0, 1, 2, 2, 1}
	for i, w := range wantLevels {
		if got := h.Level(i); got != w {
			t.Errorf("level(%d) = %d, want %d", i, got, w)
		}
	}
	if h.NumBottom() != 3 || h.Len() != 5 || h.NumLevels() != 3 {
		t.Errorf("m, n, levels = %d, %d, %d; want 3, 5, 3", h.NumBottom(), h.Len(), h.NumLevels())
	}
	wantS := mat.NewDense(5, 3, []float64{
		1, 1, 1,
		1, 1, 0,
		1, 0, 0,
		0, 1, 0,
		0, 0, 1,
	})
	if !mat.Equal(h.Summing(), wantS) {
		t.Errorf("S =\n%v\nwant\n%v", mat.Formatted(h.Summing()), mat.Formatted(wantS))
	}
	if p := h.Parent(4); p != 0 {
		t.Errorf("parent of web = %d, want 0", p)
	}
	if ch := h.Children(1); !slices.Equal(ch, []int{2, 3}) {
		t.Errorf("children of stores = %v, want [2 3]", ch)
	}
	if lv := h.LevelNodes(1); !slices.Equal(lv, []int{1, 4}) {
		t.Errorf("level-1 nodes = %v, want [1 4]", lv)
	}
	if i, ok := h.Index("web"); !ok || i != 4 {
		t.Errorf("Index(web) = %d, %v", i, ok)
	}
	// Middle-out at level 2 keeps shop-1, shop-2 and the shallower leaf web.
	base := mat.NewDense(1, 5, []float64{100, 70, 30, 35, 20})
	got, err := reconcile.MiddleOut(h, 2, base, reconcile.ForecastProportions, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{85, 65, 30, 35, 20}
	if g := mat.Row(nil, 0, got); !slices.Equal(g, want) {
		t.Errorf("middle-out level 2 = %v, want %v", g, want)
	}
}

func TestGroupedThreeFactors(t *testing.T) {
	var rows [][]string
	for _, r := range []string{"east", "west"} {
		for _, f := range []string{"paper", "cups"} {
			for _, ch := range []string{"web", "shop"} {
				rows = append(rows, []string{r, f, ch})
			}
		}
	}
	g, err := reconcile.NewGrouped([]string{"region", "family", "channel"}, rows)
	if err != nil {
		t.Fatal(err)
	}
	// total + 3 factors × 2 values + 3 pairs × 4 combinations + 8 bottoms.
	if g.Len() != 1+6+12+8 || g.NumBottom() != 8 || g.NumLevels() != 4 {
		t.Fatalf("n, m, levels = %d, %d, %d", g.Len(), g.NumBottom(), g.NumLevels())
	}
	i, ok := g.Index("region=west|channel=shop")
	if !ok {
		t.Fatalf("no interaction node; names %v", g.Names())
	}
	if b := g.Bottoms(i); !slices.Equal(b, []int{5, 7}) {
		t.Errorf("bottoms of region=west|channel=shop = %v, want [5 7]", b)
	}
	if g.Level(i) != 2 {
		t.Errorf("level %d, want 2", g.Level(i))
	}
	if j, ok := g.Index("east|cups|web"); !ok || j != 1+6+12+2 {
		t.Errorf("Index(east|cups|web) = %d, %v", j, ok)
	}
	if f := g.Factors(); !slices.Equal(f, []string{"region", "family", "channel"}) {
		t.Errorf("factors %v", f)
	}
}

func TestStructureErrors(t *testing.T) {
	L := func(name, parent string) reconcile.Link { return reconcile.Link{Name: name, Parent: parent} }
	tests := []struct {
		name  string
		build func() error
		want  error
	}{
		{"no links", func() error { _, err := reconcile.NewHierarchy(); return err }, reconcile.ErrNoBottom},
		{"duplicate name", func() error {
			_, err := reconcile.NewHierarchy(L("all", ""), L("a", "all"), L("a", "all"))
			return err
		}, reconcile.ErrDuplicateName},
		{"unknown parent", func() error {
			_, err := reconcile.NewHierarchy(L("all", ""), L("a", "al"))
			return err
		}, reconcile.ErrUnknownParent},
		{"cycle", func() error {
			_, err := reconcile.NewHierarchy(L("all", ""), L("a", "all"), L("b", "c"), L("c", "b"))
			return err
		}, reconcile.ErrCycle},
		{"self parent", func() error {
			_, err := reconcile.NewHierarchy(L("all", ""), L("a", "a"))
			return err
		}, reconcile.ErrCycle},
		{"two tops", func() error { _, err := reconcile.NewHierarchy(L("all", ""), L("other", "")); return err }, reconcile.ErrStructure},
		{"no top", func() error { _, err := reconcile.NewHierarchy(L("a", "b"), L("b", "a")); return err }, reconcile.ErrStructure},
		{"empty name", func() error { _, err := reconcile.NewHierarchy(L("", "")); return err }, reconcile.ErrStructure},
		{"no paths", func() error { _, err := reconcile.HierarchyFromPaths(nil, "/"); return err }, reconcile.ErrNoBottom},
		{"empty separator", func() error { _, err := reconcile.HierarchyFromPaths([]string{"a/b"}, ""); return err }, reconcile.ErrStructure},
		{"two tops in paths", func() error { _, err := reconcile.HierarchyFromPaths([]string{"a/b", "c/d"}, "/"); return err }, reconcile.ErrStructure},
		{"empty component", func() error { _, err := reconcile.HierarchyFromPaths([]string{"a//b"}, "/"); return err }, reconcile.ErrStructure},
		{"repeated path", func() error { _, err := reconcile.HierarchyFromPaths([]string{"a/b", "a/b"}, "/"); return err }, reconcile.ErrDuplicateName},
		{"path is an aggregate", func() error { _, err := reconcile.HierarchyFromPaths([]string{"a/b/c", "a/b"}, "/"); return err }, reconcile.ErrStructure},
		{"aggregate given first", func() error { _, err := reconcile.HierarchyFromPaths([]string{"a/b", "a/b/c"}, "/"); return err }, reconcile.ErrStructure},
		{"no factors", func() error { _, err := reconcile.NewGrouped(nil, [][]string{{"x"}}); return err }, reconcile.ErrNoBottom},
		{"no bottom rows", func() error { _, err := reconcile.NewGrouped([]string{"f"}, nil); return err }, reconcile.ErrNoBottom},
		{"row width", func() error { _, err := reconcile.NewGrouped([]string{"f", "g"}, [][]string{{"x"}}); return err }, reconcile.ErrStructure},
		{"empty value", func() error { _, err := reconcile.NewGrouped([]string{"f"}, [][]string{{""}}); return err }, reconcile.ErrStructure},
		{"too many factors", func() error {
			// 17 factors would make at least 2^17 aggregates (building them
			// once ran out of memory at 40 factors).
			f := make([]string, reconcile.MaxFactors+1)
			row := make([]string, len(f))
			for i := range f {
				f[i], row[i] = "f"+strconv.Itoa(i), "v"
			}
			_, err := reconcile.NewGrouped(f, [][]string{row})
			return err
		}, reconcile.ErrStructure},
		{"duplicate factor", func() error { _, err := reconcile.NewGrouped([]string{"f", "f"}, [][]string{{"x", "y"}}); return err }, reconcile.ErrDuplicateName},
		{"duplicate row", func() error {
			_, err := reconcile.NewGrouped([]string{"f", "g"}, [][]string{{"x", "y"}, {"x", "y"}})
			return err
		}, reconcile.ErrDuplicateName},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.build()
			if !errors.Is(err, tt.want) {
				t.Fatalf("error %v, want one wrapping %v", err, tt.want)
			}
			if msg := err.Error(); len(msg) < 11 || msg[:11] != "reconcile: " {
				t.Errorf("message %q does not start with the package name", msg)
			}
		})
	}
}

func TestEnumStrings(t *testing.T) {
	tests := []struct {
		name string
		got  string
		want string
	}{
		{"method", reconcile.MethodMinTShrink.String(), "MinT (shrinkage)"},
		{"unknown method", reconcile.Method(42).String(), "Method(42)"},
		{"covariance", reconcile.SampleCovariance.String(), "sample"},
		{"unknown covariance", reconcile.Covariance(-1).String(), "Covariance(-1)"},
		{"disaggregation", reconcile.AverageHistoricalProportions.String(), "average historical proportions"},
		{"unknown disaggregation", reconcile.Disaggregation(9).String(), "Disaggregation(9)"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if tt.got != tt.want {
				t.Errorf("%q, want %q", tt.got, tt.want)
			}
		})
	}
}
