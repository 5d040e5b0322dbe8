package arima

import (
	"math"
)

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
