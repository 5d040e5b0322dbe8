package smoothing

// This file is compiled only for tests: forward-mode differentiation of
// the recursion, an independent check on the adjoint gradient.

import "math"

// Analytic gradient of the objective, by forward-mode differentiation of
// the recursion: every quantity carries its derivative with respect to
// the optimiser's vector x (smoothing parameters through their periodic
// transforms, initial level and trend, the free initial seasonal states).
// It costs about as much as a dozen objective evaluations for a monthly
// seasonal model; TestGradient uses it as an independent check of the
// adjoint gradient the estimator uses. It does not allocate once the
// workspace is sized.

// gradWork is the workspace of one problem's gradient.
type gradWork struct {
	d                                           int
	gl, gb, gL, gP, gy, ga, ge, gq, glp, gr, gu []float64
	gsse, gslog, gA, gB, gG, gPhi               []float64
	ring                                        []float64 // m × d, row j = d s[j]/dx
	tmp                                         []float64
}

func newGradWork(d, m int) *gradWork {
	w := &gradWork{d: d}
	buf := make([]float64, 17*d+m*d+d)
	next := func() []float64 { s := buf[:d:d]; buf = buf[d:]; return s }
	w.gl, w.gb, w.gL, w.gP, w.gy, w.ga, w.ge, w.gq, w.glp, w.gr, w.gu = next(), next(), next(), next(), next(), next(), next(), next(), next(), next(), next()
	w.gsse, w.gslog, w.gA, w.gB, w.gG, w.gPhi = next(), next(), next(), next(), next(), next()
	w.tmp = next()
	w.ring = buf[: m*d : m*d]
	return w
}

func zero(v []float64) {
	for i := range v {
		v[i] = 0
	}
}

// axpy: dst += a·x.
func axpy(dst []float64, a float64, x []float64) {
	for i, v := range x {
		dst[i] += a * v
	}
}

// objectiveGrad returns the objective at x and writes its gradient into
// grad. Outside the model's domain it returns penalty and a zero
// gradient.
func (p *problem) objectiveGradForward(x, grad []float64) float64 {
	zero(grad)
	w := newGradWork(len(x), p.f.m) // a fresh workspace: this is a test-only cross-check
	d := len(x)
	f := p.f
	par, l, b, ok := p.decode(x)
	if !ok || (p.bounds != UsualBounds && !admissible(f, par)) ||
		(f.trend.multiplicative() && !(b > 0)) || (f.multiplicativeLevel() && !(l > 0)) {
		return penalty
	}
	// Derivatives of the parameters.
	for _, g := range [][]float64{w.gA, w.gB, w.gG, w.gPhi, w.gl, w.gb, w.gsse, w.gslog} {
		zero(g)
	}
	usual := p.bounds != AdmissibleBounds
	i := 0
	var rB, rG float64
	if p.estA {
		hi := boxHi
		if !usual {
			hi = admAlpha
		}
		w.gA[i] = (hi - boxLo) * dsquash(x[i])
		i++
	}
	if p.estB {
		if usual {
			rB = boxLo + (boxHi-boxLo)*squash(x[i])
			copy(w.gB, w.gA)
			for k := range w.gB {
				w.gB[k] *= rB
			}
			w.gB[i] = par.Alpha * (boxHi - boxLo) * dsquash(x[i])
		} else {
			w.gB[i] = (admBeta - boxLo) * dsquash(x[i])
		}
		i++
	}
	if p.estG {
		if usual {
			rG = boxLo + (boxHi-boxLo)*squash(x[i])
			copy(w.gG, w.gA)
			for k := range w.gG {
				w.gG[k] *= -rG
			}
			w.gG[i] = (1 - par.Alpha) * (boxHi - boxLo) * dsquash(x[i])
		} else {
			w.gG[i] = (admGamma - boxLo) * dsquash(x[i])
		}
		i++
	}
	if p.estP {
		w.gPhi[i] = (phiHi - phiLo) * dsquash(x[i])
		i++
	}
	if p.estL {
		w.gl[i] = 1
		i++
	}
	if p.estT {
		w.gb[i] = 1
		i++
	}
	m := f.m
	zero(w.ring)
	if f.season != NoSeason && p.estS {
		for k := 0; k < m-1; k++ {
			w.ring[k*d+i+k] = 1
			w.ring[(m-1)*d+i+k] = -1
		}
	}
	alpha, beta, gamma, phi := par.Alpha, par.Beta, par.Gamma, par.Phi
	s := p.ws
	sse := 0.0
	var logs logSum
	j := 0
	for _, yt := range p.y {
		// Forecast of the level/trend part.
		var L float64
		switch f.trend {
		case NoTrend:
			L = l
			copy(w.gL, w.gl)
		case AdditiveTrend:
			L = l + b
			for k := range w.gL {
				w.gL[k] = w.gl[k] + w.gb[k]
			}
		case DampedTrend:
			L = l + phi*b
			for k := range w.gL {
				w.gL[k] = w.gl[k] + phi*w.gb[k] + b*w.gPhi[k]
			}
		case MultiplicativeTrend:
			L = l * b
			for k := range w.gL {
				w.gL[k] = b*w.gl[k] + l*w.gb[k]
			}
		case DampedMultiplicativeTrend:
			P := math.Pow(b, phi)
			lb := math.Log(b)
			for k := range w.gP {
				w.gP[k] = P * (phi/b*w.gb[k] + lb*w.gPhi[k])
			}
			L = l * P
			for k := range w.gL {
				w.gL[k] = P*w.gl[k] + l*w.gP[k]
			}
		}
		sv := 0.0
		gs := w.ring[j*d : (j+1)*d]
		yhat := L
		switch f.season {
		case NoSeason:
			copy(w.gy, w.gL)
		case AdditiveSeason:
			sv = s[j]
			yhat = L + sv
			for k := range w.gy {
				w.gy[k] = w.gL[k] + gs[k]
			}
		case MultiplicativeSeason:
			sv = s[j]
			yhat = L * sv
			for k := range w.gy {
				w.gy[k] = sv*w.gL[k] + L*gs[k]
			}
		}
		a := yt - yhat
		for k := range w.ga {
			w.ga[k] = -w.gy[k]
		}
		e := a
		if f.err == MultiplicativeError {
			if !(yhat > 0) {
				zero(grad)
				return penalty
			}
			e = a / yhat
			logs.push(yhat)
			for k := range w.ge {
				w.ge[k] = (w.ga[k] - e*w.gy[k]) / yhat
				w.gslog[k] += w.gy[k] / yhat
			}
		} else {
			copy(w.ge, w.ga)
		}
		sse += e * e
		axpy(w.gsse, 2*e, w.ge)
		q := a
		if f.season == MultiplicativeSeason {
			q = a / sv
			for k := range w.gq {
				w.gq[k] = (w.ga[k] - q*gs[k]) / sv
			}
		} else {
			copy(w.gq, w.ga)
		}
		lprev := l
		if f.trend.multiplicative() {
			copy(w.glp, w.gl)
		}
		l = L + alpha*q
		for k := range w.gl {
			w.gl[k] = w.gL[k] + alpha*w.gq[k] + q*w.gA[k]
		}
		switch f.trend {
		case AdditiveTrend:
			b += beta * q
			for k := range w.gb {
				w.gb[k] += beta*w.gq[k] + q*w.gB[k]
			}
		case DampedTrend:
			for k := range w.gb {
				w.gb[k] = phi*w.gb[k] + b*w.gPhi[k] + beta*w.gq[k] + q*w.gB[k]
			}
			b = phi*b + beta*q
		case MultiplicativeTrend, DampedMultiplicativeTrend:
			r := q / lprev
			for k := range w.gr {
				w.gr[k] = (w.gq[k] - r*w.glp[k]) / lprev
			}
			if f.trend == MultiplicativeTrend {
				b += beta * r
				for k := range w.gb {
					w.gb[k] += beta*w.gr[k] + r*w.gB[k]
				}
			} else {
				b = math.Pow(b, phi) + beta*r
				for k := range w.gb {
					w.gb[k] = w.gP[k] + beta*w.gr[k] + r*w.gB[k]
				}
			}
		}
		switch f.season {
		case AdditiveSeason:
			s[j] = sv + gamma*a
			for k := range gs {
				gs[k] += gamma*w.ga[k] + a*w.gG[k]
			}
		case MultiplicativeSeason:
			u := a / L
			for k := range gs {
				gs[k] += gamma*(w.ga[k]-u*w.gL[k])/L + u*w.gG[k]
			}
			s[j] = sv + gamma*u
		}
		if j++; j == m {
			j = 0
		}
	}
	if math.IsNaN(sse) || math.IsInf(sse, 0) || math.IsNaN(l) || math.IsNaN(b) || (f.trend.multiplicative() && !(b > 0)) {
		zero(grad)
		return penalty
	}
	n := float64(len(p.y))
	sse = math.Max(sse, 1e-300)
	v := n*math.Log(sse) + 2*logs.value()
	if math.IsNaN(v) || math.IsInf(v, 0) {
		zero(grad)
		return penalty
	}
	for k := range grad {
		grad[k] = n*w.gsse[k]/sse + 2*w.gslog[k]
	}
	return v
}
