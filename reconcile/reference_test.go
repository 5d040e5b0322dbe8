package reconcile_test

import (
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// TestReference checks every fixture in testdata/reference (copied
// unchanged from the shared reference set; format and formulas in its
// README, "Package reconcile"). The reconciliation fixtures hold numpy
// 1.24.2 evaluations of the published closed forms (bottom-up and
// top-down proportions: Gross & Sohl 1990; forecast proportions:
// Athanasopoulos, Ahmed & Hyndman 2009; OLS: Hyndman et al. 2011; WLS:
// Athanasopoulos et al. 2017; MinT and the Schäfer–Strimmer shrinkage:
// Wickramasuriya, Athanasopoulos & Hyndman 2019); the lung-deaths data are
// R's datasets ldeaths, mdeaths and fdeaths.
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"hierarchy_data": checkHierarchyData,
		"reconciliation": checkReconciliation,
	})
}

func denseOf(rows [][]float64) *mat.Dense {
	d := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		d.SetRow(i, r)
	}
	return d
}

func rowsOf(m mat.Matrix) [][]float64 {
	r, c := m.Dims()
	out := make([][]float64, r)
	for i := range out {
		out[i] = make([]float64, c)
		for j := range out[i] {
			out[i][j] = m.At(i, j)
		}
	}
	return out
}

func compareMatrix(t *testing.T, name string, got mat.Matrix, want [][]float64, abs, rel float64) {
	t.Helper()
	r, c := got.Dims()
	if r != len(want) || (r > 0 && c != len(want[0])) {
		t.Fatalf("%s: %d × %d, want %d × %d", name, r, c, len(want), len(want[0]))
	}
	for i := range want {
		numtest.Slice(t, name+"["+strconv.Itoa(i)+"]", rowsOf(got)[i], want[i], abs, rel)
	}
}

// checkHierarchyData: R datasets ldeaths = mdeaths + fdeaths (fixture
// uk_lung_deaths; the identity was verified in R, max |diff| = 0).
func checkHierarchyData(t *testing.T, f *reftest.Fixture) {
	total := f.String("spec.hierarchy.total")
	v, _ := f.Get("spec.hierarchy.bottom")
	var bottoms []string
	for _, b := range v.([]any) {
		bottoms = append(bottoms, b.(string))
	}
	links := []reconcile.Link{{Name: total}}
	for _, b := range bottoms {
		links = append(links, reconcile.Link{Name: b, Parent: total})
	}
	h, err := reconcile.NewHierarchy(links...)
	if err != nil {
		t.Fatal(err)
	}
	var rowNames []string
	rv, _ := f.Get("spec.summing_matrix.rows")
	for _, r := range rv.([]any) {
		rowNames = append(rowNames, r.(string))
	}
	if got := h.Names(); !slices.Equal(got, rowNames) {
		t.Errorf("node order %v, want the fixture's rows %v", got, rowNames)
	}
	compareMatrix(t, "S", h.Summing(), f.Matrix(t, "spec.summing_matrix.S"), 0, 0)

	// The aggregation identity in the data, through our structure:
	// history minus its bottom-up reconciliation.
	cols := make([][]float64, len(rowNames))
	for i, name := range rowNames {
		cols[i] = f.Floats(t, "series."+name)
	}
	hist := mat.NewDense(len(cols[0]), len(cols), nil)
	for i, c := range cols {
		hist.SetCol(i, c)
	}
	bu, err := reconcile.BottomUp(h, hist)
	if err != nil {
		t.Fatal(err)
	}
	var worst float64
	for tt := range cols[0] {
		worst = math.Max(worst, math.Abs(hist.At(tt, 0)-bu.At(tt, 0)))
	}
	abs, rel, _ := f.Tol("max_abs_diff_ldeaths_minus_sum")
	numtest.Scalar(t, "max |ldeaths - (mdeaths + fdeaths)|", worst, f.Float(t, "expect.max_abs_diff_ldeaths_minus_sum"), abs, rel)
	if want, _ := f.Get("expect.aggregation_identity_holds"); want != (worst == 0) {
		t.Errorf("aggregation identity holds = %v, fixture says %v", worst == 0, want)
	}
}

type fixtureNode struct {
	name, parent string
	level        int
	bottoms      []string
}

func fixtureNodes(t *testing.T, f *reftest.Fixture) []fixtureNode {
	v, _ := f.Get("spec.nodes")
	var out []fixtureNode
	for _, e := range v.([]any) {
		m := e.(map[string]any)
		n := fixtureNode{name: m["name"].(string), level: int(m["level"].(float64))}
		if p, ok := m["parent"].(string); ok {
			n.parent = p
		}
		for _, b := range m["bottoms"].([]any) {
			n.bottoms = append(n.bottoms, b.(string))
		}
		out = append(out, n)
	}
	return out
}

// buildStructure builds the fixture's structure with our constructors and
// checks node order, levels and S against spec.nodes and
// spec.summing_matrix.
func buildStructure(t *testing.T, f *reftest.Fixture) (reconcile.Structure, *reconcile.Hierarchy) {
	nodes := fixtureNodes(t, f)
	wantS := f.Matrix(t, "spec.summing_matrix")
	var st reconcile.Structure
	var h *reconcile.Hierarchy
	switch kind := f.String("spec.structure"); kind {
	case "hierarchy":
		links := make([]reconcile.Link, len(nodes))
		for i, n := range nodes {
			links[i] = reconcile.Link{Name: n.name, Parent: n.parent}
		}
		var err error
		h, err = reconcile.NewHierarchy(links...)
		if err != nil {
			t.Fatal(err)
		}
		st = h
		// The same tree from paths must give the same S.
		parent := map[string]string{}
		for _, n := range nodes {
			parent[n.name] = n.parent
		}
		var paths []string
		for _, n := range nodes {
			if len(n.bottoms) == 1 && n.bottoms[0] == n.name {
				var parts []string
				for v := n.name; v != ""; v = parent[v] {
					parts = append([]string{v}, parts...)
				}
				paths = append(paths, strings.Join(parts, "/"))
			}
		}
		hp, err := reconcile.HierarchyFromPaths(paths, "/")
		if err != nil {
			t.Fatal(err)
		}
		compareMatrix(t, "S from paths", hp.Summing(), wantS, 0, 0)
	case "grouped":
		var factors []string
		seen := map[string]bool{}
		var rows [][]string
		for _, n := range nodes {
			if n.level == 1 {
				fac, _, _ := strings.Cut(n.name, "=")
				if !seen[fac] {
					seen[fac] = true
					factors = append(factors, fac)
				}
			}
			if len(n.bottoms) == 1 && n.bottoms[0] == n.name {
				rows = append(rows, strings.Split(n.name, "|"))
			}
		}
		g, err := reconcile.NewGrouped(factors, rows)
		if err != nil {
			t.Fatal(err)
		}
		st = g
	default:
		t.Fatalf("unknown spec.structure %q", kind)
	}
	var wantNames []string
	for i, n := range nodes {
		wantNames = append(wantNames, n.name)
		if got := st.Level(i); got != n.level {
			t.Errorf("level of %s = %d, want %d", n.name, got, n.level)
		}
	}
	if got := st.Names(); !slices.Equal(got, wantNames) {
		t.Fatalf("node order %v, want %v", got, wantNames)
	}
	compareMatrix(t, "S", st.Summing(), wantS, 0, 0)
	return st, h
}

func checkReconciliation(t *testing.T, f *reftest.Fixture) {
	st, h := buildStructure(t, f)
	abs, rel, ok := f.Tol("*")
	if !ok {
		t.Fatal("fixture has no tolerance \"*\"")
	}
	base := denseOf(f.Matrix(t, "spec.base_forecasts"))
	resid := denseOf(f.Matrix(t, "spec.residuals"))
	hist := denseOf(f.Matrix(t, "spec.history"))

	type method struct {
		key  string
		spec reconcile.Spec
	}
	methods := []method{
		{"bottom_up", reconcile.Spec{Method: reconcile.MethodBottomUp}},
		{"ols", reconcile.Spec{Method: reconcile.MethodOLS}},
		{"wls_structural", reconcile.Spec{Method: reconcile.MethodWLSStructural}},
		{"wls_variance", reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: resid}},
		{"mint_sample", reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid}},
		{"mint_shrink", reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid}},
		{"top_down_average_historical_proportions", reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions, History: hist}},
		{"top_down_proportions_of_historical_averages", reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.ProportionsOfHistoricalAverages, History: hist}},
		{"top_down_forecast_proportions", reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.ForecastProportions}},
		{"middle_out_level_1", reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: 1}},
	}
	checked := map[string]bool{}
	for _, m := range methods {
		if !f.Has("expect." + m.key) {
			continue
		}
		checked[m.key] = true
		// The projection methods are checked in both algebraic forms
		// (through S' W⁻¹ S and through U' W U); the others do not use
		// them.
		for _, form := range []string{"bottom", "constraint", "auto"} {
			t.Run(m.key+"/"+form, func(t *testing.T) {
				reconcile.ProjectionForms[form]()
				defer reconcile.ProjectionForms["auto"]()
				got, err := reconcile.Reconcile(st, base, m.spec)
				if err != nil {
					t.Fatal(err)
				}
				compareMatrix(t, m.key, got, f.Matrix(t, "expect."+m.key), abs, rel)
			})
		}
	}
	if f.Has("expect.mint_shrink_lambda") {
		checked["mint_shrink_lambda"] = true
		est, err := reconcile.EstimateCovariance(st, resid, reconcile.Shrinkage)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "mint_shrink_lambda", est.Lambda, f.Float(t, "expect.mint_shrink_lambda"), abs, rel)
	}
	for _, p := range []struct {
		key string
		how reconcile.Disaggregation
	}{
		{"top_down_average_historical_proportions_p", reconcile.AverageHistoricalProportions},
		{"top_down_proportions_of_historical_averages_p", reconcile.ProportionsOfHistoricalAverages},
	} {
		if !f.Has("expect." + p.key) {
			continue
		}
		checked[p.key] = true
		got, err := reconcile.Proportions(h, 0, hist, p.how)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Slice(t, p.key, got, f.Floats(t, "expect."+p.key), abs, rel)
	}
	// Every expected result must have been checked.
	v, _ := f.Get("expect")
	for key := range v.(map[string]any) {
		if !checked[key] {
			t.Errorf("expect.%s is not checked by this test", key)
		}
	}
}
