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
	phi, idx := k.phir, k.phiIdx
	var res filterResult
	q := k.pnew // first column of Q0 (stride rd)
	K, W, TW, a := k.ck, k.cw, k.ctw, k.ax
	clear(a)
	// K_1 = T Q0 e₀: (T x)_i = φ_i x₀ + x_{i+1}.
	for i := 0; i < r-1; i++ {
		K[i] = q[i+1]
	}
	K[r-1] = 0
	for _, i := range idx {
		K[i] += phi[i] * q[0]
	}
	F := q[0]
	copy(W, K)
	M := -1 / F
	steady := false
	delta, dIdx := k.delta, k.deltaIdx
	for l := start; l < len(w); l++ {
		wl := w[l]
		for _, i := range dIdx {
			wl -= delta[i] * w[l-1-i]
		}
		v := wl - a[0]
		if F < fLimit {
			res.nu++
			res.ssq += v * v / F
			res.sumlog += math.Log(F)
		}
		// a ← T a + K v/F.
		g := v / F
		a0 := a[0]
		for i := 0; i < r-1; i++ {
			a[i] = a[i+1] + K[i]*g
		}
		a[r-1] = K[r-1] * g
		for _, i := range idx {
			a[i] += phi[i] * a0
		}
		if steady {
			continue
		}
		zw := W[0]
		// TW = T W.
		for i := 0; i < r-1; i++ {
			TW[i] = W[i+1]
		}
		TW[r-1] = 0
		for _, i := range idx {
			TW[i] += phi[i] * zw
		}
		mz := M * zw
		Fn := F + zw*mz
		c := zw / F
		big := 0.0
		for i := range W {
			W[i] = TW[i] - K[i]*c
			K[i] += TW[i] * mz
			big = math.Max(big, math.Abs(W[i]))
		}
		M -= mz * mz / Fn
		F = Fn
		if big*big*math.Abs(M) < 1e-300 || big*big*math.Abs(M) <= 0x1p-60*F {
			steady = true
		}
	}
	return res
}
