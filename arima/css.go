package arima

import "math"

// cssWork is the workspace of the conditional-sum-of-squares objective.
type cssWork struct {
	w, resid []float64
	phiIdx   []int // non-zero entries of phi and theta
	thetaIdx []int
}

func (c *cssWork) resize(n, p, q int) {
	c.w = grow(c.w, n)
	c.resid = grow(c.resid, n)
	c.phiIdx = make([]int, 0, p)
	c.thetaIdx = make([]int, 0, q)
}

// cssResiduals computes the conditional residuals of the
// regression-adjusted series y under the multiplied-out polynomials phi and
// theta, after d ordinary and sd seasonal (period s) differences, with the
// first ncond residuals set to zero and left out. The MA recursion starts
// from zero residuals before ncond. It returns the sum of squares and the
// number of residuals summed (NaN residuals, from missing values, are
// skipped). The residuals are left in c.resid.
func (c *cssWork) cssResiduals(y, phi, theta []float64, d, sd, s, ncond int) (ssq float64, nu int) {
	n := len(y)
	w := c.w[:n]
	copy(w, y)
	for range d {
		for l := n - 1; l > 0; l-- {
			w[l] -= w[l-1]
		}
	}
	for range sd {
		for l := n - 1; l >= s; l-- {
			w[l] -= w[l-s]
		}
	}
	resid := c.resid[:n]
	for l := 0; l < ncond && l < n; l++ {
		resid[l] = 0
	}
	c.phiIdx, c.thetaIdx = c.phiIdx[:0], c.thetaIdx[:0]
	for j, v := range phi {
		if v != 0 {
			c.phiIdx = append(c.phiIdx, j)
		}
	}
	for j, v := range theta {
		if v != 0 {
			c.thetaIdx = append(c.thetaIdx, j)
		}
	}
	for l := ncond; l < n; l++ {
		tmp := w[l]
		for _, j := range c.phiIdx {
			tmp -= phi[j] * w[l-j-1]
		}
		lim := l - ncond // residuals before ncond count as zero
		for _, j := range c.thetaIdx {
			if j >= lim {
				break
			}
			tmp -= theta[j] * resid[l-j-1]
		}
		resid[l] = tmp
		if !math.IsNaN(tmp) {
			nu++
			ssq += tmp * tmp
		}
	}
	return ssq, nu
}
