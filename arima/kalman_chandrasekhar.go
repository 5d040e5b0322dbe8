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
	phi := k.phir[:r]
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
			for i := 0; i < r-1; i++ {
				a[i] = a[i+1] + phi[i]*a0 + K[i]*g
			}
			a[r-1] = phi[r-1]*a0 + K[r-1]*g
			continue
		}
		// One pass: a ← T a + K v/F, then with T W (element by element,
		// each reading the old elements i and i+1 before they are
		// overwritten) W ← T W − K (Z'W)/F and K ← K + T W M (Z'W).
		zw := W[0]
		mz := M * zw
		Fn := F + zw*mz
		c := zw / F
		big := 0.0
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
			if wi > big {
				big = wi
			} else if -wi > big {
				big = -wi
			}
		}
		M -= mz * mz / Fn
		F = Fn
		if b := big * big * math.Abs(M); b < 1e-300 || b <= 0x1p-60*F {
			steady = true
		}
	}
	res.sumlog += math.Log(prod)
	return res
}
