package smoothing

import "math"

// Gradient of the objective by reverse-mode (adjoint) differentiation of
// the recursion: one forward pass stores the intermediate values of every
// step, one backward pass propagates the adjoints of the states
// (ℓ, b and the seasonal ring) and accumulates those of α, β, γ, φ. The
// cost is a few objective evaluations whatever the number of
// coordinates. TestGradient checks it against forward-mode
// differentiation and central finite differences.

// adjStep is what the forward pass stores of one step for the backward
// pass: the level and trend before the step (l, b), the level/trend
// forecast L and b^φ (P, damped multiplicative trend only), the seasonal
// state used (sv), the one-step forecast, the response error a = y − ŷ,
// the innovation e and the seasonally adjusted error q.
type adjStep struct{ l, b, L, P, sv, yhat, a, e, q float64 }

// adjWork holds the stored forward pass (the tape) and the adjoint ring.
type adjWork struct {
	tape []adjStep // length n
	lam  []float64 // adjoint of the seasonal ring, length m
	ok   bool      // the tape holds a finite forward pass
	sse  float64   // its sum of squared innovations
	par  Params    // its parameters
}

func newAdjWork(n, m int) *adjWork {
	return &adjWork{tape: make([]adjStep, n), lam: make([]float64, m)}
}

// objectiveGrad returns the objective at x and writes its gradient into
// grad. Outside the model's domain it returns penalty and a zero
// gradient. It does not allocate.
func (p *problem) objectiveGrad(x, grad []float64) float64 {
	v := p.value(x)
	p.gradient(x, grad)
	return v
}

// value returns the objective at x, as objective does, and records the
// forward pass for gradient. It does not allocate.
func (p *problem) value(x []float64) float64 {
	f := p.f
	w := p.aw
	w.ok = false
	p.evals++
	par, l, b, ok := p.decode(x)
	if !ok || (p.bounds != UsualBounds && !admissible(f, par)) ||
		(f.trend.multiplicative() && !(b > 0)) || (f.multiplicativeLevel() && !(l > 0)) {
		return penalty
	}
	alpha, beta, gamma, phi := par.Alpha, par.Beta, par.Gamma, par.Phi
	m := f.m
	s := p.ws[:m]
	multErr := f.err == MultiplicativeError
	tape := w.tape
	y := p.y[:len(tape)]
	sse := 0.0
	var logs logSum
	j := 0
	for t := range tape {
		st := &tape[t]
		yt := y[t]
		st.l, st.b = l, b
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
		st.L, st.P, st.sv, st.yhat, st.a, st.e, st.q = L, P, sv, yhat, a, e, q
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
	w.ok, w.sse, w.par = true, sse, par
	return v
}

// gradient writes into grad the gradient of the objective at x from the
// forward pass value recorded there (a zero gradient when value returned
// penalty). It does not allocate.
func (p *problem) gradient(x, grad []float64) {
	for i := range grad {
		grad[i] = 0
	}
	w := p.aw
	if !w.ok {
		return
	}
	f := p.f
	m := f.m
	alpha, beta, gamma, phi := w.par.Alpha, w.par.Beta, w.par.Gamma, w.par.Phi
	multErr := f.err == MultiplicativeError
	n := float64(len(p.y))
	// Backward pass. lamL, lamB: adjoints of the states after step t;
	// w.lam[j]: adjoint of the current value of ring entry j.
	lam := w.lam[:m]
	for i := range lam {
		lam[i] = 0
	}
	lamL, lamB := 0.0, 0.0
	var gA, gB, gG, gP float64
	dsse := n / w.sse
	tape := w.tape
	j := (len(tape) - 1) % m
	for t := len(tape) - 1; t >= 0; t-- {
		st := &tape[t]
		lt, bt, L, P, sv, yhat, a, e, q := st.l, st.b, st.L, st.P, st.sv, st.yhat, st.a, st.e, st.q
		var barL, barSv, barA, barQ, barY, barP, barl, barb float64
		// Seasonal update.
		switch f.season {
		case AdditiveSeason:
			ls := lam[j]
			barSv += ls
			barA += gamma * ls
			gG += a * ls
		case MultiplicativeSeason:
			ls := lam[j]
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
			lam[j] = barSv
		}
		if j--; j < 0 {
			j = m - 1
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
			grad[i+k] = lam[k] - lam[m-1]
		}
	}
}
