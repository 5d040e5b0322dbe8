package arima

import (
	"math"
)

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
	if k.chandrasekhar(w, resid) {
		// Only the sums are wanted, and the ARMA filter starts from its
		// stationary covariance: the O(r) recursions give them.
		return k.filterChandrasekhar(w, nd)
	}
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
	// steady: the predicted covariance has stopped changing (see
	// steadyTol); same counts the steps whose gain column did not change.
	steady, same := false, 0
	k.steadyFrom = -1
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
			steady, same = false, 0 // a skipped update changes P again
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
			fused = true
			if steady {
				// Fixed gain: only the state moves.
				k.predictStateARMA()
				continue
			}
			// Update and prediction in one pass over pxnew (the
			// filtered covariance itself is needed only at the end).
			k.updatePredictARMA(gain)
			if !noSteadyState {
				// F = Pnew[0] first: while it moves, the column is not
				// compared (the check costs O(1) a step until then).
				tol := steadyTol * Pnew[0]
				d := math.Abs(Pnew[0] - k.mc[0])
				if d <= tol {
					for i, old := range k.mc[1:r] {
						if e := math.Abs(Pnew[i+1] - old); e > d {
							d = e
						}
					}
				}
				if d <= tol {
					same++
					if steady = same > r; steady {
						k.steadyFrom = l
					}
				} else {
					same = 0
				}
			}
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

// chandrasekhar reports whether filter(w, resid) runs the Chandrasekhar
// recursions: only the sums are wanted, the data are complete, and the
// ARMA filter starts from its stationary covariance (no differencing, or
// the exact diffuse prior).
func (k *kalman) chandrasekhar(w, resid []float64) bool {
	return resid == nil && !noChandrasekhar && len(w) > k.nd && (k.nd == 0 || k.exact) && !hasNaN(w)
}

// steadyTol: the predicted covariance counts as converged once its first
// column (the gain P Z and F = Z'P Z) has changed by at most steadyTol·F
// in each of r + 1 consecutive steps. The transition of the ARMA block
// shifts the covariance up and to the left by one row and column a step,
// so a change anywhere in P reaches the first column within r steps: if
// that column stands still for r + 1 steps, so does P (to the
// tolerance), and the filter continues with the fixed gain at O(r) per
// step (Harvey 1989 §3.3 on the steady state; the argument is ours).
const steadyTol = 0x1p-47 // about 7e-15

// noSteadyState turns the switch to the fixed gain off (for the test
// that compares the two).
var noSteadyState bool

// predictStateARMA writes the predicted ARMA state T ax into axnew.
func (k *kalman) predictStateARMA() {
	r := k.r
	phi := k.phir
	a, anew := k.ax, k.axnew
	for i := 0; i < r-1; i++ {
		anew[i] = a[i+1] + phi[i]*a[0]
	}
	anew[r-1] = phi[r-1] * a[0]
}

// hasNaN reports whether w has a missing value.
func hasNaN(w []float64) bool {
	for _, v := range w {
		if math.IsNaN(v) {
			return true
		}
	}
	return false
}

// noChandrasekhar makes filter use the covariance recursions for every
// likelihood evaluation (for the tests that compare the two).
var noChandrasekhar bool

// separateUpdate makes filter run the update and predictARMA separately
// instead of updatePredictARMA (for the test that they agree bit for bit).
var separateUpdate bool
