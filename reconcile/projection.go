package reconcile

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// condLimit is the largest condition number (1-norm estimate) accepted for
// the equilibrated covariance, for S' W⁻¹ S and for U' W U. Beyond it a
// solve would lose more than about 12 of the 16 significant digits.
const condLimit = 1e12

// Which algebraic form computes the projection; see newGLSMap. Tests
// force each form to check both against the fixtures.
type projectionForm int

const (
	formAuto projectionForm = iota
	formBottom
	formConstraint
)

var forcedForm = formAuto

// glsMap holds the generalised-least-squares reconciliation of one
// structure under one weight matrix W: the reconciled bottom series are
// b = g ŷ and the reconciled forecasts S b, with
//
//	g = (S' W⁻¹ S)⁻¹ S' W⁻¹   (m × n)
//
// (Hyndman et al. 2011; Wickramasuriya et al. 2019). For the
// non-negative problem it also keeps x = W⁻¹ S (n × m) and
// q = S' W⁻¹ S (m × m).
type glsMap struct {
	g *mat.Dense
	x *mat.Dense
	q *mat.SymDense
}

// weights is a validated weight matrix W: either diagonal (diag) or full,
// in which case chol factorises the equilibrated matrix D⁻¹ W D⁻¹ with
// D = diag(d).
type weights struct {
	diag []float64
	full mat.Symmetric
	d    []float64
	chol mat.Cholesky
}

// newWeights checks that W is positive definite and not too close to
// singular. The test is made on the correlation scale so that it does not
// depend on the units of the series.
func newWeights(c *core, diag []float64, full mat.Symmetric, what string) (*weights, error) {
	n := c.n()
	w := &weights{diag: diag, full: full}
	if diag != nil {
		for i := 0; i < n; i++ {
			if !(diag[i] > 0) || math.IsInf(diag[i], 0) {
				return nil, fmt.Errorf("reconcile: %w: %s weight of node %q is %v, need a positive finite value", ErrSingular, what, c.names[i], diag[i])
			}
		}
		return w, nil
	}
	w.d = make([]float64, n)
	for i := range w.d {
		v := full.At(i, i)
		if !(v > 0) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("reconcile: %w: %s: variance of node %q is %v", ErrSingular, what, c.names[i], v)
		}
		w.d[i] = math.Sqrt(v)
	}
	r := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			r.SetSym(i, j, full.At(i, j)/(w.d[i]*w.d[j]))
		}
	}
	if ok := w.chol.Factorize(r); !ok || w.chol.Cond() > condLimit {
		return nil, fmt.Errorf("reconcile: %w: the %s covariance is singular or nearly so (use the shrinkage estimator)", ErrSingular, what)
	}
	return w, nil
}

// newGLSMap computes g in one of two algebraically equal forms, never
// forming an inverse:
//
//   - bottom form: x = W⁻¹ S by Cholesky solves, q = S' x, g = q⁻¹ x'
//     (an m × m system);
//   - constraint form (Wickramasuriya et al. 2019, with
//     U' = [I  −C] for S = [C; I]): g = J − J W U (U' W U)⁻¹ U', where J
//     picks the bottom rows (an (n−m) × (n−m) system).
//
// The constraint form is used when there are no more aggregates than
// bottom series (the usual hierarchy, where it is much cheaper) unless
// the non-negative problem needs x and q.
func newGLSMap(c *core, w *weights, needQ bool, what string) (*glsMap, error) {
	na := c.n() - c.m
	form := forcedForm
	if form == formAuto {
		form = formBottom
		if na <= c.m {
			form = formConstraint
		}
	}
	if needQ || form == formBottom || na == 0 {
		return bottomForm(c, w, what)
	}
	g, err := constraintForm(c, w, what)
	if err != nil {
		return nil, err
	}
	return &glsMap{g: g}, nil
}

func bottomForm(c *core, w *weights, what string) (*glsMap, error) {
	n, m := c.n(), c.m
	x := mat.NewDense(n, m, nil)
	if w.diag != nil {
		for i := 0; i < n; i++ {
			for _, j := range c.bottoms[i] {
				x.Set(i, j, 1/w.diag[i])
			}
		}
	} else {
		// W⁻¹ S = D⁻¹ R⁻¹ D⁻¹ S.
		y := mat.NewDense(n, m, nil)
		for i := 0; i < n; i++ {
			for _, j := range c.bottoms[i] {
				y.Set(i, j, 1/w.d[i])
			}
		}
		if err := w.chol.SolveTo(x, y); err != nil {
			return nil, fmt.Errorf("reconcile: %w: the %s covariance: %v (use the shrinkage estimator)", ErrSingular, what, err)
		}
		for i := 0; i < n; i++ {
			row := x.RawRowView(i)
			for j := range row {
				row[j] /= w.d[i]
			}
		}
	}
	q := mat.NewSymDense(m, nil)
	// q = S' x: row j of S' picks the nodes containing bottom j.
	for a := 0; a < m; a++ {
		for b := a; b < m; b++ {
			var s float64
			for _, i := range c.sCols[a] {
				s += x.At(i, b)
			}
			q.SetSym(a, b, s)
		}
	}
	g, ok := solveSPD(q, x.T())
	if !ok {
		return nil, fmt.Errorf("reconcile: %w: S' W⁻¹ S is singular or nearly so for the %s weights", ErrSingular, what)
	}
	return &glsMap{g: g, x: x, q: q}, nil
}

func constraintForm(c *core, w *weights, what string) (*mat.Dense, error) {
	n, m := c.n(), c.m
	na := n - m
	wAt := func(i, j int) float64 {
		if w.diag != nil {
			if i == j {
				return w.diag[i]
			}
			return 0
		}
		return w.full.At(i, j)
	}
	// wu = W U (n × na): column a is W[:, a] − Σ_{j ∈ B_a} W[:, na+j].
	wu := mat.NewDense(n, na, nil)
	for a := 0; a < na; a++ {
		for i := 0; i < n; i++ {
			v := wAt(i, a)
			for _, j := range c.bottoms[a] {
				v -= wAt(i, na+j)
			}
			wu.Set(i, a, v)
		}
	}
	// uwu = U' W U (na × na): row a of U' is e_a − Σ_{j ∈ B_a} e_{na+j}.
	uwu := mat.NewSymDense(na, nil)
	for a := 0; a < na; a++ {
		for b := a; b < na; b++ {
			v := wu.At(a, b)
			for _, j := range c.bottoms[a] {
				v -= wu.At(na+j, b)
			}
			uwu.SetSym(a, b, v)
		}
	}
	// k = (U' W U)⁻¹ (J W U)'  (na × m).
	k, ok := solveSPD(uwu, wu.Slice(na, n, 0, na).T())
	if !ok {
		return nil, fmt.Errorf("reconcile: %w: U' W U is singular or nearly so for the %s weights (for MinT, use the shrinkage estimator)", ErrSingular, what)
	}
	// g = J − k' U': g[j, a] = −k[a, j] for aggregates a;
	// g[j, na+l] = δ_jl + Σ_{a ∋ l} k[a, j].
	g := mat.NewDense(m, n, nil)
	for j := 0; j < m; j++ {
		g.Set(j, na+j, 1)
	}
	for a := 0; a < na; a++ {
		ka := k.RawRowView(a)
		for j := 0; j < m; j++ {
			g.Set(j, a, -ka[j])
			for _, l := range c.bottoms[a] {
				g.Set(j, na+l, g.At(j, na+l)+ka[j])
			}
		}
	}
	return g, nil
}

// sumRows returns S·g (n × cols) for g with m rows: row i is the sum of
// the rows of g for the bottom series under node i.
func sumRows(c *core, g mat.Matrix) *mat.Dense {
	_, cols := g.Dims()
	gd := mat.DenseCopyOf(g)
	out := mat.NewDense(c.n(), cols, nil)
	for i, bs := range c.bottoms {
		dst := out.RawRowView(i)
		for _, j := range bs {
			floats.Add(dst, gd.RawRowView(j))
		}
	}
	return out
}

// mulSerial returns a·b for dense a (r × k) and b (k × c), row by row on
// the calling goroutine (gonum's general product may start goroutines for
// large matrices; this package starts none).
func mulSerial(a, b *mat.Dense) *mat.Dense {
	r, _ := a.Dims()
	_, c := b.Dims()
	out := mat.NewDense(r, c, nil)
	for i := 0; i < r; i++ {
		dst := out.RawRowView(i)
		for l, v := range a.RawRowView(i) {
			if v != 0 {
				floats.AddScaled(dst, v, b.RawRowView(l))
			}
		}
	}
	return out
}

// solveSPD returns M⁻¹ B for a symmetric positive definite M without
// forming the inverse. It factorises the equilibrated matrix D⁻¹ M D⁻¹,
// D = diag(√M_ii), by Cholesky, so that the singularity test (failure or a
// condition estimate above condLimit) does not depend on the units of the
// series: nodes whose scales differ by many orders of magnitude are fine.
// It reports false when M is singular or nearly so.
func solveSPD(m *mat.SymDense, b mat.Matrix) (*mat.Dense, bool) {
	k := m.SymmetricDim()
	d := make([]float64, k)
	for i := range d {
		v := m.At(i, i)
		if !(v > 0) || math.IsInf(v, 0) {
			return nil, false
		}
		d[i] = math.Sqrt(v)
	}
	r := mat.NewSymDense(k, nil)
	for i := 0; i < k; i++ {
		for j := i; j < k; j++ {
			r.SetSym(i, j, m.At(i, j)/(d[i]*d[j]))
		}
	}
	var ch mat.Cholesky
	if ok := ch.Factorize(r); !ok || ch.Cond() > condLimit {
		return nil, false
	}
	rows, cols := b.Dims()
	y := mat.NewDense(rows, cols, nil)
	for i := 0; i < rows; i++ {
		row := y.RawRowView(i)
		for j := range row {
			row[j] = b.At(i, j) / d[i]
		}
	}
	x := mat.NewDense(rows, cols, nil)
	if err := ch.SolveTo(x, y); err != nil {
		return nil, false
	}
	for i := 0; i < rows; i++ {
		row := x.RawRowView(i)
		for j := range row {
			row[j] /= d[i]
		}
	}
	return x, true
}
