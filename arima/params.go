package arima

import (
	"math"
	"math/cmplx"
	"strconv"

	"gonum.org/v1/gonum/mat"
)

// layout describes the coefficient vector of one model: ar1..arp,
// ma1..maq, sar1..sarP, sma1..smaQ, then the regression coefficients
// (mean, drift, then the regressors in the order given).
type layout struct {
	p, q, sp, sq int
	d, sd, s     int
	mean, drift  bool
	regNames     []string
	names        []string
}

func newLayout(p, d, q, sp, sd, sq, s int, mean, drift bool, regNames []string) *layout {
	l := &layout{p: p, q: q, sp: sp, sq: sq, d: d, sd: sd, s: s, mean: mean, drift: drift, regNames: regNames}
	add := func(prefix string, n int) {
		for i := 1; i <= n; i++ {
			l.names = append(l.names, prefix+strconv.Itoa(i))
		}
	}
	add("ar", p)
	add("ma", q)
	add("sar", sp)
	add("sma", sq)
	if mean {
		l.names = append(l.names, "mean")
	}
	if drift {
		l.names = append(l.names, "drift")
	}
	l.names = append(l.names, regNames...)
	return l
}

func (l *layout) narma() int { return l.p + l.q + l.sp + l.sq }

// index returns the position of a coefficient name, or −1.
func (l *layout) index(name string) int {
	for i, n := range l.names {
		if n == name {
			return i
		}
	}
	return -1
}
func (l *layout) ncoef() int { return len(l.names) }
func (l *layout) nreg() int  { return len(l.names) - l.narma() }

// block offsets
func (l *layout) arOff() int  { return 0 }
func (l *layout) maOff() int  { return l.p }
func (l *layout) sarOff() int { return l.p + l.q }
func (l *layout) smaOff() int { return l.p + l.q + l.sp }

// fullLengths returns the lengths of the multiplied-out AR and MA
// polynomials.
func (l *layout) fullLengths() (int, int) {
	return l.p + l.s*l.sp, l.q + l.s*l.sq
}

// delta returns the coefficients of the differencing polynomial
// (1−B)^d (1−B^s)^D written as y_t = Σ delta_i y_{t−i} + w_t.
func (l *layout) delta() []float64 {
	poly := []float64{1}
	mul := func(lag int) {
		out := make([]float64, len(poly)+lag)
		for i, v := range poly {
			out[i] += v
			out[i+lag] -= v
		}
		poly = out
	}
	for range l.d {
		mul(1)
	}
	for range l.sd {
		mul(l.s)
	}
	out := make([]float64, len(poly)-1)
	for i := range out {
		out[i] = -poly[i+1]
	}
	return out
}

// expand multiplies out the seasonal polynomials of coef into phi and
// theta (lengths from fullLengths), with R's sign conventions: phi enters
// as y_t = Σ phi_i y_{t−i}, theta as e_t + Σ theta_i e_{t−i}.
func (l *layout) expand(coef, phi, theta []float64) {
	s := l.s
	ar := coef[l.arOff() : l.arOff()+l.p]
	ma := coef[l.maOff() : l.maOff()+l.q]
	sar := coef[l.sarOff() : l.sarOff()+l.sp]
	sma := coef[l.smaOff() : l.smaOff()+l.sq]
	clear(phi)
	clear(theta)
	copy(phi, ar)
	copy(theta, ma)
	for j, sv := range sar {
		phi[(j+1)*s-1] += sv
		for i, av := range ar {
			phi[(j+1)*s+i] -= av * sv
		}
	}
	for j, sv := range sma {
		theta[(j+1)*s-1] += sv
		for i, mv := range ma {
			theta[(j+1)*s+i] += mv * sv
		}
	}
}

// pacfToAR maps unconstrained values to the coefficients of a stationary
// AR polynomial: tanh gives partial autocorrelations in (−1, 1), the
// Durbin–Levinson recursion turns them into AR coefficients (Jones 1980;
// Monahan 1984; the map R's arima uses). work must have len(raw) elements;
// dst may alias raw.
func pacfToAR(dst, raw, work []float64) {
	n := len(raw)
	for j := 0; j < n; j++ {
		v := math.Tanh(raw[j])
		dst[j] = v
		work[j] = v
	}
	for j := 1; j < n; j++ {
		a := dst[j]
		for k := 0; k < j; k++ {
			work[k] -= a * dst[j-k-1]
		}
		copy(dst[:j], work[:j])
	}
}

// arToPACF is the inverse of pacfToAR (the backward Durbin–Levinson
// recursion, then atanh). It returns false when phi is not stationary.
func arToPACF(dst, phi []float64) bool {
	n := len(phi)
	work := make([]float64, n)
	copy(dst, phi)
	copy(work, phi)
	for j := n - 1; j > 0; j-- {
		a := dst[j]
		if math.Abs(a) >= 1 {
			return false
		}
		for k := 0; k < j; k++ {
			work[k] = (dst[k] + a*dst[j-k-1]) / (1 - a*a)
		}
		copy(dst[:j], work[:j])
	}
	for j := range dst[:n] {
		if math.Abs(dst[j]) >= 1 {
			return false
		}
		dst[j] = math.Atanh(dst[j])
	}
	return true
}

// polyRoots returns the roots of 1 + c_1 z + ... + c_n z^n (trailing zero
// coefficients dropped), from the eigenvalues of the companion matrix.
func polyRoots(c []float64) []complex128 {
	n := len(c)
	for n > 0 && c[n-1] == 0 {
		n--
	}
	if n == 0 {
		return nil
	}
	// Monic in z: z^n + (c_{n-1}/c_n) z^{n-1} + ... + 1/c_n.
	comp := mat.NewDense(n, n, nil)
	for j := 0; j < n; j++ {
		var coefj float64 // coefficient of z^j
		if j == 0 {
			coefj = 1
		} else {
			coefj = c[j-1]
		}
		comp.Set(0, n-1-j, -coefj/c[n-1])
	}
	for i := 1; i < n; i++ {
		comp.Set(i, i-1, 1)
	}
	var eig mat.Eigen
	if !eig.Factorize(comp, mat.EigenNone) {
		return nil
	}
	return eig.Values(nil)
}

// arStationary reports whether 1 − Σ phi_i z^i has all roots outside the
// unit circle.
func arStationary(phi []float64) bool {
	c := make([]float64, len(phi))
	for i, v := range phi {
		c[i] = -v
	}
	for _, z := range polyRoots(c) {
		if cmplx.Abs(z) <= 1 {
			return false
		}
	}
	return true
}

// maInvert returns the MA coefficients (1 + Σ ma_i B^i) with every root
// inside the unit circle replaced by its reciprocal, so that the
// polynomial is invertible and gives the same autocovariances up to the
// scale of σ² (the standard remedy, as in R's arima).
func maInvert(ma []float64) []float64 {
	q := len(ma)
	q0 := q
	for q0 > 0 && ma[q0-1] == 0 {
		q0--
	}
	if q0 == 0 {
		return append([]float64(nil), ma...)
	}
	roots := polyRoots(ma[:q0])
	inside := false
	for _, z := range roots {
		if cmplx.Abs(z) < 1 {
			inside = true
		}
	}
	if !inside || len(roots) != q0 {
		return append([]float64(nil), ma...)
	}
	// Rebuild the polynomial from the (reflected) roots:
	// Π (1 − z/ρ_i).
	poly := []complex128{1}
	for _, z := range roots {
		if cmplx.Abs(z) < 1 {
			z = 1 / z
		}
		next := make([]complex128, len(poly)+1)
		for i, v := range poly {
			next[i] += v
			next[i+1] -= v / z
		}
		poly = next
	}
	out := make([]float64, q)
	for i := 1; i <= q0; i++ {
		out[i-1] = real(poly[i])
	}
	return out
}
