package reconcile_test

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// testHierarchy is an invented chain: total → regions → stores, with
// stores[r] stores in region r.
func testHierarchy(t testing.TB, stores ...int) *reconcile.Hierarchy {
	t.Helper()
	links := []reconcile.Link{{Name: "total"}}
	for r, k := range stores {
		region := fmt.Sprintf("r%d", r)
		links = append(links, reconcile.Link{Name: region, Parent: "total"})
		for s := 0; s < k; s++ {
			links = append(links, reconcile.Link{Name: fmt.Sprintf("%s-s%d", region, s), Parent: region})
		}
	}
	h, err := reconcile.NewHierarchy(links...)
	if err != nil {
		t.Fatal(err)
	}
	return h
}

// coherentData returns rows × n coherent values (S times positive bottom
// values) plus independent noise of the given size on every node.
func coherentData(st reconcile.Structure, rows int, noise float64, rng *rand.Rand) *mat.Dense {
	n, m := st.Len(), st.NumBottom()
	b := mat.NewDense(rows, m, nil)
	for i := 0; i < rows; i++ {
		for j := 0; j < m; j++ {
			b.Set(i, j, 50+20*rng.Float64())
		}
	}
	var y mat.Dense
	y.Mul(b, st.Summing().T())
	for i := 0; i < rows; i++ {
		for j := 0; j < n; j++ {
			y.Set(i, j, y.At(i, j)+noise*rng.NormFloat64())
		}
	}
	return &y
}

func randomResiduals(st reconcile.Structure, rows int, rng *rand.Rand) *mat.Dense {
	// Residuals with a common shock, so W1 has real correlation.
	n := st.Len()
	e := mat.NewDense(rows, n, nil)
	for t := 0; t < rows; t++ {
		common := rng.NormFloat64()
		for i := 0; i < n; i++ {
			e.Set(t, i, float64(1+st.Level(i))*(0.5*common+rng.NormFloat64()))
		}
	}
	return e
}

// maxIncoherence returns max |y - S y_bottom| relative to the scale of y.
func maxIncoherence(st reconcile.Structure, y mat.Matrix) float64 {
	r, n := y.Dims()
	m := st.NumBottom()
	s := st.Summing()
	var worst, scale float64
	for t := 0; t < r; t++ {
		for i := 0; i < n; i++ {
			var sum float64
			for j := 0; j < m; j++ {
				sum += s.At(i, j) * y.At(t, n-m+j)
			}
			worst = math.Max(worst, math.Abs(sum-y.At(t, i)))
			scale = math.Max(scale, math.Abs(y.At(t, i)))
		}
	}
	return worst / math.Max(scale, 1)
}

func allSpecs(resid, hist mat.Matrix) []struct {
	name string
	spec reconcile.Spec
} {
	return []struct {
		name string
		spec reconcile.Spec
	}{
		{"auto without residuals", reconcile.Spec{}},
		{"auto with residuals", reconcile.Spec{Residuals: resid}},
		{"bottom-up", reconcile.Spec{Method: reconcile.MethodBottomUp}},
		{"top-down forecast proportions", reconcile.Spec{Method: reconcile.MethodTopDown}},
		{"top-down average historical proportions", reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions, History: hist}},
		{"top-down proportions of historical averages", reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.ProportionsOfHistoricalAverages, History: hist}},
		{"middle-out level 1", reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: 1}},
		{"middle-out level 1 historical", reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: 1, Disaggregation: reconcile.AverageHistoricalProportions, History: hist}},
		{"OLS", reconcile.Spec{Method: reconcile.MethodOLS}},
		{"WLS structural", reconcile.Spec{Method: reconcile.MethodWLSStructural}},
		{"WLS variance", reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: resid}},
		{"MinT sample", reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid}},
		{"MinT shrink", reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid}},
		{"MinT shrink non-negative", reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true}},
		{"bottom-up non-negative", reconcile.Spec{Method: reconcile.MethodBottomUp, NonNegative: true}},
	}
}

// Property: every method returns coherent forecasts (the aggregation
// identity y = S b holds to 1e-9 relative); this is the defining
// requirement of reconciliation (common practice).
func TestCoherence(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	h := testHierarchy(t, 3, 2, 4)
	hist := coherentData(h, 36, 0, rng)
	resid := randomResiduals(h, 36, rng)
	base := coherentData(h, 12, 15, rng) // incoherent base forecasts
	for _, tt := range allSpecs(resid, hist) {
		t.Run(tt.name, func(t *testing.T) {
			got, err := reconcile.Reconcile(h, base, tt.spec)
			if err != nil {
				t.Fatal(err)
			}
			if d := maxIncoherence(h, got); d > 1e-9 {
				t.Errorf("incoherence %.3g > 1e-9", d)
			}
			if d := maxIncoherence(h, base); d < 1e-3 {
				t.Fatalf("test base forecasts are already coherent (%.3g)", d)
			}
		})
	}
}

// Property: the projection methods (OLS, WLS, MinT) and forecast
// proportions leave coherent forecasts unchanged (S G S = S; Hyndman et
// al. 2011, Wickramasuriya et al. 2019).
func TestCoherentUnchanged(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	h := testHierarchy(t, 2, 3, 3)
	resid := randomResiduals(h, 40, rng)
	base := coherentData(h, 6, 0, rng)
	g, err := reconcile.NewGrouped([]string{"region", "family"}, [][]string{
		{"east", "paper"}, {"east", "cups"}, {"west", "paper"}, {"west", "cups"}, {"west", "lids"},
	})
	if err != nil {
		t.Fatal(err)
	}
	gresid := randomResiduals(g, 40, rng)
	gbase := coherentData(g, 6, 0, rng)
	tests := []struct {
		name string
		st   reconcile.Structure
		base *mat.Dense
		spec reconcile.Spec
	}{
		{"OLS", h, base, reconcile.Spec{Method: reconcile.MethodOLS}},
		{"WLS structural", h, base, reconcile.Spec{Method: reconcile.MethodWLSStructural}},
		{"WLS variance", h, base, reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: resid}},
		{"MinT sample", h, base, reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid}},
		{"MinT shrink", h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid}},
		{"MinT shrink non-negative", h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true}},
		{"top-down forecast proportions", h, base, reconcile.Spec{Method: reconcile.MethodTopDown}},
		{"middle-out forecast proportions", h, base, reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: 1}},
		{"grouped OLS", g, gbase, reconcile.Spec{Method: reconcile.MethodOLS}},
		{"grouped WLS structural", g, gbase, reconcile.Spec{Method: reconcile.MethodWLSStructural}},
		{"grouped MinT shrink", g, gbase, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: gresid}},
		{"grouped MinT sample", g, gbase, reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: gresid}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := reconcile.Reconcile(tt.st, tt.base, tt.spec)
			if err != nil {
				t.Fatal(err)
			}
			if !mat.EqualApprox(got, tt.base, 1e-9*mat.Norm(tt.base, math.Inf(1))) {
				t.Errorf("coherent input changed:\n got %v\nwant %v", mat.Formatted(got), mat.Formatted(tt.base))
			}
		})
	}
}

// Property: for the projection methods G S = I (the map reproduces the
// bottom level of coherent forecasts), and the reconciled covariance
// S G W G' S' is symmetric with a non-negative diagonal.
func TestBottomMapIsProjection(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	h := testHierarchy(t, 3, 3)
	resid := randomResiduals(h, 30, rng)
	for _, m := range []reconcile.Method{reconcile.MethodOLS, reconcile.MethodWLSStructural, reconcile.MethodWLSVariance, reconcile.MethodMinTSample, reconcile.MethodMinTShrink, reconcile.MethodBottomUp} {
		t.Run(m.String(), func(t *testing.T) {
			g, err := reconcile.BottomMap(h, reconcile.Spec{Method: m, Residuals: resid})
			if err != nil {
				t.Fatal(err)
			}
			var gs mat.Dense
			gs.Mul(g, h.Summing())
			id := mat.NewDiagDense(h.NumBottom(), nil)
			for i := 0; i < h.NumBottom(); i++ {
				id.SetDiag(i, 1)
			}
			if !mat.EqualApprox(&gs, id, 1e-10) {
				t.Errorf("G S != I:\n%v", mat.Formatted(&gs))
			}
			est, err := reconcile.EstimateCovariance(h, resid, reconcile.Shrinkage)
			if err != nil {
				t.Fatal(err)
			}
			v, err := reconcile.ReconciledCovariance(h, g, est.W)
			if err != nil {
				t.Fatal(err)
			}
			for i := 0; i < h.Len(); i++ {
				if v.At(i, i) < 0 {
					t.Errorf("negative variance %v at %d", v.At(i, i), i)
				}
			}
		})
	}
}

// MinT minimises the trace of the reconciled covariance among unbiased
// linear maps (Wickramasuriya, Athanasopoulos & Hyndman 2019, Theorem 1):
// with W the true base covariance, trace(S G W G' S') for G = MinT is not
// larger than for OLS, WLS or bottom-up.
func TestMinTMinimisesTrace(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	h := testHierarchy(t, 2, 3)
	resid := randomResiduals(h, 80, rng)
	est, err := reconcile.EstimateCovariance(h, resid, reconcile.SampleCovariance)
	if err != nil {
		t.Fatal(err)
	}
	trace := func(m reconcile.Method) float64 {
		g, err := reconcile.BottomMap(h, reconcile.Spec{Method: m, Residuals: resid})
		if err != nil {
			t.Fatal(err)
		}
		v, err := reconcile.ReconciledCovariance(h, g, est.W)
		if err != nil {
			t.Fatal(err)
		}
		return mat.Trace(v)
	}
	best := trace(reconcile.MethodMinTSample)
	for _, m := range []reconcile.Method{reconcile.MethodOLS, reconcile.MethodWLSStructural, reconcile.MethodWLSVariance, reconcile.MethodMinTShrink, reconcile.MethodBottomUp} {
		if tr := trace(m); tr < best*(1-1e-12) {
			t.Errorf("%v trace %.6g < MinT sample trace %.6g", m, tr, best)
		}
	}
}

// Property: results are bit-identical across runs and goroutines.
func TestDeterminism(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	h := testHierarchy(t, 4, 4, 4)
	resid := randomResiduals(h, 24, rng)
	base := coherentData(h, 12, 10, rng)
	spec := reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true}
	want, err := reconcile.Reconcile(h, base, spec)
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	results := make([]*mat.Dense, 8)
	errs := make([]error, 8)
	for k := range results {
		wg.Add(1)
		go func() {
			defer wg.Done()
			results[k], errs[k] = reconcile.Reconcile(h, base, spec)
		}()
	}
	wg.Wait()
	for k, got := range results {
		if errs[k] != nil {
			t.Fatal(errs[k])
		}
		if !mat.Equal(got, want) {
			t.Errorf("goroutine %d result differs from the serial one", k)
		}
	}
}

func TestBadInput(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	h := testHierarchy(t, 2, 2) // n = 7
	g, err := reconcile.NewGrouped([]string{"a"}, [][]string{{"x"}, {"y"}})
	if err != nil {
		t.Fatal(err)
	}
	base := coherentData(h, 3, 1, rng)
	resid := randomResiduals(h, 20, rng)
	hist := coherentData(h, 20, 0, rng)
	withCell := func(m *mat.Dense, i, j int, v float64) *mat.Dense {
		c := mat.DenseCopyOf(m)
		c.Set(i, j, v)
		return c
	}
	nanRows := mat.NewDense(3, 7, nil)
	for i := 0; i < 3; i++ {
		nanRows.Set(i, i, math.NaN())
	}
	zeroCol := mat.DenseCopyOf(resid)
	for i := 0; i < 20; i++ {
		zeroCol.Set(i, 3, 0)
	}
	// Residuals that add up exactly (as those of naive forecasts do): the
	// sample covariance is singular although T ≥ n.
	coherentResid := coherentData(h, 30, 0, rng)
	zeroTopHist := withCell(hist, 4, 0, 0)
	tests := []struct {
		name string
		st   reconcile.Structure
		base mat.Matrix
		spec reconcile.Spec
		want []error
	}{
		{"nil structure", nil, base, reconcile.Spec{}, []error{almanac.ErrInvalid}},
		{"typed nil hierarchy", (*reconcile.Hierarchy)(nil), base, reconcile.Spec{}, []error{almanac.ErrInvalid}},
		{"zero grouped structure", &reconcile.Grouped{}, base, reconcile.Spec{}, []error{almanac.ErrInvalid}},
		{"nil base", h, nil, reconcile.Spec{}, []error{almanac.ErrEmpty}},
		// A typed nil held in a mat.Matrix once reached a nil dereference.
		{"typed nil base", h, (*mat.Dense)(nil), reconcile.Spec{}, []error{almanac.ErrEmpty}},
		{"typed nil residuals for MinT", h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: (*mat.Dense)(nil)}, []error{almanac.ErrEmpty}},
		{"typed nil history", h, base, reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions, History: (*mat.Dense)(nil)}, []error{almanac.ErrEmpty}},
		{"too few columns", h, mat.NewDense(2, 6, nil), reconcile.Spec{}, []error{reconcile.ErrDimension, almanac.ErrLength}},
		{"NaN base forecast", h, withCell(base, 1, 2, math.NaN()), reconcile.Spec{}, []error{almanac.ErrMissing}},
		{"Inf base forecast", h, withCell(base, 0, 0, math.Inf(1)), reconcile.Spec{Method: reconcile.MethodOLS}, []error{almanac.ErrNonFinite}},
		{"residual columns", h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: mat.NewDense(10, 5, nil)}, []error{reconcile.ErrDimension, almanac.ErrLength}},
		{"no residuals for MinT", h, base, reconcile.Spec{Method: reconcile.MethodMinTSample}, []error{almanac.ErrEmpty}},
		{"too few rows for the sample covariance", h, base, reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid.Slice(0, 6, 0, 7)}, []error{almanac.ErrTooShort}},
		{"one row for shrinkage", h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid.Slice(0, 1, 0, 7)}, []error{almanac.ErrTooShort}},
		{"residual rows all with NaN", h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: nanRows}, []error{almanac.ErrAllMissing}},
		{"Inf residual", h, base, reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: withCell(resid, 2, 2, math.Inf(-1))}, []error{almanac.ErrNonFinite}},
		{"zero residual variance", h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: zeroCol}, []error{reconcile.ErrSingular}},
		{"singular sample covariance", h, base, reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: coherentResid}, []error{reconcile.ErrSingular}},
		{"top-down on a grouped structure", g, mat.NewDense(1, 3, []float64{1, 2, 3}), reconcile.Spec{Method: reconcile.MethodTopDown}, []error{almanac.ErrInvalid}},
		{"middle-out level too deep", h, base, reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: 3}, []error{almanac.ErrInvalid}},
		{"historical proportions without history", h, base, reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions}, []error{almanac.ErrEmpty}},
		{"zero total in history", h, base, reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions, History: zeroTopHist}, []error{reconcile.ErrProportion}},
		{"children sum to zero", h, mat.NewDense(1, 7, []float64{5, 1, 1, 1, -1, 1, 0}), reconcile.Spec{Method: reconcile.MethodTopDown}, []error{reconcile.ErrProportion}},
		{"non-negative top-down", h, base, reconcile.Spec{Method: reconcile.MethodTopDown, NonNegative: true}, []error{almanac.ErrInvalid}},
		{"unknown method", h, base, reconcile.Spec{Method: reconcile.Method(99)}, []error{almanac.ErrInvalid}},
		{"unknown disaggregation", h, base, reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.Disaggregation(7)}, []error{almanac.ErrInvalid}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := reconcile.Reconcile(tt.st, tt.base, tt.spec)
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range tt.want {
				if !errors.Is(err, w) {
					t.Errorf("error %q does not wrap %v", err, w)
				}
			}
			if msg := err.Error(); len(msg) < 11 || msg[:11] != "reconcile: " {
				t.Errorf("message %q does not start with the package name", msg)
			}
		})
	}
}

// TestTypedNilMatrices: a typed nil matrix is treated as no matrix by
// every entry point (an error, or for MethodAuto the choice made without
// residuals), never a nil dereference.
func TestTypedNilMatrices(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	h := testHierarchy(t, 2, 2)
	base := coherentData(h, 3, 1, rng)
	auto, err := reconcile.Reconcile(h, base, reconcile.Spec{Residuals: (*mat.Dense)(nil)})
	if err != nil {
		t.Fatal(err)
	}
	wls, err := reconcile.WLSStructural(h, base)
	if err != nil {
		t.Fatal(err)
	}
	if !mat.Equal(auto, wls) {
		t.Error("MethodAuto with typed nil residuals is not WLS (structural)")
	}
	if _, err := reconcile.Proportions(h, 0, (*mat.Dense)(nil), reconcile.AverageHistoricalProportions); !errors.Is(err, almanac.ErrEmpty) {
		t.Errorf("Proportions: %v", err)
	}
	if _, err := reconcile.EstimateCovariance(h, (*mat.Dense)(nil), reconcile.Shrinkage); !errors.Is(err, almanac.ErrEmpty) {
		t.Errorf("EstimateCovariance: %v", err)
	}
	g, err := reconcile.BottomMap(h, reconcile.Spec{Method: reconcile.MethodOLS})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := reconcile.ReconciledCovariance(h, g, (*mat.SymDense)(nil)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("ReconciledCovariance, typed nil W: %v", err)
	}
	if _, err := reconcile.ReconciledCovariance(h, (*mat.Dense)(nil), mat.NewSymDense(h.Len(), nil)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("ReconciledCovariance, typed nil G: %v", err)
	}
}

// Forecast proportions with children whose base forecasts are all zero
// split the parent equally (documented rule), so zero-demand items get
// zero and the result stays coherent.
func TestForecastProportionsAllZeroChildren(t *testing.T) {
	h := testHierarchy(t, 2, 2)
	// total, r0, r1, r0-s0, r0-s1, r1-s0, r1-s1
	base := mat.NewDense(1, 7, []float64{10, 6, 4, 0, 0, 3, 1})
	got, err := reconcile.TopDown(h, base, reconcile.ForecastProportions, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{10, 6, 4, 3, 3, 3, 1}
	if g := mat.Row(nil, 0, got); !mat.EqualApprox(mat.NewVecDense(7, g), mat.NewVecDense(7, want), 1e-12) {
		t.Errorf("got %v, want %v", g, want)
	}
}

// EstimateCovariance on a hand-checkable case: two nodes, residuals
// (1, 1), (−1, −1), (1, −1), (−1, 1): W1 = E'E/T = I (worked by hand), all
// r_ij = 0, so λ = 1 by the documented rule.
func TestEstimateCovarianceByHand(t *testing.T) {
	h, err := reconcile.NewHierarchy(reconcile.Link{Name: "t"}, reconcile.Link{Name: "a", Parent: "t"})
	if err != nil {
		t.Fatal(err)
	}
	e := mat.NewDense(4, 2, []float64{1, 1, -1, -1, 1, -1, -1, 1})
	for _, kind := range []reconcile.Covariance{reconcile.SampleCovariance, reconcile.Shrinkage, reconcile.DiagonalVariance} {
		t.Run(kind.String(), func(t *testing.T) {
			est, err := reconcile.EstimateCovariance(h, e, kind)
			if err != nil {
				t.Fatal(err)
			}
			if !mat.EqualApprox(est.W, mat.NewDiagDense(2, []float64{1, 1}), 1e-15) || est.Rows != 4 {
				t.Errorf("W = %v, rows %d", mat.Formatted(est.W), est.Rows)
			}
			if kind != reconcile.SampleCovariance && est.Lambda != 1 {
				t.Errorf("lambda %v, want 1", est.Lambda)
			}
		})
	}
}

// The per-row work (applying a prepared map and adding up) allocates
// nothing, so reconciling many steps or sample paths costs no garbage.
func TestRowAllocations(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	h := testHierarchy(t, 3, 4)
	resid := randomResiduals(h, 30, rng)
	hist := coherentData(h, 20, 0, rng)
	y := mat.Row(nil, 0, coherentData(h, 1, 5, rng))
	for _, tt := range allSpecs(resid, hist) {
		if tt.spec.NonNegative {
			continue // the active-set solve factorises sub-matrices
		}
		t.Run(tt.name, func(t *testing.T) {
			allocs, err := reconcile.RowAllocs(h, tt.spec, y)
			if err != nil {
				t.Fatal(err)
			}
			if allocs != 0 {
				t.Errorf("%v allocations per row, want 0", allocs)
			}
		})
	}
}

// Large enough for gonum's parallel matrix kernel inside the Cholesky
// factorisation: the result must not depend on GOMAXPROCS.
func TestDeterminismAcrossProcs(t *testing.T) {
	if testing.Short() {
		t.Skip("large structure")
	}
	rng := rand.New(rand.NewPCG(61, 62))
	stores := make([]int, 20)
	for i := range stores {
		stores[i] = 20
	}
	h := testHierarchy(t, stores...) // n = 421
	resid := randomResiduals(h, 40, rng)
	base := coherentData(h, 3, 10, rng)
	spec := reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid}
	var want *mat.Dense
	for _, procs := range []int{1, 2, 4} {
		old := runtime.GOMAXPROCS(procs)
		got, err := reconcile.Reconcile(h, base, spec)
		runtime.GOMAXPROCS(old)
		if err != nil {
			t.Fatal(err)
		}
		if want == nil {
			want = got
			continue
		}
		if !mat.Equal(got, want) {
			t.Errorf("GOMAXPROCS=%d result differs from GOMAXPROCS=1", procs)
		}
	}
}

// Scale invariance (DESIGN.md "Numbers"): reconciling c·ŷ with residuals
// and history c·E, c·Y gives c times the reconciled forecasts.
func TestScaleInvariance(t *testing.T) {
	rng := rand.New(rand.NewPCG(71, 72))
	h := testHierarchy(t, 3, 4, 2)
	resid := randomResiduals(h, 30, rng)
	hist := coherentData(h, 30, 0, rng)
	base := coherentData(h, 6, 8, rng)
	for _, c := range []float64{1e-4, 7, 1e6} {
		var cb, cr, ch mat.Dense
		cb.Scale(c, base)
		cr.Scale(c, resid)
		ch.Scale(c, hist)
		for _, tt := range allSpecs(resid, hist) {
			t.Run(fmt.Sprintf("c=%g/%s", c, tt.name), func(t *testing.T) {
				want, err := reconcile.Reconcile(h, base, tt.spec)
				if err != nil {
					t.Fatal(err)
				}
				want.Scale(c, want)
				spec := tt.spec
				if spec.Residuals != nil {
					spec.Residuals = &cr
				}
				if spec.History != nil {
					spec.History = &ch
				}
				got, err := reconcile.Reconcile(h, &cb, spec)
				if err != nil {
					t.Fatal(err)
				}
				if !mat.EqualApprox(got, want, 1e-9*mat.Norm(want, math.Inf(1))) {
					t.Error("not scale invariant")
				}
			})
		}
	}
}

// Nodes whose scales differ by six orders of magnitude (a large and a
// tiny region): the singularity tests work on the correlation scale, so
// MinT neither fails nor loses the projection property.
func TestMixedScales(t *testing.T) {
	rng := rand.New(rand.NewPCG(73, 74))
	h := testHierarchy(t, 3, 3) // total, r0, r1, r0-s0..2, r1-s0..2
	n := h.Len()
	scale := []float64{1e6, 1e6, 1, 1e6, 1e6, 1e6, 1, 1, 1}
	resid := randomResiduals(h, 40, rng)
	for t0 := 0; t0 < 40; t0++ {
		for i := 0; i < n; i++ {
			resid.Set(t0, i, resid.At(t0, i)*scale[i])
		}
	}
	b := mat.NewDense(2, 6, []float64{3e6, 2e6, 4e6, 3, 2, 4, 3.5e6, 2.5e6, 4.5e6, 2, 1, 5})
	var base mat.Dense
	base.Mul(b, h.Summing().T())
	for _, m := range []reconcile.Method{reconcile.MethodMinTSample, reconcile.MethodMinTShrink, reconcile.MethodWLSVariance} {
		t.Run(m.String(), func(t *testing.T) {
			got, err := reconcile.Reconcile(h, &base, reconcile.Spec{Method: m, Residuals: resid})
			if err != nil {
				t.Fatal(err)
			}
			// The small region must come back to its own precision, not
			// to that of the total.
			for k := 0; k < 2; k++ {
				for i := 0; i < n; i++ {
					if d := math.Abs(got.At(k, i) - base.At(k, i)); d > 1e-8*math.Abs(base.At(k, i)) {
						t.Errorf("step %d node %s: %v, want %v", k, h.Names()[i], got.At(k, i), base.At(k, i))
					}
				}
			}
		})
	}
}
