package arima

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

	// Chandrasekhar recursions (filterChandrasekhar): gain K, direction W
	// of the covariance change and its image T W, each of length r.
	ck, cw []float64
	// steadyFrom is the observation from which the last run of filter
	// used the fixed gain (−1: never).
	steadyFrom int

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
	k.ck = grow(k.ck, r)
	k.cw = grow(k.cw, r)
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
