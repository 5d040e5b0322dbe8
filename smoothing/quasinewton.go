package smoothing

import (
	"context"
	"math"
)

// quasiNewton is a BFGS search (Nocedal & Wright 2006, Algorithm 6.1) with
// a backtracking Armijo line search and the inverse-Hessian scaling of
// their eq. 6.20 before the first update. The update is skipped when the
// curvature condition fails, and the inverse Hessian is reset to the
// identity when the search direction stops being a descent direction.
// Deterministic, single-goroutine; the workspace is reused across calls.
type quasiNewton struct {
	h                         []float64 // inverse Hessian, d × d
	g, gn, dir, xn, s, yv, hy []float64
}

func newQuasiNewton(d int) *quasiNewton {
	buf := make([]float64, d*d+7*d)
	q := &quasiNewton{h: buf[: d*d : d*d]}
	buf = buf[d*d:]
	next := func() []float64 { s := buf[:d:d]; buf = buf[d:]; return s }
	q.g, q.gn, q.dir, q.xn, q.s, q.yv, q.hy = next(), next(), next(), next(), next(), next(), next()
	return q
}

func (q *quasiNewton) resetH() {
	d := len(q.g)
	for i := range q.h {
		q.h[i] = 0
	}
	for i := 0; i < d; i++ {
		q.h[i*d+i] = 1
	}
}

// minimize runs BFGS on fg from x (overwritten with the best point) and
// returns the best value and whether it converged (relative decrease below
// ftol on two successive iterations, or a vanishing gradient).
func (q *quasiNewton) minimize(ctx context.Context, fg func(x, g []float64) float64, x []float64, ftol float64, maxIter int) (float64, bool, error) {
	d := len(x)
	f := fg(x, q.g)
	if f >= penalty {
		return f, false, nil
	}
	q.resetH()
	first := true
	small := 0
	for iter := 0; iter < maxIter; iter++ {
		if iter%16 == 0 {
			if err := ctx.Err(); err != nil {
				return 0, false, err
			}
		}
		gmax := 0.0
		for _, v := range q.g {
			gmax = math.Max(gmax, math.Abs(v))
		}
		if gmax <= 1e-10*(1+math.Abs(f)) {
			return f, true, nil
		}
		// dir = −H g
		slope := 0.0
		for i := 0; i < d; i++ {
			v := 0.0
			row := q.h[i*d : (i+1)*d]
			for j, hij := range row {
				v -= hij * q.g[j]
			}
			q.dir[i] = v
			slope += v * q.g[i]
		}
		if !(slope < 0) {
			q.resetH()
			first = true
			slope = 0
			for i := range q.dir {
				q.dir[i] = -q.g[i]
				slope -= q.g[i] * q.g[i]
			}
		}
		t := 1.0
		if first {
			t = math.Min(1, 1/gmax)
		}
		var fn float64
		accepted := false
		for ls := 0; ls < 50; ls++ {
			for i := range x {
				q.xn[i] = x[i] + t*q.dir[i]
			}
			fn = fg(q.xn, q.gn)
			if fn <= f+1e-4*t*slope {
				accepted = true
				break
			}
			t *= 0.5
		}
		if !accepted {
			if first {
				return f, false, nil
			}
			q.resetH()
			first = true
			continue
		}
		sy, yy := 0.0, 0.0
		for i := range x {
			q.s[i] = q.xn[i] - x[i]
			q.yv[i] = q.gn[i] - q.g[i]
			sy += q.s[i] * q.yv[i]
			yy += q.yv[i] * q.yv[i]
		}
		dec := f - fn
		copy(x, q.xn)
		copy(q.g, q.gn)
		f = fn
		if dec <= ftol*(math.Abs(f)+ftol) {
			if small++; small >= 2 {
				return f, true, nil
			}
		} else {
			small = 0
		}
		if sy <= 1e-12*math.Sqrt(yy)*normOf(q.s) || sy <= 0 {
			continue
		}
		if first {
			sc := sy / yy
			for i := range q.h {
				q.h[i] *= sc
			}
			first = false
		}
		rho := 1 / sy
		yhy := 0.0
		for i := 0; i < d; i++ {
			v := 0.0
			row := q.h[i*d : (i+1)*d]
			for j, hij := range row {
				v += hij * q.yv[j]
			}
			q.hy[i] = v
			yhy += v * q.yv[i]
		}
		c := rho*rho*yhy + rho
		for i := 0; i < d; i++ {
			row := q.h[i*d : (i+1)*d]
			for j := range row {
				row[j] += -rho*(q.hy[i]*q.s[j]+q.s[i]*q.hy[j]) + c*q.s[i]*q.s[j]
			}
		}
	}
	return f, false, nil
}

func normOf(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x * x
	}
	return math.Sqrt(s)
}
