package reconcile

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// condLimit is the largest condition number (1-norm estimate) accepted for
// the equilibrated covariance and for S' W⁻¹ S. Beyond it the solve would
// lose more than about 12 of the 16 significant digits.
const condLimit = 1e12

// glsMap holds the generalised-least-squares reconciliation of one
// structure under one weight matrix W:
//
//	x = W⁻¹ S (n × m),  q = S' W⁻¹ S (m × m),  g = q⁻¹ x' (m × n),
//
// so that the reconciled bottom series are b = g ŷ and the reconciled
// forecasts S b (the projection of Hyndman et al. 2011 and Wickramasuriya
// et al. 2019). x and q also define the non-negative problem.
type glsMap struct {
	g *mat.Dense
	x *mat.Dense
	q *mat.SymDense
}

// newGLSMap solves for g without forming W⁻¹. Exactly one of diag
// (the diagonal of a diagonal W) and full is non-nil.
func newGLSMap(c *core, diag []float64, full mat.Symmetric, what string) (*glsMap, error) {
	n, m := c.n(), c.m
	x := mat.NewDense(n, m, nil)
	if diag != nil {
		for i := 0; i < n; i++ {
			if !(diag[i] > 0) || math.IsInf(diag[i], 0) {
				return nil, fmt.Errorf("reconcile: %w: %s weight of node %q is %v, need a positive finite value", ErrSingular, what, c.names[i], diag[i])
			}
			for _, j := range c.bottoms[i] {
				x.Set(i, j, 1/diag[i])
			}
		}
	} else {
		// Equilibrate: W = D R D with D = diag(√W_ii), factorise the
		// correlation-scale matrix R, so the singularity test does not
		// depend on the units of the series.
		d := make([]float64, n)
		for i := range d {
			v := full.At(i, i)
			if !(v > 0) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("reconcile: %w: %s: variance of node %q is %v", ErrSingular, what, c.names[i], v)
			}
			d[i] = math.Sqrt(v)
		}
		r := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			for j := i; j < n; j++ {
				r.SetSym(i, j, full.At(i, j)/(d[i]*d[j]))
			}
		}
		var chol mat.Cholesky
		if ok := chol.Factorize(r); !ok || chol.Cond() > condLimit {
			return nil, fmt.Errorf("reconcile: %w: the %s covariance is singular or nearly so (use the shrinkage estimator)", ErrSingular, what)
		}
		y := mat.NewDense(n, m, nil)
		for i := 0; i < n; i++ {
			for _, j := range c.bottoms[i] {
				y.Set(i, j, 1/d[i])
			}
		}
		if err := chol.SolveTo(x, y); err != nil {
			return nil, fmt.Errorf("reconcile: %w: the %s covariance: %v (use the shrinkage estimator)", ErrSingular, what, err)
		}
		for i := 0; i < n; i++ {
			row := x.RawRowView(i)
			for j := range row {
				row[j] /= d[i]
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
	var cq mat.Cholesky
	if ok := cq.Factorize(q); !ok || cq.Cond() > condLimit {
		return nil, fmt.Errorf("reconcile: %w: S' W⁻¹ S is singular or nearly so for the %s weights", ErrSingular, what)
	}
	g := mat.NewDense(m, n, nil)
	if err := cq.SolveTo(g, x.T()); err != nil {
		return nil, fmt.Errorf("reconcile: %w: S' W⁻¹ S for the %s weights: %v", ErrSingular, what, err)
	}
	return &glsMap{g: g, x: x, q: q}, nil
}
