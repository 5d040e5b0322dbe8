package arima

import (
	"math"
)

// init sets the initial state (zero) and covariance: the stationary
// covariance of the ARMA block and kappa on the diagonal of the
// differencing block. The predicted covariance of the first observation is
// written to pnew. It returns false when the AR part is not stationary.
func (k *kalman) init() bool { return k.initFor(false) }

// initFor is init; with firstColumn only the first column of Q0 is
// computed (all that filterChandrasekhar reads).
func (k *kalman) initFor(firstColumn bool) bool {
	clear(k.a)
	if firstColumn {
		// Only the first column of Q0 is read (filterChandrasekhar).
		clear(k.pnew[:k.r])
	} else {
		clear(k.pnew)
	}
	if !k.stationaryCov(firstColumn) {
		return false
	}
	if firstColumn {
		return true
	}
	rd := k.rd
	if k.exact {
		clear(k.pinfNew)
		for i := k.r; i < rd; i++ {
			k.pinfNew[i+rd*i] = 1
		}
		return true
	}
	for i := k.r; i < rd; i++ {
		k.pnew[i+rd*i] = kappa
	}
	return true
}

// stationaryCov writes into the top-left r×r block of pnew the stationary
// covariance Q0 of the ARMA state (σ² = 1), the solution of
// Q0 = T Q0 T' + R R'. Its first row is found from the autocovariances
// γ(0..r) and ψ-weights of the ARMA process; the remaining elements follow
// from the equation itself, element by element from the bottom-right
// corner (Q0[i][j] = φ_i φ_j Q0[0][0] + φ_i Q0[0][j+1] + φ_j Q0[0][i+1] +
// Q0[i+1][j+1] + R_i R_j). The autocovariances solve the (p+1)-equation
// linear system of Brockwell & Davis (1991, §3.3). It returns false when
// that system is singular or the result not finite (AR part not
// stationary).
func (k *kalman) stationaryCov(firstColumn bool) bool {
	p, r, rd := k.p, k.r, k.rd
	phi, theta := k.phi, k.theta
	th := func(j int) float64 { // θ_j with θ_0 = 1
		if j == 0 {
			return 1
		}
		if j-1 < len(theta) {
			return theta[j-1]
		}
		return 0
	}
	ph := func(j int) float64 { // φ_j, 1-based, 0 beyond p
		if j >= 1 && j <= p {
			return phi[j-1]
		}
		return 0
	}
	// The loops below run over the non-zero coefficients only (phiIdx,
	// rIdx): seasonal polynomials are sparse. rv = (1, θ_1, …) holds θ_j
	// with θ_0 = 1, phir holds φ_{i+1} at i.
	phir, phiIdx, rv, rIdx := k.phir, k.phiIdx, k.rv, k.rIdx
	// ψ-weights ψ_0..ψ_r.
	psi := k.psi
	for j := 0; j <= r; j++ {
		v := 0.0
		if j < r {
			v = rv[j]
		}
		for _, i := range phiIdx {
			if i+1 > j {
				break
			}
			v += phir[i] * psi[j-i-1]
		}
		psi[j] = v
	}
	// c_k = Σ_{j=k}^{q} θ_j ψ_{j−k}.
	c := func(kk int) float64 {
		s := 0.0
		for _, j := range rIdx {
			if j >= kk {
				s += rv[j] * psi[j-kk]
			}
		}
		return s
	}
	gam := k.gam
	if p == 0 {
		for kk := range gam {
			gam[kk] = c(kk)
		}
	} else {
		n := p + 1
		a := k.sys
		clear(a)
		for kk := 0; kk <= p; kk++ {
			a[kk*n+kk] += 1
			for _, i := range phiIdx {
				m := kk - i - 1
				if m < 0 {
					m = -m
				}
				a[kk*n+m] -= phir[i]
			}
			k.rhs[kk] = c(kk)
		}
		if !solveInPlace(a, k.rhs, n) {
			return false
		}
		for kk := 0; kk <= p && kk <= r; kk++ {
			gam[kk] = k.rhs[kk]
		}
		for kk := p + 1; kk < len(gam); kk++ {
			v := c(kk)
			for _, i := range phiIdx {
				v += phir[i] * gam[kk-i-1]
			}
			gam[kk] = v
		}
	}
	P := k.pnew
	// First row: Cov(α₀, α_j) = Σ_{m=j}^{r−1} φ_{m+1} γ(m−j+1) + θ_m ψ_{m−j}.
	for j := 0; j < r; j++ {
		s := 0.0
		for _, m := range phiIdx {
			if m >= j {
				s += phir[m] * gam[m-j+1]
			}
		}
		for _, m := range rIdx {
			if m >= j {
				s += rv[m] * psi[m-j]
			}
		}
		P[0+rd*j] = s
		P[j+rd*0] = s
	}
	if firstColumn {
		for j := 0; j < r; j++ {
			if v := P[j]; math.IsNaN(v) || math.IsInf(v, 0) {
				return false
			}
		}
		return P[0] > 0
	}
	row0 := func(j int) float64 {
		if j >= r {
			return 0
		}
		return P[rd*j]
	}
	p00 := P[0]
	for i := r - 1; i >= 1; i-- {
		for j := r - 1; j >= i; j-- {
			v := ph(i+1)*ph(j+1)*p00 + ph(i+1)*row0(j+1) + ph(j+1)*row0(i+1) + th(i)*th(j)
			if i+1 < r && j+1 < r {
				v += P[i+1+rd*(j+1)]
			}
			P[i+rd*j] = v
			P[j+rd*i] = v
		}
	}
	for i := 0; i < r; i++ {
		for j := 0; j < r; j++ {
			if v := P[i+rd*j]; math.IsNaN(v) || math.IsInf(v, 0) {
				return false
			}
		}
	}
	return P[0] > 0
}

// solveInPlace solves the n×n system a x = b (a row-major) by Gaussian
// elimination with partial pivoting, leaving x in b. It returns false when
// a pivot is zero or the system is numerically singular.
func solveInPlace(a, b []float64, n int) bool {
	for c := 0; c < n; c++ {
		piv, best := c, math.Abs(a[c*n+c])
		for r := c + 1; r < n; r++ {
			if v := math.Abs(a[r*n+c]); v > best {
				piv, best = r, v
			}
		}
		if !(best > 1e-12) {
			return false
		}
		if piv != c {
			for j := 0; j < n; j++ {
				a[c*n+j], a[piv*n+j] = a[piv*n+j], a[c*n+j]
			}
			b[c], b[piv] = b[piv], b[c]
		}
		d := a[c*n+c]
		for r := c + 1; r < n; r++ {
			f := a[r*n+c] / d
			if f == 0 {
				continue
			}
			for j := c; j < n; j++ {
				a[r*n+j] -= f * a[c*n+j]
			}
			b[r] -= f * b[c]
		}
	}
	for c := n - 1; c >= 0; c-- {
		s := b[c]
		for j := c + 1; j < n; j++ {
			s -= a[c*n+j] * b[j]
		}
		b[c] = s / a[c*n+c]
	}
	return true
}
