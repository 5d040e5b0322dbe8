package arima

import (
	"context"
	"fmt"
	"math"
)

// The package minimises with gonum's optimize.BFGS (optim_gonum.go). This
// file keeps the minimiser it used before gonum/optimize could be built
// (the module's go.sum lacked an indirect requirement): a compact
// variable-metric (BFGS) method in the form given by Nash (1990, "Compact
// Numerical Methods for Computers", Algorithm 21), the one behind R's
// optim(method = "BFGS"): inverse-Hessian BFGS update, backtracking line
// search with an Armijo test, restart from the identity when the update
// fails or stalls. It is deterministic, single-goroutine and allocates
// only when it starts. It stays as a cross-check, selected by useGonum =
// false: the reference fixtures are run with both.

// quasiNewton holds the settings and workspace of one minimisation.
type quasiNewton struct {
	relTol  float64 // stop when an accepted step improves f by ≤ relTol·(|f|+relTol)
	maxIter int     // gradient evaluations allowed
	h       float64 // step of the numerical gradient
	forward bool    // forward differences (n evaluations) instead of central (2n)

	n                  int
	b, x, g, c, t, xp  []float64
	best               []float64
	hinv               []float64 // n×n inverse-Hessian approximation, row-major
	funcCount, gradCnt int
}

func newQuasiNewton(n int) *quasiNewton {
	return &quasiNewton{
		relTol: 1e-10, maxIter: 200, h: 1e-7, forward: true, n: n,
		b: make([]float64, n), x: make([]float64, n), g: make([]float64, n),
		c: make([]float64, n), t: make([]float64, n), xp: make([]float64, n), best: make([]float64, n),
		hinv: make([]float64, n*n),
	}
}

// grad writes the finite-difference gradient of f at b (value fb) into
// g: forward differences when q.forward (the setting newQuasiNewton
// makes), central ones otherwise.
func (q *quasiNewton) grad(f func([]float64) float64, b []float64, fb float64, g []float64) {
	copy(q.xp, b)
	if q.forward {
		for i := range b {
			q.xp[i] = b[i] + q.h
			g[i] = (f(q.xp) - fb) / q.h
			q.xp[i] = b[i]
		}
		q.funcCount += len(b)
		return
	}
	for i := range b {
		q.xp[i] = b[i] + q.h
		fp := f(q.xp)
		q.xp[i] = b[i] - q.h
		fm := f(q.xp)
		q.xp[i] = b[i]
		g[i] = (fp - fm) / (2 * q.h)
	}
	q.funcCount += 2 * len(b)
}

// minimize minimises f from x0 and returns the minimiser, the minimum and
// whether the convergence test was met (false when the iteration limit
// was reached). It fails when f is not finite at x0 or ctx is cancelled.
func (q *quasiNewton) minimize(ctx context.Context, f func([]float64) float64, x0 []float64) ([]float64, float64, bool, error) {
	const (
		stepRedn = 0.2
		accTol   = 1e-4
		relTest  = 10.0
	)
	n := q.n
	b, X, g, c, t, B := q.b, q.x, q.g, q.c, q.t, q.hinv
	copy(b, x0)
	fmin := f(b)
	if math.IsNaN(fmin) || math.IsInf(fmin, 0) || fmin >= badObjective {
		return nil, 0, false, fmt.Errorf("objective not finite at the starting values")
	}
	if n == 0 {
		return append([]float64(nil), b...), fmin, true, nil
	}
	copy(q.best, b)
	q.grad(f, b, fmin, g)
	q.gradCnt = 1
	iter := 1
	ilast := q.gradCnt
	converged := false
	for {
		if err := ctx.Err(); err != nil {
			return nil, 0, false, err
		}
		if ilast == q.gradCnt {
			for i := range B {
				B[i] = 0
			}
			for i := 0; i < n; i++ {
				B[i*n+i] = 1
			}
		}
		copy(X, b)
		copy(q.best, b)
		copy(c, g)
		gradProj := 0.0
		for i := 0; i < n; i++ {
			s := 0.0
			for j := 0; j < n; j++ {
				s -= B[i*n+j] * g[j]
			}
			t[i] = s
			gradProj += s * g[i]
		}
		count := 0
		if gradProj < 0 {
			step := 1.0
			accept := false
			var fv float64
			for {
				count = 0
				for i := 0; i < n; i++ {
					b[i] = X[i] + step*t[i]
					if relTest+X[i] == relTest+b[i] {
						count++
					}
				}
				if count < n {
					fv = f(b)
					q.funcCount++
					accept = !math.IsNaN(fv) && !math.IsInf(fv, 0) && fv <= fmin+gradProj*step*accTol
					if !accept {
						step *= stepRedn
					}
				}
				if count == n || accept {
					break
				}
			}
			if count < n && math.Abs(fv-fmin) <= q.relTol*(math.Abs(fmin)+q.relTol) {
				// Accepted, but no longer a meaningful improvement.
				fmin = fv
				count = n
				converged = true
			}
			if count < n {
				fmin = fv
				q.grad(f, b, fv, g)
				q.gradCnt++
				iter++
				d1 := 0.0
				for i := 0; i < n; i++ {
					t[i] *= step
					c[i] = g[i] - c[i]
					d1 += t[i] * c[i]
				}
				if d1 > 0 {
					d2 := 0.0
					for i := 0; i < n; i++ {
						s := 0.0
						for j := 0; j < n; j++ {
							s += B[i*n+j] * c[j]
						}
						X[i] = s
						d2 += s * c[i]
					}
					d2 = 1 + d2/d1
					for i := 0; i < n; i++ {
						for j := 0; j < n; j++ {
							B[i*n+j] += (d2*t[i]*t[j] - X[i]*t[j] - t[i]*X[j]) / d1
						}
					}
				} else {
					ilast = q.gradCnt
				}
			} else if ilast < q.gradCnt {
				// No progress along this direction: restart from the
				// steepest descent before giving up.
				count = 0
				ilast = q.gradCnt
				converged = false
			} else {
				converged = true
			}
		} else {
			count = 0
			if ilast == q.gradCnt {
				count = n
				converged = true
			} else {
				ilast = q.gradCnt
			}
		}
		if iter >= q.maxIter {
			converged = false
			break
		}
		if q.gradCnt-ilast > 2*n {
			ilast = q.gradCnt
		}
		if count == n && ilast == q.gradCnt {
			break
		}
	}
	// b holds the last point tried; the base point X of the final line
	// search is the best one unless b improved on it.
	if fb := f(b); !(fb <= fmin) {
		copy(b, q.best)
	} else {
		fmin = fb
	}
	return append([]float64(nil), b...), fmin, converged, nil
}
