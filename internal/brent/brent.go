package brent

import "math"

// Minimize minimises f on [a, b] by Brent's method (golden-section search
// with parabolic interpolation): R. P. Brent, Algorithms for Minimization
// without Derivatives, Prentice-Hall 1973, chapter 5, procedure "localmin"
// (the algorithm behind R's optimize and netlib's fmin). tol is the
// absolute tolerance on x; the result is within about
// 2(1.5e-8·|x| + tol/3) of a local minimum (Brent's relative term is
// √ε). It evaluates f at most maxIter+1 times and never allocates.
// A NaN value of f counts as +Inf.
func Minimize(f func(float64) float64, a, b, tol float64, maxIter int) (xmin, fmin float64) {
	const (
		cgold = 0.3819660112501051 // (3 − √5)/2
		eps   = 1.4901161193847656e-08
	)
	x := a + cgold*(b-a)
	w, v := x, x
	fx := f(x)
	if math.IsNaN(fx) {
		fx = math.Inf(1)
	}
	fw, fv := fx, fx
	var d, e float64
	for range maxIter {
		xm := 0.5 * (a + b)
		tol1 := eps*math.Abs(x) + tol/3
		tol2 := 2 * tol1
		if math.Abs(x-xm) <= tol2-0.5*(b-a) {
			break
		}
		golden := true
		if math.Abs(e) > tol1 {
			// Fit a parabola through x, w, v.
			r := (x - w) * (fx - fv)
			q := (x - v) * (fx - fw)
			p := (x-v)*q - (x-w)*r
			q = 2 * (q - r)
			if q > 0 {
				p = -p
			} else {
				q = -q
			}
			r, e = e, d
			if math.Abs(p) < math.Abs(0.5*q*r) && p > q*(a-x) && p < q*(b-x) {
				d = p / q
				u := x + d
				if u-a < tol2 || b-u < tol2 {
					d = math.Copysign(tol1, xm-x)
				}
				golden = false
			}
		}
		if golden {
			if x >= xm {
				e = a - x
			} else {
				e = b - x
			}
			d = cgold * e
		}
		u := x + d
		if math.Abs(d) < tol1 {
			u = x + math.Copysign(tol1, d)
		}
		fu := f(u)
		if math.IsNaN(fu) {
			fu = math.Inf(1)
		}
		if fu <= fx {
			if u >= x {
				a = x
			} else {
				b = x
			}
			v, fv = w, fw
			w, fw = x, fx
			x, fx = u, fu
		} else {
			if u < x {
				a = u
			} else {
				b = u
			}
			if fu <= fw || w == x {
				v, fv = w, fw
				w, fw = u, fu
			} else if fu <= fv || v == x || v == w {
				v, fv = u, fu
			}
		}
	}
	return x, fx
}
