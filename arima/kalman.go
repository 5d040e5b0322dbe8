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

	// ARMA-only filter (r states) used once the differencing states are
	// known, see filter.
	// px and pxnew have stride r+1 and a zero last row and column, so that
	// the shifted element P[i+1][j+1] needs no bounds test.
	ax, axnew []float64
	px, pxnew []float64
	phir, rv  []float64 // phi and R = (1, theta) padded to r
	phiIdx    []int     // indices of the non-zero phir
	g         []float64 // scratch: P[0][j+1]
	mc        []float64 // scratch: the gain column P Z, with a zero at r

	// Sparse rows of the transition T: row i has entries tIdx[e], tVal[e]
	// for e in [tOff[i], tOff[i+1]). rIdx lists the non-zero elements of R.
	tOff []int
	tIdx []int
	tVal []float64
	rIdx []int
	u    []float64 // scratch column

	// diffuseStart work space: C (r×nd, by column), S (nd×nd), z (nd).
	cm, sm, zv []float64

	// exact selects the exact diffuse initialisation of the differencing
	// states instead of the finite prior κ; pinf/pinfNew are the diffuse
	// parts of the filtered and predicted covariances (Durbin & Koopman
	// 2012, §5.2), minf their product with Z.
	exact         bool
	pinf, pinfNew []float64
	minf          []float64
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
	k.ax = grow(k.ax, r)
	k.axnew = grow(k.axnew, r)
	k.px = grow(k.px, (r+1)*(r+1))
	k.pxnew = grow(k.pxnew, (r+1)*(r+1))
	k.phir = grow(k.phir, r)
	k.u = grow(k.u, rd)
	if cap(k.tOff) < rd+1 {
		k.tOff = make([]int, 0, rd+1)
	}
	if nnz := 2*r + 1 + len(k.deltaIdx) + nd; cap(k.tIdx) < nnz {
		k.tIdx = make([]int, 0, nnz)
		k.tVal = make([]float64, 0, nnz)
	}
	if cap(k.rIdx) < r {
		k.rIdx = make([]int, 0, r)
	}
	if cap(k.phiIdx) < r {
		k.phiIdx = make([]int, 0, r)
	}
	k.rv = grow(k.rv, r)
	k.g = grow(k.g, r)
	k.mc = grow(k.mc, r+1)
	k.gam = grow(k.gam, max(r, nd)+1)
	if k.exact && nd > 0 { // set exact before resize
		k.pinf = grow(k.pinf, rd*rd)
		k.pinfNew = grow(k.pinfNew, rd*rd)
		k.minf = grow(k.minf, rd)
	}
	k.cm = grow(k.cm, r*nd)
	k.sm = grow(k.sm, nd*nd)
	k.zv = grow(k.zv, nd)
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
	clear(k.phir)
	copy(k.phir, phi)
	k.phiIdx = k.phiIdx[:0]
	for i, v := range k.phir {
		if v != 0 {
			k.phiIdx = append(k.phiIdx, i)
		}
	}
	k.rv[0] = 1
	copy(k.rv[1:], k.theta)
	k.rIdx = k.rIdx[:0]
	for i, v := range k.rv {
		if v != 0 {
			k.rIdx = append(k.rIdx, i)
		}
	}
	// Rows of T: ARMA rows i < r hold φ_i in column 0 and 1 in column
	// i+1; the first differencing row holds 1 in column 0 and delta in the
	// differencing columns; the others shift.
	r := k.r
	k.tOff, k.tIdx, k.tVal = k.tOff[:0], k.tIdx[:0], k.tVal[:0]
	for i := 0; i < r; i++ {
		k.tOff = append(k.tOff, len(k.tIdx))
		if i < k.p && k.phi[i] != 0 {
			k.tIdx = append(k.tIdx, 0)
			k.tVal = append(k.tVal, k.phi[i])
		}
		if i+1 < r {
			k.tIdx = append(k.tIdx, i+1)
			k.tVal = append(k.tVal, 1)
		}
	}
	if k.nd > 0 {
		k.tOff = append(k.tOff, len(k.tIdx))
		k.tIdx = append(k.tIdx, 0)
		k.tVal = append(k.tVal, 1)
		for _, i := range k.deltaIdx {
			k.tIdx = append(k.tIdx, r+i)
			k.tVal = append(k.tVal, k.delta[i])
		}
		for i := 1; i < k.nd; i++ {
			k.tOff = append(k.tOff, len(k.tIdx))
			k.tIdx = append(k.tIdx, r+i-1)
			k.tVal = append(k.tVal, 1)
		}
	}
	k.tOff = append(k.tOff, len(k.tIdx))
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
		for kk := range gam {
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
		for kk := p + 1; kk < len(gam); kk++ {
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
// from the filtered covariance pm, using the sparse rows of T (at most
// 1 + #non-zero delta entries each) and computing one triangle of pnew.
func (k *kalman) predict() {
	rd := k.rd
	a, anew := k.a, k.anew
	off, idx, val := k.tOff, k.tIdx, k.tVal
	for i := 0; i < rd; i++ {
		s := 0.0
		for e := off[i]; e < off[i+1]; e++ {
			s += val[e] * a[idx[e]]
		}
		anew[i] = s
	}
	k.predictCov(k.pm, k.pnew, true)
}

// predictCov writes T P T' (+ R R' when addV) into Pnew.
func (k *kalman) predictCov(P, Pnew []float64, addV bool) {
	rd := k.rd
	off, idx, val := k.tOff, k.tIdx, k.tVal
	u := k.u
	for j := 0; j < rd; j++ {
		// u = P t_j
		clear(u)
		for e := off[j]; e < off[j+1]; e++ {
			v := val[e]
			col := P[rd*idx[e] : rd*idx[e]+rd]
			for i, c := range col {
				u[i] += v * c
			}
		}
		for i := j; i < rd; i++ {
			s := 0.0
			for e := off[i]; e < off[i+1]; e++ {
				s += val[e] * u[idx[e]]
			}
			Pnew[i+rd*j] = s
		}
	}
	if addV {
		for _, i := range k.rIdx {
			ri := k.rv[i]
			for _, j := range k.rIdx {
				if j >= i {
					Pnew[j+rd*i] += ri * k.rv[j]
				}
			}
		}
	}
	for j := 0; j < rd; j++ {
		for i := j + 1; i < rd; i++ {
			Pnew[j+rd*i] = Pnew[i+rd*j]
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
//
// Without differencing only the r ARMA states exist. With differencing and
// no missing value, the differencing states hold observed values once the
// first nd observations have been filtered, so their covariance is zero
// from then on (to rounding) and the remaining steps reduce to the filter
// of the r ARMA states on the differenced series, started from the
// filtered ARMA block. filter takes that shortcut, which gives the same
// sums at a fraction of the cost, and rebuilds the full state at the end.
// With differencing and missing values it runs the full filter
// (filterFull) throughout.
func (k *kalman) filter(w, resid []float64) filterResult {
	n, nd := len(w), k.nd
	r, rd := k.r, k.rd
	st := r + 1
	var res filterResult
	start := 0
	clear(k.px)
	clear(k.pxnew)
	if nd > 0 {
		clear(k.pinf)
		fast := n > nd
		for _, v := range w {
			if math.IsNaN(v) {
				fast = false
				break
			}
		}
		if !fast {
			if k.exact {
				return k.filterDiffuse(w, resid)
			}
			return k.filterFull(w, resid)
		}
		if k.exact {
			// The exact diffuse start: the first nd observations only fix
			// the differencing states; the ARMA state at time nd keeps its
			// stationary distribution N(0, Q0), so what follows is the
			// exact likelihood of the differenced series.
			clear(k.ax)
			for j := 0; j < r; j++ {
				for i := 0; i < r; i++ {
					k.px[i+st*j] = k.pnew[i+rd*j]
				}
			}
			if resid != nil {
				for i := 0; i < nd; i++ {
					resid[i] = math.NaN()
				}
			}
		} else if resid != nil || !k.diffuseStart(w) {
			var rs []float64
			if resid != nil {
				rs = resid[:nd]
			}
			res = k.filterFull(w[:nd], rs)
			for j := 0; j < r; j++ {
				k.ax[j] = k.a[j]
				for i := 0; i < r; i++ {
					k.px[i+st*j] = k.pm[i+rd*j]
				}
			}
		}
		start = nd
	} else {
		// The first observation's prediction is the initial state.
		clear(k.axnew)
		for j := 0; j < r; j++ {
			for i := 0; i < r; i++ {
				k.pxnew[i+st*j] = k.pnew[i+rd*j]
			}
		}
	}
	delta := k.delta
	fused := false // pxnew and axnew already hold the prediction for l
	for l := start; l < n; l++ {
		wl := w[l]
		for _, i := range k.deltaIdx {
			wl -= delta[i] * w[l-1-i]
		}
		if l > 0 && !fused {
			k.predictARMA()
		}
		fused = false
		P, Pnew := k.px, k.pxnew
		if math.IsNaN(wl) { // only without differencing
			copy(k.ax, k.axnew)
			copy(P, Pnew)
			if resid != nil {
				resid[l] = math.NaN()
			}
			continue
		}
		v := wl - k.axnew[0]
		gain := Pnew[0]
		if gain < fLimit {
			res.nu++
			res.ssq += v * v / gain
			res.sumlog += math.Log(gain)
		}
		if resid != nil {
			resid[l] = v / math.Sqrt(gain)
		}
		f := v / gain
		for i := 0; i < r; i++ {
			k.ax[i] = k.axnew[i] + Pnew[i]*f
		}
		if l+1 < n && !separateUpdate {
			// Update and prediction in one pass over pxnew (the
			// filtered covariance itself is needed only at the end).
			k.updatePredictARMA(gain)
			fused = true
			continue
		}
		// Only the lower triangle (i ≥ j) of px and pxnew is kept.
		m := Pnew[:r]
		for j := 0; j < r; j++ {
			mj := m[j] / gain
			col := P[st*j+j : st*j+r]
			ncol := Pnew[st*j+j : st*j+r]
			if mj == 0 {
				copy(col, ncol)
				continue
			}
			mm := m[j:r]
			for i, v := range ncol {
				col[i] = v - mm[i]*mj
			}
		}
	}
	// Full state: ARMA block, then the nd values before the last one (the
	// last observation is α₀ + Σ delta_i α_{r+i}).
	clear(k.pm)
	for j := 0; j < r; j++ {
		k.a[j] = k.ax[j]
		for i := j; i < r; i++ {
			v := k.px[i+st*j]
			k.pm[i+rd*j] = v
			k.pm[j+rd*i] = v
		}
	}
	for i := 0; i < nd; i++ {
		k.a[r+i] = w[n-2-i]
	}
	return res
}

// diffuseStart computes in one step what the first nd iterations of the
// full filter compute: the filtered ARMA state after observations
// 1..nd, written to ax and px. None of these observations enters the
// likelihood: each carries a fresh pre-sample value of prior variance κ
// (the last differencing coefficient is ±1), so F_t ≥ κ > 10⁴.
//
// With ψ the nd pre-sample values (prior N(0, κI)) and W = (w_1..w_nd)
// the ARMA values, the observations amount to z = W + Bψ, where
// z_t = y_t − Σ_{i<t} delta_i y_{t−i} and B[t][k] = delta[t+k] (0-based).
// Then x_nd | z ~ N(C S⁻¹ z, Q0 − C S⁻¹ C') with S = Γ_W + κBB' (Γ_W the
// ARMA autocovariances) and C = Cov(x_nd, W), whose column s is
// T^{nd−s} Q0 e₀. The initial covariance must be in pnew (init). It
// returns false when S is not numerically positive definite.
func (k *kalman) diffuseStart(w []float64) bool {
	r, rd, nd := k.r, k.rd, k.nd
	st := r + 1
	phi := k.phir
	C, S, z, gam, delta := k.cm, k.sm, k.zv, k.gam, k.delta
	// C: last column Q0 e₀, then backwards by T.
	col := C[r*(nd-1) : r*nd]
	for i := 0; i < r; i++ {
		col[i] = k.pnew[i]
	}
	for s := nd - 2; s >= 0; s-- {
		prev := C[r*(s+1) : r*(s+2)]
		cur := C[r*s : r*(s+1)]
		v0 := prev[0]
		for i := 0; i < r-1; i++ {
			cur[i] = phi[i]*v0 + prev[i+1]
		}
		cur[r-1] = phi[r-1] * v0
	}
	// S (lower triangle, row-major nd×nd) and z.
	for a := 0; a < nd; a++ {
		for b := 0; b <= a; b++ {
			bb := 0.0
			for kk := 0; a+kk < nd; kk++ {
				bb += delta[a+kk] * delta[b+kk]
			}
			S[a*nd+b] = gam[a-b] + kappa*bb
		}
		v := w[a]
		for i := 1; i <= a; i++ {
			v -= delta[i-1] * w[a-i]
		}
		z[a] = v
	}
	// Cholesky S = L L' in place (lower triangle).
	for j := 0; j < nd; j++ {
		d := S[j*nd+j]
		for kk := 0; kk < j; kk++ {
			d -= S[j*nd+kk] * S[j*nd+kk]
		}
		if !(d > 0) {
			return false
		}
		d = math.Sqrt(d)
		S[j*nd+j] = d
		for i := j + 1; i < nd; i++ {
			v := S[i*nd+j]
			for kk := 0; kk < j; kk++ {
				v -= S[i*nd+kk] * S[j*nd+kk]
			}
			S[i*nd+j] = v / d
		}
	}
	// z ← L⁻¹ z; each row of C (as a vector over s) ← L⁻¹ row.
	forward := func(x []float64, stride int) {
		for i := 0; i < nd; i++ {
			v := x[i*stride]
			for kk := 0; kk < i; kk++ {
				v -= S[i*nd+kk] * x[kk*stride]
			}
			x[i*stride] = v / S[i*nd+i]
		}
	}
	forward(z, 1)
	for i := 0; i < r; i++ {
		forward(C[i:], r)
	}
	// m = X' z and V = Q0 − X'X with X = L⁻¹C'.
	for i := 0; i < r; i++ {
		m := 0.0
		for s := 0; s < nd; s++ {
			m += C[r*s+i] * z[s]
		}
		k.ax[i] = m
		for j := 0; j <= i; j++ {
			v := k.pnew[i+rd*j]
			for s := 0; s < nd; s++ {
				v -= C[r*s+i] * C[r*s+j]
			}
			k.px[i+st*j] = v
			k.px[j+st*i] = v
		}
	}
	return true
}

// predictARMA is predict for the ARMA block alone (states ax, covariance
// px with stride r+1):
// Pnew[i][j] = P[i+1][j+1] + φ_i(φ_j P[0][0] + P[0][j+1]) + φ_j P[0][i+1] + R_i R_j.
// updatePredictARMA replaces the predicted covariance in pxnew by the
// next one, through the update with gain column pxnew[:r] and innovation
// variance gain, and writes the next predicted state into axnew from the
// updated state ax. It computes the same expressions, in the same order,
// as the update in filter followed by predictARMA, in one pass and in
// place: column j of the result needs column j+1 of the old matrix and
// its first column, which is saved first.
func (k *kalman) updatePredictARMA(gain float64) {
	r := k.r
	st := r + 1
	phi := k.phir
	a, anew := k.ax, k.axnew
	for i := 0; i < r-1; i++ {
		anew[i] = a[i+1] + phi[i]*a[0]
	}
	anew[r-1] = phi[r-1] * a[0]
	Pn, rv, g, mc := k.pxnew, k.rv, k.g, k.mc
	copy(mc[:r], Pn[:r])
	mc[r] = 0
	// Updated P[0][0] and P[j+1][0] (zero border for j = r−1).
	m0 := mc[0] / gain
	p0 := Pn[0] - mc[0]*m0
	for j := 0; j < r; j++ {
		if m0 == 0 {
			g[j] = Pn[j+1]
		} else {
			g[j] = Pn[j+1] - mc[j+1]*m0
		}
	}
	for j := 0; j < r; j++ {
		src := Pn[st*(j+1)+j+1 : st*(j+1)+1+r] // predicted column j+1, rows j+1..r
		nr := len(src)
		// Equal lengths, so that the loops below need no bounds checks.
		dst := Pn[st*j+j : st*j+r][:nr]
		ms := mc[j+1 : r+1][:nr]
		mj := mc[j+1] / gain
		rj, pj := rv[j], phi[j]
		cj := pj*p0 + g[j]
		switch {
		case pj != 0:
			rr, ph, gg := rv[j:r][:nr], phi[j:r][:nr], g[j:r][:nr]
			for i, v := range src {
				if mj != 0 {
					v -= ms[i] * mj
				}
				dst[i] = v + ph[i]*cj + pj*gg[i] + rr[i]*rj
			}
			continue
		case mj == 0 && rj == 0:
			copy(dst, src)
		case mj == 0:
			rr := rv[j:r][:nr]
			for i, v := range src {
				dst[i] = v + rr[i]*rj
			}
		case rj == 0:
			// The rank-one update, unrolled by four (the hot loop).
			i := 0
			for ; i+4 <= nr; i += 4 {
				s, m, d := src[i:i+4:i+4], ms[i:i+4:i+4], dst[i:i+4:i+4]
				d[0] = s[0] - m[0]*mj
				d[1] = s[1] - m[1]*mj
				d[2] = s[2] - m[2]*mj
				d[3] = s[3] - m[3]*mj
			}
			for ; i < nr; i++ {
				dst[i] = src[i] - ms[i]*mj
			}
		default:
			rr := rv[j:r][:nr]
			i := 0
			for ; i+4 <= nr; i += 4 {
				s, m, d, q := src[i:i+4:i+4], ms[i:i+4:i+4], dst[i:i+4:i+4], rr[i:i+4:i+4]
				d[0] = (s[0] - m[0]*mj) + q[0]*rj
				d[1] = (s[1] - m[1]*mj) + q[1]*rj
				d[2] = (s[2] - m[2]*mj) + q[2]*rj
				d[3] = (s[3] - m[3]*mj) + q[3]*rj
			}
			for ; i < nr; i++ {
				dst[i] = (src[i] - ms[i]*mj) + rr[i]*rj
			}
		}
		for _, i := range k.phiIdx {
			if i < j {
				continue
			}
			i -= j
			v := src[i]
			if mj != 0 {
				v -= ms[i] * mj
			}
			dst[i] = v + phi[i+j]*cj + pj*g[i+j] + rv[i+j]*rj
		}
	}
}

func (k *kalman) predictARMA() {
	r, p := k.r, k.p
	st := r + 1
	phi := k.phir
	a, anew := k.ax, k.axnew
	for i := 0; i < r-1; i++ {
		anew[i] = a[i+1] + phi[i]*a[0]
	}
	anew[r-1] = phi[r-1] * a[0]
	P, Pnew, rv, g := k.px, k.pxnew, k.rv, k.g
	p0 := P[0]
	for j := 0; j < r; j++ {
		g[j] = P[j+1] // P[j+1][0] = P[0][j+1]; zero border for j = r−1
	}
	// Lower triangle only: Pnew[i][j], i ≥ j, from P[i+1][j+1] (also
	// lower, zero border row r).
	if p == 0 {
		for j := 0; j < r; j++ {
			src := P[st*(j+1)+j+1 : st*(j+1)+1+r]
			dst := Pnew[st*j+j : st*j+r]
			rj := rv[j]
			if rj == 0 {
				copy(dst, src)
				continue
			}
			rr := rv[j:r]
			for i, v := range src {
				dst[i] = v + rr[i]*rj
			}
		}
		return
	}
	// Seasonal AR polynomials are sparse: in a column j with φ_j = 0 the
	// terms φ_i c_j are added only where φ_i ≠ 0 (the other elements get
	// the same value as in the dense expression, whose zero terms add
	// nothing).
	for j := 0; j < r; j++ {
		src := P[st*(j+1)+j+1 : st*(j+1)+1+r]
		dst := Pnew[st*j+j : st*j+r]
		rr, ph, gg := rv[j:r], phi[j:r], g[j:r]
		rj, pj := rv[j], phi[j]
		cj := pj*p0 + g[j]
		if pj != 0 {
			for i, v := range src {
				dst[i] = v + ph[i]*cj + pj*gg[i] + rr[i]*rj
			}
			continue
		}
		if rj == 0 {
			copy(dst, src)
		} else {
			for i, v := range src {
				dst[i] = v + rr[i]*rj
			}
		}
		for _, i := range k.phiIdx {
			if i >= j {
				i -= j
				dst[i] = src[i] + ph[i]*cj + pj*gg[i] + rr[i]*rj
			}
		}
	}
}

// filterDiffuse is the exact diffuse Kalman filter (Durbin & Koopman
// 2012, §5.2, univariate case with no observation noise): the predicted
// covariance is κ P∞ + P* with κ → ∞; while Z'P∞Z > 0 an observation
// resolves part of the diffuse state and does not enter the likelihood
// (its residual is NaN), afterwards the ordinary filter runs on P*. It is
// used with differencing and missing values; with complete data it gives
// the same value as the differenced-series shortcut in filter.
func (k *kalman) filterDiffuse(w, resid []float64) filterResult {
	var res filterResult
	rd, r := k.rd, k.r
	delta := k.delta
	Pinf, PinfNew, Minf := k.pinf, k.pinfNew, k.minf
	for l, y := range w {
		if l > 0 {
			k.predict()
			k.predictCov(Pinf, PinfNew, false)
		} else {
			copy(k.anew, k.a)
		}
		anew, Pnew := k.anew, k.pnew
		if math.IsNaN(y) {
			copy(k.a, anew)
			copy(k.pm, Pnew)
			copy(Pinf, PinfNew)
			if resid != nil {
				resid[l] = math.NaN()
			}
			continue
		}
		v := y - anew[0]
		for _, i := range k.deltaIdx {
			v -= delta[i] * anew[r+i]
		}
		M := k.m
		for i := 0; i < rd; i++ {
			tm, ti := Pnew[i], PinfNew[i]
			for _, j := range k.deltaIdx {
				tm += Pnew[i+rd*(r+j)] * delta[j]
				ti += PinfNew[i+rd*(r+j)] * delta[j]
			}
			M[i], Minf[i] = tm, ti
		}
		fs, fi := M[0], Minf[0]
		for _, i := range k.deltaIdx {
			fs += delta[i] * M[r+i]
			fi += delta[i] * Minf[r+i]
		}
		P := k.pm
		if fi > 1e-8 {
			// Diffuse step: a += M∞ v/F∞;
			// P∞ −= M∞M∞'/F∞; P* += M∞M∞' F*/F∞² − (M*M∞' + M∞M*')/F∞.
			f := v / fi
			for i := 0; i < rd; i++ {
				k.a[i] = anew[i] + Minf[i]*f
			}
			c := fs / (fi * fi)
			for j := 0; j < rd; j++ {
				for i := j; i < rd; i++ {
					pi := PinfNew[i+rd*j] - Minf[i]*Minf[j]/fi
					ps := Pnew[i+rd*j] + Minf[i]*Minf[j]*c - (M[i]*Minf[j]+Minf[i]*M[j])/fi
					Pinf[i+rd*j], Pinf[j+rd*i] = pi, pi
					P[i+rd*j], P[j+rd*i] = ps, ps
				}
			}
			if resid != nil {
				resid[l] = math.NaN()
			}
			continue
		}
		res.nu++
		res.ssq += v * v / fs
		res.sumlog += math.Log(fs)
		if resid != nil {
			resid[l] = v / math.Sqrt(fs)
		}
		f := v / fs
		for i := 0; i < rd; i++ {
			k.a[i] = anew[i] + M[i]*f
		}
		for j := 0; j < rd; j++ {
			for i := j; i < rd; i++ {
				ps := Pnew[i+rd*j] - M[i]*M[j]/fs
				P[i+rd*j], P[j+rd*i] = ps, ps
				pi := PinfNew[i+rd*j]
				Pinf[i+rd*j], Pinf[j+rd*i] = pi, pi
			}
		}
	}
	return res
}

// diffuseLeft reports whether the last filterDiffuse run ended with a
// diffuse part left (too few observations to fix the differencing
// states). Only filterDiffuse leaves a non-zero pinf.
func (k *kalman) diffuseLeft() bool {
	for _, v := range k.pinf {
		if math.Abs(v) > 1e-8 {
			return true
		}
	}
	return false
}

// filterFull is filter without the shortcut.
func (k *kalman) filterFull(w, resid []float64) filterResult {
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
			for i := j; i < rd; i++ {
				v := ncol[i] - M[i]*mj
				col[i] = v
				P[j+rd*i] = v
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

// separateUpdate makes filter run the update and predictARMA separately
// instead of updatePredictARMA (for the test that they agree bit for bit).
var separateUpdate bool
