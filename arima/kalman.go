package arima

import (
	"math"
)

// kappa is the prior variance (in units of σ²) given to the differencing
// states, and fLimit the innovation variance from which an observation is
// left out of the likelihood. Both are the values of R's stats::arima
// (makeARIMA and ARIMA_Like), so that log-likelihoods agree with R's.
const (
	kappa  = 1e6
	fLimit = 1e4
)

// kalman is the state-space form of one ARMA model with differencing, in
// Harvey's (1989) form with the differencing states appended, and the
// workspace of its Kalman filter. It is sized once per fit by resize and
// then reused: filter and forecast do not allocate.
//
// The state has r = max(p, q+1) ARMA elements followed by nd = d + s·D
// differencing elements holding the previous nd values of the undifferenced
// series. The transition puts phi in the first column and ones on the
// super-diagonal of the ARMA block; the first differencing element is the
// observation Z'α = α₀ + Σ delta_i α_{r+i}. Matrices are stored by column
// (element (i, j) at i + rd·j).
type kalman struct {
	r, rd, nd int
	p, q      int       // len(phi); len(theta) after padding to r−1
	phi       []float64 // AR polynomial multiplied out (y_t = Σ phi_i y_{t−i} + ...)
	theta     []float64 // MA polynomial multiplied out, padded with zeros to r−1
	delta     []float64 // differencing: y_t = Σ delta_i y_{t−i} + w_t
	deltaIdx  []int     // indices of the non-zero delta

	a, anew, m []float64 // state, predicted state, P Z
	pm, pnew   []float64 // filtered and predicted covariances
	mm         []float64 // T P

	// Stationary covariance work space.
	gam, psi, sys, rhs []float64
}

// resize prepares k for AR length p, MA length q (both multiplied out)
// and differencing polynomial delta, reusing its memory when possible.
func (k *kalman) resize(p, q int, delta []float64) {
	r := max(p, q+1)
	nd := len(delta)
	rd := r + nd
	k.r, k.rd, k.nd, k.p, k.q = r, rd, nd, p, r-1
	k.phi = grow(k.phi, p)
	k.theta = grow(k.theta, r-1)
	k.delta = append(k.delta[:0], delta...)
	k.deltaIdx = k.deltaIdx[:0]
	for i, v := range delta {
		if v != 0 {
			k.deltaIdx = append(k.deltaIdx, i)
		}
	}
	k.a = grow(k.a, rd)
	k.anew = grow(k.anew, rd)
	k.m = grow(k.m, rd)
	k.pm = grow(k.pm, rd*rd)
	k.pnew = grow(k.pnew, rd*rd)
	k.mm = grow(k.mm, rd*rd)
	k.gam = grow(k.gam, r+1)
	k.psi = grow(k.psi, r+1)
	k.sys = grow(k.sys, (p+1)*(p+1))
	k.rhs = grow(k.rhs, p+1)
}

// grow returns s resliced (or reallocated) to length n, zeroed.
func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		s = make([]float64, n)
	}
	s = s[:n]
	clear(s)
	return s
}

// setARMA copies the multiplied-out polynomials in (theta padded with
// zeros to r−1).
func (k *kalman) setARMA(phi, theta []float64) {
	copy(k.phi, phi)
	clear(k.theta)
	copy(k.theta, theta)
}

// init sets the initial state (zero) and covariance: the stationary
// covariance of the ARMA block and kappa on the diagonal of the
// differencing block. The predicted covariance of the first observation is
// written to pnew. It returns false when the AR part is not stationary.
func (k *kalman) init() bool {
	clear(k.a)
	clear(k.pnew)
	if !k.stationaryCov() {
		return false
	}
	rd := k.rd
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
func (k *kalman) stationaryCov() bool {
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
	q := len(theta)
	// ψ-weights ψ_0..ψ_r.
	psi := k.psi
	for j := 0; j <= r; j++ {
		v := th(j)
		for i := 1; i <= min(j, p); i++ {
			v += phi[i-1] * psi[j-i]
		}
		psi[j] = v
	}
	// c_k = Σ_{j=k}^{q} θ_j ψ_{j−k}.
	c := func(kk int) float64 {
		s := 0.0
		for j := kk; j <= q; j++ {
			s += th(j) * psi[j-kk]
		}
		return s
	}
	gam := k.gam
	if p == 0 {
		for kk := 0; kk <= r; kk++ {
			gam[kk] = c(kk)
		}
	} else {
		n := p + 1
		a := k.sys
		clear(a)
		for kk := 0; kk <= p; kk++ {
			a[kk*n+kk] += 1
			for i := 1; i <= p; i++ {
				m := kk - i
				if m < 0 {
					m = -m
				}
				a[kk*n+m] -= phi[i-1]
			}
			k.rhs[kk] = c(kk)
		}
		if !solveInPlace(a, k.rhs, n) {
			return false
		}
		for kk := 0; kk <= p && kk <= r; kk++ {
			gam[kk] = k.rhs[kk]
		}
		for kk := p + 1; kk <= r; kk++ {
			v := c(kk)
			for i := 1; i <= p; i++ {
				v += phi[i-1] * gam[kk-i]
			}
			gam[kk] = v
		}
	}
	P := k.pnew
	// First row: Cov(α₀, α_j) = Σ_{m=j}^{r−1} φ_{m+1} γ(m−j+1) + θ_m ψ_{m−j}.
	for j := 0; j < r; j++ {
		s := 0.0
		for m := j; m < r; m++ {
			s += ph(m+1)*gam[m-j+1] + th(m)*psi[m-j]
		}
		P[0+rd*j] = s
		P[j+rd*0] = s
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

// predict advances the state one step: anew = T a and pnew = T P T' + R R'
// from the filtered covariance pm.
func (k *kalman) predict() {
	r, rd, p, q, nd := k.r, k.rd, k.p, k.q, k.nd
	phi, theta, delta := k.phi, k.theta, k.delta
	a, anew := k.a, k.anew
	for i := 0; i < r; i++ {
		tmp := 0.0
		if i < r-1 {
			tmp = a[i+1]
		}
		if i < p {
			tmp += phi[i] * a[0]
		}
		anew[i] = tmp
	}
	if nd > 0 {
		for i := r + 1; i < rd; i++ {
			anew[i] = a[i-1]
		}
		tmp := a[0]
		for _, i := range k.deltaIdx {
			tmp += delta[i] * a[r+i]
		}
		anew[r] = tmp
	}
	P, Pnew := k.pm, k.pnew
	if nd == 0 {
		for i := 0; i < r; i++ {
			vi := 1.0
			if i > 0 {
				vi = theta[i-1]
			}
			for j := i; j < r; j++ {
				tmp := vi
				if j > 0 {
					tmp = vi * theta[j-1]
				}
				if i < p && j < p {
					tmp += phi[i] * phi[j] * P[0]
				}
				if i < r-1 && j < r-1 {
					tmp += P[i+1+r*(j+1)]
				}
				if i < p && j < r-1 {
					tmp += phi[i] * P[j+1]
				}
				if j < p && i < r-1 {
					tmp += phi[j] * P[i+1]
				}
				Pnew[i+r*j] = tmp
				Pnew[j+r*i] = tmp
			}
		}
		return
	}
	mm := k.mm
	// mm = T P
	for j := 0; j < rd; j++ {
		col := P[rd*j : rd*j+rd]
		mcol := mm[rd*j : rd*j+rd]
		p0 := col[0]
		for i := 0; i < r-1; i++ {
			tmp := col[i+1]
			if i < p {
				tmp += phi[i] * p0
			}
			mcol[i] = tmp
		}
		if r-1 < p {
			mcol[r-1] = phi[r-1] * p0
		} else {
			mcol[r-1] = 0
		}
		tmp := p0
		for _, kk := range k.deltaIdx {
			tmp += delta[kk] * col[r+kk]
		}
		mcol[r] = tmp
		for i := 1; i < nd; i++ {
			mcol[r+i] = col[r+i-1]
		}
	}
	// Pnew = mm T' (symmetric: fill both halves from rows j ≥ i).
	for j := 0; j < rd; j++ {
		// Pnew[j, i] = Σ_k mm[j, k] T[i, k]
		for i := 0; i < r; i++ {
			tmp := 0.0
			if i < p {
				tmp += phi[i] * mm[j]
			}
			if i < r-1 {
				tmp += mm[rd*(i+1)+j]
			}
			Pnew[j+rd*i] = tmp
		}
		tmp := mm[j]
		for _, kk := range k.deltaIdx {
			tmp += delta[kk] * mm[rd*(r+kk)+j]
		}
		Pnew[j+rd*r] = tmp
		for i := 1; i < nd; i++ {
			Pnew[j+rd*(r+i)] = mm[rd*(r+i-1)+j]
		}
	}
	for i := 0; i <= q; i++ {
		vi := 1.0
		if i > 0 {
			vi = theta[i-1]
		}
		for j := 0; j <= q; j++ {
			vj := 1.0
			if j > 0 {
				vj = theta[j-1]
			}
			Pnew[i+rd*j] += vi * vj
		}
	}
}

// filterResult holds the sums of one run of the filter.
type filterResult struct {
	ssq, sumlog float64
	nu          int
}

// filter runs the Kalman filter over w (NaN = missing) from the initial
// state set by init. When resid is not nil it receives the standardised
// innovations v_t/√F_t (NaN where w_t is missing). On return a and pm hold
// the filtered state and covariance after the last observation.
func (k *kalman) filter(w, resid []float64) filterResult {
	var res filterResult
	rd, r, nd := k.rd, k.r, k.nd
	delta := k.delta
	for l, y := range w {
		if l > 0 {
			k.predict()
		} else {
			copy(k.anew, k.a) // T·0 = 0
		}
		anew, Pnew := k.anew, k.pnew
		if math.IsNaN(y) {
			copy(k.a, anew)
			copy(k.pm, Pnew)
			if resid != nil {
				resid[l] = math.NaN()
			}
			continue
		}
		resid0 := y - anew[0]
		for _, i := range k.deltaIdx {
			resid0 -= delta[i] * anew[r+i]
		}
		M := k.m
		for i := 0; i < rd; i++ {
			tmp := Pnew[i]
			for _, j := range k.deltaIdx {
				tmp += Pnew[i+rd*(r+j)] * delta[j]
			}
			M[i] = tmp
		}
		gain := M[0]
		if nd > 0 {
			gain = Pnew[0]
			for _, i := range k.deltaIdx {
				gain += delta[i] * Pnew[r+i]
			}
			for _, i := range k.deltaIdx {
				gain += delta[i] * M[r+i]
			}
		}
		if gain < fLimit {
			res.nu++
			res.ssq += resid0 * resid0 / gain
			res.sumlog += math.Log(gain)
		}
		if resid != nil {
			resid[l] = resid0 / math.Sqrt(gain)
		}
		f := resid0 / gain
		for i := 0; i < rd; i++ {
			k.a[i] = anew[i] + M[i]*f
		}
		P := k.pm
		for j := 0; j < rd; j++ {
			mj := M[j] / gain
			col := P[rd*j : rd*j+rd]
			ncol := Pnew[rd*j : rd*j+rd]
			for i := 0; i < rd; i++ {
				col[i] = ncol[i] - M[i]*mj
			}
		}
	}
	return res
}

// forecast writes h-step forecasts of the (regression-adjusted) series
// and their variances in units of σ² from the filtered state left by
// filter. It overwrites the filter state.
func (k *kalman) forecast(mean, variance []float64) {
	rd, r := k.rd, k.r
	for l := range mean {
		k.predict()
		copy(k.a, k.anew)
		copy(k.pm, k.pnew)
		fc := k.a[0]
		for _, i := range k.deltaIdx {
			fc += k.delta[i] * k.a[r+i]
		}
		mean[l] = fc
		// Z'PZ with Z = (1, 0.., delta).
		v := 0.0
		for j := 0; j < rd; j++ {
			zj := k.z(j)
			if zj == 0 {
				continue
			}
			for i := 0; i < rd; i++ {
				if zi := k.z(i); zi != 0 {
					v += zi * zj * k.pm[i+rd*j]
				}
			}
		}
		variance[l] = v
	}
}

// z returns element i of the observation vector Z = (1, 0, …, 0, delta).
func (k *kalman) z(i int) float64 {
	if i == 0 {
		return 1
	}
	if i >= k.r {
		return k.delta[i-k.r]
	}
	return 0
}
