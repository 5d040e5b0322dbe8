package smoothing

import (
	"context"
	"math"
)

// Why not gonum/optimize: gonum.org/v1/gonum/optimize imports
// gonum/stat/distmv, which needs golang.org/x/tools, and the module's
// go.sum does not carry it, so the package cannot be built here without a
// go.mod change. The optimisers are therefore our own: BFGS with an
// adjoint gradient (quasinewton.go, adjoint.go) as the main search, and
// this plain Nelder–Mead simplex search (Nelder & Mead 1965) with the
// dimension-dependent coefficients of Gao & Han (2012), the same choice
// gonum's NelderMead makes, as the fallback. Both are deterministic and
// single-goroutine.

// simplex is the state of one Nelder–Mead search, reused across restarts.
type simplex struct {
	v             [][]float64 // vertices
	f             []float64   // values
	idx           []int
	c, xr, xe, xc []float64
}

func newSimplex(d int) *simplex {
	s := &simplex{v: make([][]float64, d+1), f: make([]float64, d+1), idx: make([]int, d+1),
		c: make([]float64, d), xr: make([]float64, d), xe: make([]float64, d), xc: make([]float64, d)}
	for i := range s.v {
		s.v[i] = make([]float64, d)
	}
	return s
}

// nelderMead minimises fn from x with initial edge lengths steps. It stops
// when the best value has not improved by more than ftol (absolute) +
// ftol·|f| for stall consecutive iterations, when the simplex collapses,
// or after maxEval evaluations. x is overwritten with the best point; the
// best value and whether the search converged are returned.
func (s *simplex) nelderMead(ctx context.Context, fn func([]float64) float64, x []float64, fx float64, steps []float64, ftol float64, maxEval int) (float64, bool, error) {
	d := len(x)
	nf := float64(d)
	refl, exp, con, shr := 1.0, 1+2/nf, 0.75-1/(2*nf), 1-1/nf
	if d == 1 {
		exp, con, shr = 2, 0.5, 0.5
	}
	copy(s.v[0], x)
	s.f[0] = fx
	for i := 0; i < d; i++ {
		copy(s.v[i+1], x)
		s.v[i+1][i] += steps[i]
		s.f[i+1] = fn(s.v[i+1])
	}
	evals := d
	best := math.Inf(1)
	stall := 0
	stallMax := 10 * d
	converged := false
	for iter := 0; ; iter++ {
		if iter%64 == 0 {
			if err := ctx.Err(); err != nil {
				return 0, false, err
			}
		}
		s.order()
		lo, hi := s.idx[0], s.idx[d]
		fl := s.f[lo]
		if fl < best-(ftol+ftol*math.Abs(fl)) {
			best = fl
			stall = 0
		} else if stall++; stall >= stallMax {
			converged = true
			break
		}
		if evals >= maxEval {
			break
		}
		// Spread test (the relative criterion of R's optim Nelder–Mead):
		// the simplex values agree to ftol.
		if s.f[hi]-fl <= ftol*(math.Abs(fl)+ftol) {
			converged = true
			break
		}
		// Centroid of all but the worst.
		for j := range s.c {
			s.c[j] = 0
		}
		for _, i := range s.idx[:d] {
			for j, v := range s.v[i] {
				s.c[j] += v
			}
		}
		for j := range s.c {
			s.c[j] /= nf
		}
		worst := s.v[hi]
		for j := range s.xr {
			s.xr[j] = s.c[j] + refl*(s.c[j]-worst[j])
		}
		fr := fn(s.xr)
		evals++
		second := s.f[s.idx[d-1]]
		switch {
		case fr < fl:
			for j := range s.xe {
				s.xe[j] = s.c[j] + exp*(s.xr[j]-s.c[j])
			}
			fe := fn(s.xe)
			evals++
			if fe < fr {
				copy(worst, s.xe)
				s.f[hi] = fe
			} else {
				copy(worst, s.xr)
				s.f[hi] = fr
			}
		case fr < second:
			copy(worst, s.xr)
			s.f[hi] = fr
		default:
			// Contraction, outside or inside.
			outside := fr < s.f[hi]
			for j := range s.xc {
				if outside {
					s.xc[j] = s.c[j] + con*(s.xr[j]-s.c[j])
				} else {
					s.xc[j] = s.c[j] + con*(worst[j]-s.c[j])
				}
			}
			fc := fn(s.xc)
			evals++
			if (outside && fc <= fr) || (!outside && fc < s.f[hi]) {
				copy(worst, s.xc)
				s.f[hi] = fc
				break
			}
			// Shrink towards the best vertex.
			bv := s.v[lo]
			for _, i := range s.idx[1:] {
				for j := range s.v[i] {
					s.v[i][j] = bv[j] + shr*(s.v[i][j]-bv[j])
				}
				s.f[i] = fn(s.v[i])
				evals++
			}
		}
	}
	s.order()
	copy(x, s.v[s.idx[0]])
	return s.f[s.idx[0]], converged, nil
}

// order sorts idx by vertex value (stable, so ties keep index order and
// the search is deterministic).
func (s *simplex) order() {
	for i := range s.idx {
		s.idx[i] = i
	}
	// Insertion sort: small d, no allocation.
	for i := 1; i < len(s.idx); i++ {
		for k := i; k > 0 && s.f[s.idx[k]] < s.f[s.idx[k-1]]; k-- {
			s.idx[k], s.idx[k-1] = s.idx[k-1], s.idx[k]
		}
	}
}

func (s *simplex) diameter() float64 {
	b := s.v[s.idx[0]]
	d := 0.0
	for _, v := range s.v {
		for j := range v {
			d = math.Max(d, math.Abs(v[j]-b[j]))
		}
	}
	return d
}
