package reconcile_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// A case worked by hand from the definition: total = A + B, W = I, base
// (total, A, B) = (10, 12, −4). Unconstrained OLS gives B = −10/3. With
// B = 0 the best A minimises (10−A)² + (12−A)², so A = 11; at that point
// the derivative of ½‖ŷ − S b‖² in B is −(10 − 11) − (−4) = 5 > 0, so
// B = 0 is optimal (KKT). Reconciled: (11, 11, 0).
func TestNonNegativeByHand(t *testing.T) {
	h, err := reconcile.NewHierarchy(
		reconcile.Link{Name: "total"},
		reconcile.Link{Name: "A", Parent: "total"},
		reconcile.Link{Name: "B", Parent: "total"},
	)
	if err != nil {
		t.Fatal(err)
	}
	base := mat.NewDense(1, 3, []float64{10, 12, -4})
	plain, err := reconcile.OLS(h, base)
	if err != nil {
		t.Fatal(err)
	}
	if b := plain.At(0, 2); math.Abs(b-(-10.0/3)) > 1e-12 {
		t.Fatalf("unconstrained B = %v, want -10/3 (worked by hand)", b)
	}
	got, err := reconcile.Reconcile(h, base, reconcile.Spec{Method: reconcile.MethodOLS, NonNegative: true})
	if err != nil {
		t.Fatal(err)
	}
	want := mat.NewDense(1, 3, []float64{11, 11, 0})
	if !mat.EqualApprox(got, want, 1e-12) {
		t.Errorf("got %v, want %v", mat.Formatted(got), mat.Formatted(want))
	}
	// Bottom-up: the nearest non-negative bottom level is the clipped one.
	bu, err := reconcile.Reconcile(h, base, reconcile.Spec{Method: reconcile.MethodBottomUp, NonNegative: true})
	if err != nil {
		t.Fatal(err)
	}
	if !mat.EqualApprox(bu, mat.NewDense(1, 3, []float64{12, 12, 0}), 0) {
		t.Errorf("bottom-up non-negative = %v", mat.Formatted(bu))
	}
}

// Property: the non-negative solution satisfies the KKT conditions of
// min (ŷ − S b)' W⁻¹ (ŷ − S b) s.t. b ≥ 0 (Wickramasuriya, Turlach &
// Hyndman 2020; KKT conditions of a convex QP, common practice): b ≥ 0, and with w = S'W⁻¹(ŷ − S b), w_j = 0 where
// b_j > 0 and w_j ≤ 0 where b_j = 0. Q, c are recomputed here with an
// explicit Cholesky of W, independently of the package's solve.
func TestNonNegativeKKT(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	h := testHierarchy(t, 4, 3, 5)
	g, err := reconcile.NewGrouped([]string{"region", "family", "channel"}, [][]string{
		{"east", "paper", "web"}, {"east", "paper", "shop"}, {"east", "cups", "web"},
		{"west", "paper", "shop"}, {"west", "cups", "web"}, {"west", "cups", "shop"}, {"west", "lids", "web"},
	})
	if err != nil {
		t.Fatal(err)
	}
	for _, st := range []struct {
		name string
		s    reconcile.Structure
		rows int
	}{{"hierarchy", h, 40}, {"grouped", g, 200}} {
		resid := randomResiduals(st.s, 60, rng)
		n := st.s.Len()
		// Base forecasts around zero, so many bottom values want to go
		// negative.
		base := mat.NewDense(st.rows, n, nil)
		for i := 0; i < st.rows; i++ {
			for j := 0; j < n; j++ {
				base.Set(i, j, 3*rng.NormFloat64()+float64(j%3))
			}
		}
		for _, tt := range []struct {
			name string
			spec reconcile.Spec
			cov  reconcile.Covariance
		}{
			{"MinT shrink", reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true}, reconcile.Shrinkage},
			{"WLS variance", reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: resid, NonNegative: true}, reconcile.DiagonalVariance},
			{"MinT sample", reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid, NonNegative: true}, reconcile.SampleCovariance},
		} {
			t.Run(st.name+"/"+tt.name, func(t *testing.T) {
				checkKKT(t, st.s, base, resid, tt.spec, tt.cov)
			})
		}
	}
}

func checkKKT(t *testing.T, st reconcile.Structure, base, resid *mat.Dense, spec reconcile.Spec, cov reconcile.Covariance) {
	t.Helper()
	n, m := st.Len(), st.NumBottom()
	rows, _ := base.Dims()
	s := st.Summing()
	got, err := reconcile.Reconcile(st, base, spec)
	if err != nil {
		t.Fatal(err)
	}
	if d := maxIncoherence(st, got); d > 1e-9 {
		t.Errorf("incoherence %.3g", d)
	}
	est, err := reconcile.EstimateCovariance(st, resid, cov)
	if err != nil {
		t.Fatal(err)
	}
	var chol mat.Cholesky
	if !chol.Factorize(est.W) {
		t.Fatal("W not positive definite")
	}
	var winvS mat.Dense
	if err := chol.SolveTo(&winvS, s); err != nil {
		t.Fatal(err)
	}
	active := 0
	for r := 0; r < rows; r++ {
		b := mat.NewVecDense(m, mat.Row(nil, r, got)[n-m:])
		yr := mat.NewVecDense(n, mat.Row(nil, r, base))
		var fit, res, w, c mat.VecDense
		fit.MulVec(s, b)
		res.SubVec(yr, &fit)
		w.MulVec(winvS.T(), &res)
		c.MulVec(winvS.T(), yr)
		scale := 0.0
		for j := 0; j < m; j++ {
			scale = math.Max(scale, math.Abs(c.AtVec(j)))
		}
		tol := 1e-9 * scale
		for j := 0; j < m; j++ {
			bj, wj := b.AtVec(j), w.AtVec(j)
			switch {
			case bj < 0:
				t.Errorf("row %d: b[%d] = %v < 0", r, j, bj)
			case bj > 0 && math.Abs(wj) > tol:
				t.Errorf("row %d: free b[%d] = %v has gradient %v", r, j, bj, wj)
			case bj == 0 && wj > tol:
				t.Errorf("row %d: b[%d] at bound with ascent direction %v", r, j, wj)
			}
			if bj == 0 {
				active++
			}
		}
	}
	if active == 0 {
		t.Fatal("no bound active: the test did not exercise the constraint")
	}
}

// Property: when the unconstrained solution is already non-negative, the
// non-negative one equals it.
func TestNonNegativeInactive(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	h := testHierarchy(t, 3, 3)
	resid := randomResiduals(h, 30, rng)
	base := coherentData(h, 5, 3, rng)
	plain, err := reconcile.MinT(h, base, resid, reconcile.Shrinkage)
	if err != nil {
		t.Fatal(err)
	}
	nn, err := reconcile.Reconcile(h, base, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true})
	if err != nil {
		t.Fatal(err)
	}
	// Equal up to rounding: the non-negative path computes the same
	// projection through S' W⁻¹ S rather than U' W U.
	if !mat.EqualApprox(plain, nn, 1e-9*mat.Norm(plain, math.Inf(1))) {
		t.Errorf("non-negative result differs although the plain one is feasible")
	}
}
