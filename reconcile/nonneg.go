package reconcile

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// nnSolver solves the non-negative reconciliation problem for one
// structure and weight matrix W:
//
//	minimise (ŷ − S b)' W⁻¹ (ŷ − S b)  subject to b ≥ 0,
//
// which is the bound-constrained quadratic programme
//
//	minimise ½ b' Q b − c' b,  b ≥ 0,  Q = S' W⁻¹ S,  c = S' W⁻¹ ŷ = x' ŷ.
//
// It is solved exactly (up to rounding) by the active-set method of
// Lawson & Hanson (1974, ch. 23) written for the normal equations: Q is
// positive definite, so each passive-set subproblem is a Cholesky solve
// and the method terminates after finitely many steps. The optimum
// satisfies the KKT conditions b ≥ 0, c − Q b ≤ 0 where b = 0, and
// c − Q b = 0 where b > 0.
type nnSolver struct {
	q *mat.SymDense
	x *mat.Dense
	// workspace
	c, b, z, w []float64
	passive    []bool
	idx        []int
}

func newNNSolver(q *mat.SymDense, x *mat.Dense) *nnSolver {
	m := q.SymmetricDim()
	return &nnSolver{
		q: q, x: x,
		c: make([]float64, m), b: make([]float64, m), z: make([]float64, m), w: make([]float64, m),
		passive: make([]bool, m), idx: make([]int, 0, m),
	}
}

// solve writes the non-negative bottom-level solution for base vector y
// into dst (length m).
func (s *nnSolver) solve(dst, y []float64) error {
	m := len(s.c)
	n := len(y)
	var cmax float64
	for j := 0; j < m; j++ {
		var v float64
		for i := 0; i < n; i++ {
			v += s.x.At(i, j) * y[i]
		}
		s.c[j] = v
		cmax = max(cmax, math.Abs(v))
		s.b[j] = 0
		s.passive[j] = false
	}
	if cmax == 0 {
		copy(dst, s.b)
		return nil
	}
	tol := 1e-12 * cmax * float64(m)
	s.gradient()
	maxOuter := 3*m + 10
	for outer := 0; ; outer++ {
		if outer > maxOuter {
			return fmt.Errorf("reconcile: %w after %d steps", ErrNoConvergence, outer)
		}
		// Most violated bound among the active (zero) variables.
		best, bestW := -1, tol
		for j := 0; j < m; j++ {
			if !s.passive[j] && s.w[j] > bestW {
				best, bestW = j, s.w[j]
			}
		}
		if best < 0 {
			break
		}
		s.passive[best] = true
		rejected := false
		for inner := 0; ; inner++ {
			if inner > m+1 {
				return fmt.Errorf("reconcile: %w in an inner loop", ErrNoConvergence)
			}
			if err := s.subproblem(); err != nil {
				return err
			}
			if inner == 0 && !(s.z[best] > 0) {
				// Rounding made the entering variable non-positive: keep
				// it at its bound and stop (its gradient is at the
				// tolerance level).
				s.passive[best] = false
				rejected = true
				break
			}
			blocking, alpha := -1, math.Inf(1)
			for j := 0; j < m; j++ {
				if s.passive[j] && s.z[j] <= 0 {
					if a := s.b[j] / (s.b[j] - s.z[j]); a < alpha {
						blocking, alpha = j, a
					}
				}
			}
			feasible := blocking < 0
			if feasible {
				for j := 0; j < m; j++ {
					s.b[j] = s.z[j]
				}
				break
			}
			for j := 0; j < m; j++ {
				if s.passive[j] {
					s.b[j] += alpha * (s.z[j] - s.b[j])
					if j == blocking || s.b[j] <= 0 {
						s.b[j] = 0
						s.passive[j] = false
					}
				}
			}
		}
		if rejected {
			// b is unchanged, so is the gradient; take the entering
			// variable out of the race (as Lawson & Hanson do by zeroing
			// its gradient component) and look for the next one.
			s.w[best] = 0
			continue
		}
		s.gradient()
	}
	copy(dst, s.b)
	return nil
}

// gradient sets w = c − Q b (the negative gradient).
func (s *nnSolver) gradient() {
	m := len(s.c)
	for j := 0; j < m; j++ {
		v := s.c[j]
		for k := 0; k < m; k++ {
			if s.b[k] != 0 {
				v -= s.q.At(j, k) * s.b[k]
			}
		}
		s.w[j] = v
	}
}

// subproblem solves Q_PP z_P = c_P on the passive set, z = 0 elsewhere.
func (s *nnSolver) subproblem() error {
	s.idx = s.idx[:0]
	for j, p := range s.passive {
		s.z[j] = 0
		if p {
			s.idx = append(s.idx, j)
		}
	}
	p := len(s.idx)
	if p == 0 {
		return nil
	}
	sub := mat.NewSymDense(p, nil)
	rhs := mat.NewVecDense(p, nil)
	for a, ja := range s.idx {
		rhs.SetVec(a, s.c[ja])
		for bb := a; bb < p; bb++ {
			sub.SetSym(a, bb, s.q.At(ja, s.idx[bb]))
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(sub) {
		return fmt.Errorf("reconcile: %w: S' W⁻¹ S restricted to the free bottom series", ErrSingular)
	}
	var sol mat.VecDense
	if err := ch.SolveVecTo(&sol, rhs); err != nil {
		return fmt.Errorf("reconcile: %w: %v", ErrSingular, err)
	}
	for a, ja := range s.idx {
		s.z[ja] = sol.AtVec(a)
	}
	return nil
}
