package arima

import "math"

// filterChandrasekhar runs the ARMA filter on the differenced values
// w[l] − Σ delta_i w[l−1−i], l = start..n−1, from the stationary start
// (state 0, covariance Q0 from stationaryCov in pnew), by the Chandrasekhar
// recursions (Morf, Sidhu & Kailath 1974) instead of the Riccati update of
// the covariance. It returns the same sums as the covariance filter, to
// rounding, at O(r) per observation instead of O(r²).
//
// In a time-invariant state space the change of the predicted covariance
// from one step to the next has low rank, ΔP_t = W_t M_t W_t', and the
// gain K_t = T P_t Z and innovation variance F_t = Z'P_t Z follow from it
// without P_t itself:
//
//	F_{t+1} = F_t + (Z'W_t)² M_t
//	K_{t+1} = K_t + T W_t M_t (Z'W_t)
//	M_{t+1} = M_t − M_t² (Z'W_t)² / F_{t+1}
//	W_{t+1} = T W_t − K_t (Z'W_t) / F_t
//
// Started from the stationary covariance Q0 (T Q0 T' + R R' = Q0) the
// first change is rank one: ΔP_1 = −K_1 K_1'/F_1, so W_1 = K_1 and
// M_1 = −1/F_1 are a vector and a scalar (Harvey 1989 §3.4 and Mélard
// 1984, Applied Statistics 33, 104–114, for ARMA models; recalled from
// memory; the signs and time indices above were checked numerically
// against the covariance recursion, and TestChandrasekhar checks the
// likelihood). That start holds without differencing, and with differencing
// under the exact diffuse prior (the ARMA state at time nd keeps its
// stationary distribution), not under the finite prior κ (the first nd
// observations change the ARMA covariance in nd directions), nor with
// missing values (the system is then not time-invariant): filter uses the
// recursions only in the first two cases, with complete data, and only
// when no residuals or final state are wanted (likelihood evaluations).
//
// Once the change has died out (every |W_i|²·|M| below 1e-300, or
// W·M·(Z'W) below the rounding of K and F) the gain is steady and the
// remaining steps only update the state.
func (k *kalman) filterChandrasekhar(w []float64, start int) filterResult {
	r := k.r
	K, W, a := k.ck[:r], k.cw[:r], k.ax[:r]
	phi, phiIdx := k.phir[:r], k.phiIdx
	var res filterResult
	q := k.pnew[:r] // first column of Q0
	clear(a)
	// K_1 = T Q0 e₀: (T x)_i = φ_i x₀ + x_{i+1}.
	for i := 0; i < r-1; i++ {
		K[i] = phi[i]*q[0] + q[i+1]
	}
	K[r-1] = phi[r-1] * q[0]
	F := q[0]
	copy(W, K)
	M := -1 / F
	steady := false
	// The φ terms are skipped stretch by stretch only where the stretches
	// are long (no or few non-zero φ_i in a long state: seasonal moving
	// averages, seasonal AR terms); otherwise one loop over every element
	// costs less.
	sparse := (len(phiIdx)+1)*sparseMinRun <= r
	delta, dIdx := k.delta, k.deltaIdx
	// Σ log F_t is accumulated as the log of a running product, taken
	// when the product leaves [1e-250, 1e250] (F_t < 1e4 in the sum):
	// one logarithm per many observations instead of one each.
	prod := 1.0
	for l := start; l < len(w); l++ {
		wl := w[l]
		for _, i := range dIdx {
			wl -= delta[i] * w[l-1-i]
		}
		v := wl - a[0]
		if F < fLimit {
			res.nu++
			res.ssq += v * v / F
			prod *= F
			if prod > 1e250 || prod < 1e-250 {
				res.sumlog += math.Log(prod)
				prod = 1
			}
		}
		g := v / F
		a0 := a[0]
		if steady {
			// a ← T a + K v/F.
			if sparse {
				stepState(a, K, phi, phiIdx, a0, g)
			} else {
				denseState(a, K, phi, a0, g)
			}
			continue
		}
		// One pass: a ← T a + K v/F, then with T W (element by element,
		// each reading the old elements i and i+1 before they are
		// overwritten) W ← T W − K (Z'W)/F and K ← K + T W M (Z'W).
		zw := W[0]
		mz := M * zw
		Fn := F + zw*mz
		var big2 float64
		if sparse {
			big2 = stepGain(a, W, K, phi, phiIdx, a0, g, zw, zw/F, mz)
		} else {
			big2 = denseGain(a, W, K, phi, a0, g, zw, zw/F, mz)
		}
		M -= mz * mz / Fn
		F = Fn
		if b := big2 * math.Abs(M); b < 1e-300 || b <= 0x1p-60*F {
			steady = true
		}
	}
	res.sumlog += math.Log(prod)
	return res
}

// sparseMinRun: filterChandrasekhar visits only the non-zero φ_i when
// the state has at least sparseMinRun elements per stretch between them
// (the stretches are len(phiIdx)+1). Visiting only the non-zero φ_i
// everywhere cost 10% more instructions on M3 monthly searches (short
// states and dense φ: the per-stretch overhead); with this bound (set by
// judgement, not tuned) BenchmarkSearchM3Monthly takes 3.8% and
// BenchmarkSearchHourly 7.6% fewer instructions than one loop over every
// element (callgrind), with bit-identical results.
const sparseMinRun = 8

// denseState is stepState visiting every φ_i.
func denseState(a, K, phi []float64, a0, g float64) {
	r := len(a)
	K, phi = K[:r], phi[:r]
	for i := 0; i < r-1; i++ {
		a[i] = a[i+1] + phi[i]*a0 + K[i]*g
	}
	a[r-1] = phi[r-1]*a0 + K[r-1]*g
}

// denseGain is stepGain visiting every φ_i.
func denseGain(a, W, K, phi []float64, a0, g, zw, c, mz float64) float64 {
	r := len(a)
	W, K, phi = W[:r], K[:r], phi[:r]
	big2 := 0.0
	for i := 0; i < r; i++ {
		var an, tw float64
		if i+1 < r {
			an, tw = a[i+1], W[i+1]
		}
		ki := K[i]
		a[i] = an + phi[i]*a0 + ki*g
		tw += phi[i] * zw
		wi := tw - ki*c
		W[i] = wi
		K[i] = ki + tw*mz
		if q := wi * wi; q > big2 {
			big2 = q
		}
	}
	return big2
}

// stepState is the state update of filterChandrasekhar with a fixed gain:
// a_i ← a_{i+1} + φ_i a₀ + K_i g (a_r = 0), the terms φ_i a₀ only where
// φ_i ≠ 0 (phiIdx, ascending): seasonal AR polynomials are sparse, and a
// zero term changes no sum.
func stepState(a, K, phi []float64, phiIdx []int, a0, g float64) {
	r := len(a)
	K, phi = K[:r], phi[:r]
	lo := 0
	for _, j := range phiIdx {
		if j >= r-1 {
			break
		}
		segState(a[lo:j+1], K[lo:j], g)
		a[j] = a[j+1] + phi[j]*a0 + K[j]*g
		lo = j + 1
	}
	if lo < r {
		segState(a[lo:r], K[lo:r-1], g)
		if p := phi[r-1]; p != 0 {
			a[r-1] = p*a0 + K[r-1]*g
		} else {
			a[r-1] = K[r-1] * g
		}
	}
}

// segState is stepState on a stretch without φ terms: a_i ← a_{i+1} +
// K_i g for i < len(K), a one longer than K.
func segState(a, K []float64, g float64) {
	n := len(K)
	a = a[:n+1]
	for i := 0; i < n; i++ {
		a[i] = a[i+1] + K[i]*g
	}
}

// stepGain is one step of the Chandrasekhar recursions in
// filterChandrasekhar: with the innovation scaled by g = v/F, the state
// update of stepState, and with T W (element i: W_{i+1} + φ_i (Z'W), zw =
// Z'W) W_i ← (T W)_i − K_i c and K_i ← K_i + (T W)_i mz, c = zw/F,
// mz = M zw, element by element in increasing i (each reads the old
// elements i and i+1 before they are overwritten). It returns the
// largest W_i². As in stepState the φ terms are added only where φ_i ≠ 0.
func stepGain(a, W, K, phi []float64, phiIdx []int, a0, g, zw, c, mz float64) float64 {
	r := len(a)
	W, K, phi = W[:r], K[:r], phi[:r]
	big2 := 0.0
	lo := 0
	for _, j := range phiIdx {
		if j >= r-1 {
			break
		}
		big2 = segGain(a[lo:j+1], W[lo:j+1], K[lo:j], g, c, mz, big2)
		ki, pj := K[j], phi[j]
		a[j] = a[j+1] + pj*a0 + ki*g
		tw := W[j+1] + pj*zw
		wi := tw - ki*c
		W[j] = wi
		K[j] = ki + tw*mz
		if q := wi * wi; q > big2 {
			big2 = q
		}
		lo = j + 1
	}
	if lo < r {
		big2 = segGain(a[lo:r], W[lo:r], K[lo:r-1], g, c, mz, big2)
		// The last element: (T a)_{r−1} = φ_{r−1} a₀, (T W)_{r−1} =
		// φ_{r−1} (Z'W).
		ki, pj := K[r-1], phi[r-1]
		var wi float64
		if pj != 0 {
			a[r-1] = pj*a0 + ki*g
			tw := pj * zw
			wi = tw - ki*c
			K[r-1] = ki + tw*mz
		} else {
			a[r-1] = ki * g
			wi = -ki * c
		}
		W[r-1] = wi
		if q := wi * wi; q > big2 {
			big2 = q
		}
	}
	return big2
}

// segGain is stepGain on a stretch without φ terms (i < len(K); a and W
// one longer than K), returning max(big2, largest W_i² written).
func segGain(a, W, K []float64, g, c, mz, big2 float64) float64 {
	n := len(K)
	a1, w1 := a[1:n+1], W[1:n+1]
	a, W = a[:n], W[:n]
	for i, ki := range K {
		tw := w1[i]
		a[i] = a1[i] + ki*g
		wi := tw - ki*c
		W[i] = wi
		K[i] = ki + tw*mz
		if q := wi * wi; q > big2 {
			big2 = q
		}
	}
	return big2
}
