package arima

import "math"

// cssWork is the workspace of the conditional-sum-of-squares objective.
type cssWork struct {
	w, resid []float64
}

func (c *cssWork) resize(n int) {
	c.w = grow(c.w, n)
	c.resid = grow(c.resid, n)
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
	p, q := len(phi), len(theta)
	for l := ncond; l < n; l++ {
		tmp := w[l]
		for j := 0; j < p; j++ {
			tmp -= phi[j] * w[l-j-1]
		}
		for j := 0; j < min(l-ncond, q); j++ {
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
