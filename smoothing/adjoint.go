package smoothing

import "math"

// Gradient of the objective by reverse-mode (adjoint) differentiation of
// the recursion: one forward pass stores the intermediate values of every
// step, one backward pass propagates the adjoints of the states
// (ℓ, b and the seasonal ring) and accumulates those of α, β, γ, φ. The
// cost is a few objective evaluations whatever the number of
// coordinates. TestGradient checks it against forward-mode
// differentiation and central finite differences.

// adjWork holds the stored forward pass and the adjoint ring.
type adjWork struct {
	l, b, L, P, sv, yhat, a, e, q []float64 // per step, length n
	lam                           []float64 // adjoint of the seasonal ring, length m
}

func newAdjWork(n, m int) *adjWork {
	buf := make([]float64, 9*n+m)
	next := func(k int) []float64 { s := buf[:k:k]; buf = buf[k:]; return s }
	w := &adjWork{}
	w.l, w.b, w.L, w.P, w.sv, w.yhat, w.a, w.e, w.q = next(n), next(n), next(n), next(n), next(n), next(n), next(n), next(n), next(n)
	w.lam = next(m)
	return w
}

// objectiveGrad returns the objective at x and writes its gradient into
// grad. Outside the model's domain it returns penalty and a zero
// gradient. It does not allocate.

func (p *problem) objectiveGrad(x, grad []float64) float64 {
	for i := range grad {
		grad[i] = 0
	}
	f := p.f
	w := p.aw
	par, l, b, ok := p.decode(x)
	if !ok || (p.bounds != UsualBounds && !admissible(f, par)) ||
		(f.trend.multiplicative() && !(b > 0)) || (f.multiplicativeLevel() && !(l > 0)) {
		return penalty
	}
	alpha, beta, gamma, phi := par.Alpha, par.Beta, par.Gamma, par.Phi
	s := p.ws
	m := f.m
	multErr := f.err == MultiplicativeError
	// Forward pass.
	sse := 0.0
	var logs logSum
	j := 0
	for t, yt := range p.y {
		w.l[t], w.b[t] = l, b
		var L, P float64
		switch f.trend {
		case NoTrend:
			L = l
		case AdditiveTrend:
			L = l + b
		case DampedTrend:
			L = l + phi*b
		case MultiplicativeTrend:
			L = l * b
		case DampedMultiplicativeTrend:
			P = math.Pow(b, phi)
			L = l * P
		}
		sv, yhat := 0.0, L
		switch f.season {
		case AdditiveSeason:
			sv = s[j]
			yhat = L + sv
		case MultiplicativeSeason:
			sv = s[j]
			yhat = L * sv
		}
		a := yt - yhat
		e := a
		if multErr {
			if !(yhat > 0) {
				return penalty
			}
			e = a / yhat
			logs.push(yhat)
		}
		sse += e * e
		q := a
		if f.season == MultiplicativeSeason {
			q = a / sv
		}
		w.L[t], w.P[t], w.sv[t], w.yhat[t], w.a[t], w.e[t], w.q[t] = L, P, sv, yhat, a, e, q
		lprev := l
		l = L + alpha*q
		switch f.trend {
		case AdditiveTrend:
			b += beta * q
		case DampedTrend:
			b = phi*b + beta*q
		case MultiplicativeTrend:
			b += beta * q / lprev
		case DampedMultiplicativeTrend:
			b = P + beta*q/lprev
		}
		switch f.season {
		case AdditiveSeason:
			s[j] = sv + gamma*a
		case MultiplicativeSeason:
			s[j] = sv + gamma*a/L
		}
		if j++; j == m {
			j = 0
		}
	}
	if math.IsNaN(sse) || math.IsInf(sse, 0) || math.IsNaN(l) || math.IsNaN(b) || math.IsInf(l, 0) || math.IsInf(b, 0) || (f.trend.multiplicative() && !(b > 0)) {
		return penalty
	}
	n := float64(len(p.y))
	sse = math.Max(sse, 1e-300)
	v := n*math.Log(sse) + 2*logs.value()
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return penalty
	}
	// Backward pass. lamL, lamB: adjoints of the states after step t;
	// w.lam[j]: adjoint of the current value of ring entry j.
	for i := range w.lam {
		w.lam[i] = 0
	}
	lamL, lamB := 0.0, 0.0
	var gA, gB, gG, gP float64
	dsse := n / sse
	for t := len(p.y) - 1; t >= 0; t-- {
		j := t % m
		lt, bt, L, P, sv, yhat, a, e, q := w.l[t], w.b[t], w.L[t], w.P[t], w.sv[t], w.yhat[t], w.a[t], w.e[t], w.q[t]
		var barL, barSv, barA, barQ, barY, barP, barl, barb float64
		// Seasonal update.
		switch f.season {
		case AdditiveSeason:
			ls := w.lam[j]
			barSv += ls
			barA += gamma * ls
			gG += a * ls
		case MultiplicativeSeason:
			ls := w.lam[j]
			u := a / L
			barSv += ls
			barA += gamma * ls / L
			barL -= gamma * ls * u / L
			gG += u * ls
		}
		// Trend update.
		switch f.trend {
		case AdditiveTrend:
			barb += lamB
			barQ += beta * lamB
			gB += q * lamB
		case DampedTrend:
			barb += phi * lamB
			gP += bt * lamB
			barQ += beta * lamB
			gB += q * lamB
		case MultiplicativeTrend, DampedMultiplicativeTrend:
			r := q / lt
			if f.trend == MultiplicativeTrend {
				barb += lamB
			} else {
				barP += lamB
			}
			rb := beta * lamB
			gB += r * lamB
			barQ += rb / lt
			barl -= rb * r / lt
		}
		// Level update.
		barL += lamL
		barQ += alpha * lamL
		gA += q * lamL
		// q from a.
		if f.season == MultiplicativeSeason {
			barA += barQ / sv
			barSv -= barQ * q / sv
		} else {
			barA += barQ
		}
		// Innovation and likelihood terms.
		de := dsse * 2 * e
		if multErr {
			barA += de / yhat
			barY += -de*e/yhat + 2/yhat
		} else {
			barA += de
		}
		barY -= barA
		// One-step forecast.
		switch f.season {
		case NoSeason:
			barL += barY
		case AdditiveSeason:
			barL += barY
			barSv += barY
		case MultiplicativeSeason:
			barL += barY * sv
			barSv += barY * L
		}
		// Level/trend forecast.
		switch f.trend {
		case NoTrend:
			barl += barL
		case AdditiveTrend:
			barl += barL
			barb += barL
		case DampedTrend:
			barl += barL
			barb += phi * barL
			gP += bt * barL
		case MultiplicativeTrend:
			barl += bt * barL
			barb += lt * barL
		case DampedMultiplicativeTrend:
			barl += P * barL
			barP += lt * barL
			barb += barP * phi * P / bt
			gP += barP * P * math.Log(bt)
		}
		lamL, lamB = barl, barb
		if f.season != NoSeason {
			w.lam[j] = barSv
		}
	}
	// Chain rule to the optimiser's coordinates.
	usual := p.bounds != AdmissibleBounds
	i := 0
	if p.estA {
		hi := boxHi
		if !usual {
			hi = admAlpha
		}
		da := (hi - boxLo) * dsquash(x[i])
		grad[i] = gA * da
		if usual {
			k := i + 1
			if p.estB {
				grad[i] += gB * (boxLo + (boxHi-boxLo)*squash(x[k])) * da
				k++
			}
			if p.estG {
				grad[i] -= gG * (boxLo + (boxHi-boxLo)*squash(x[k])) * da
			}
		}
		i++
	}
	if p.estB {
		if usual {
			grad[i] = gB * alpha * (boxHi - boxLo) * dsquash(x[i])
		} else {
			grad[i] = gB * (admBeta - boxLo) * dsquash(x[i])
		}
		i++
	}
	if p.estG {
		if usual {
			grad[i] = gG * (1 - alpha) * (boxHi - boxLo) * dsquash(x[i])
		} else {
			grad[i] = gG * (admGamma - boxLo) * dsquash(x[i])
		}
		i++
	}
	if p.estP {
		grad[i] = gP * (phiHi - phiLo) * dsquash(x[i])
		i++
	}
	if p.estL {
		grad[i] = lamL
		i++
	}
	if p.estT {
		grad[i] = lamB
		i++
	}
	if p.estS {
		for k := 0; k < m-1; k++ {
			grad[i+k] = w.lam[k] - w.lam[m-1]
		}
	}
	return v
}
