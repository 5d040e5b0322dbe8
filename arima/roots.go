package arima

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// unitRootMargin is the modulus below which a root of a fitted AR or MA
// polynomial counts as on the unit circle (Hyndman & Khandakar 2008).
const unitRootMargin = 1.001

// nearUnitRoot returns an error wrapping ErrNearUnitRoot when a root of
// the fitted AR, MA, seasonal AR or seasonal MA polynomial has modulus
// below 1.001 (for a seasonal polynomial in B^s, the corresponding roots
// in B: |z| = |w|^(1/s)).
func nearUnitRoot(f *Fitted) error {
	// The estimates only: Coef would also compute the standard errors
	// (a Hessian), which the screen does not need. AR polynomials are
	// 1 − φ₁z − …, MA ones 1 + θ₁z + ….
	l := f.lay
	neg := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for i, x := range v {
			out[i] = -x
		}
		return out
	}
	ar := neg(f.coef[l.arOff() : l.arOff()+l.p])
	ma := f.coef[l.maOff() : l.maOff()+l.q]
	sar := neg(f.coef[l.sarOff() : l.sarOff()+l.sp])
	sma := f.coef[l.smaOff() : l.smaOff()+l.sq]
	s := max(f.Period(), 1)
	for _, b := range []struct {
		name  string
		coef  []float64
		power int
	}{{"AR", ar, 1}, {"MA", ma, 1}, {"seasonal AR", sar, s}, {"seasonal MA", sma, s}} {
		m := minRootModulus(b.coef)
		if m < math.Pow(unitRootMargin, float64(b.power)) {
			return fmt.Errorf("arima: %w: %s polynomial of %s has a root of modulus %.4f", ErrNearUnitRoot, b.name, f, math.Pow(m, 1/float64(b.power)))
		}
	}
	return nil
}

// minRootModulus returns the smallest modulus of the roots of
// 1 + c₁z + … + c_k z^k (+Inf when the polynomial is constant). The roots
// are the reciprocals of the eigenvalues of the companion matrix of the
// reversed polynomial z^k + c₁z^{k−1} + … + c_k.
func minRootModulus(c []float64) float64 {
	k := len(c)
	for k > 0 && c[k-1] == 0 {
		k--
	}
	if k == 0 {
		return math.Inf(1)
	}
	a := mat.NewDense(k, k, nil)
	for j := 0; j < k; j++ {
		a.Set(0, j, -c[j])
	}
	for i := 1; i < k; i++ {
		a.Set(i, i-1, 1)
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenNone) {
		return 0 // treat as unusable
	}
	maxAbs := 0.0
	for _, v := range eig.Values(nil) {
		maxAbs = math.Max(maxAbs, math.Hypot(real(v), imag(v)))
	}
	if maxAbs == 0 {
		return math.Inf(1)
	}
	return 1 / maxAbs
}
