package arima

import (
	"math"
)

// filterFull is filter without the shortcut.
func (k *kalman) filterFull(w, resid []float64) filterResult {
	var res filterResult
	rd := k.rd
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
		resid0, gain := k.innovation(y)
		M := k.m
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

// innovation returns the innovation y − Z a and its variance Z P Z' for
// the predicted state (k.anew, k.pnew), Z the observation vector of the
// differenced model, and leaves P Z' in k.m. The full filter and the
// refresh share it, so a refreshed fit advances exactly as the fit's own
// filter did.
func (k *kalman) innovation(y float64) (v, gain float64) {
	rd, r, nd := k.rd, k.r, k.nd
	delta, anew, Pnew := k.delta, k.anew, k.pnew
	v = y - anew[0]
	for _, i := range k.deltaIdx {
		v -= delta[i] * anew[r+i]
	}
	M := k.m
	for i := 0; i < rd; i++ {
		tmp := Pnew[i]
		for _, j := range k.deltaIdx {
			tmp += Pnew[i+rd*(r+j)] * delta[j]
		}
		M[i] = tmp
	}
	gain = M[0]
	if nd > 0 {
		gain = Pnew[0]
		for _, i := range k.deltaIdx {
			gain += delta[i] * Pnew[r+i]
		}
		for _, i := range k.deltaIdx {
			gain += delta[i] * M[r+i]
		}
	}
	return v, gain
}
