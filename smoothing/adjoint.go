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
// the innovation e and the seasonally adjusted error q, and (for the
// linear-trend passes) the reciprocals 1/L, 1/sv and 1/ŷ.
type adjStep struct{ l, b, L, P, sv, yhat, a, e, q, iL, isv, iy float64 }

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
	par, l, b, ok := p.decode(x)
	if !ok || (p.bounds != UsualBounds && !admissible(f, par)) ||
		(f.trend.multiplicative() && !(b > 0)) || (f.multiplicativeLevel() && !(l > 0)) {
		return penalty
	}
	var sse, sumlog float64
	switch {
	case f.trend.multiplicative():
		sse, sumlog, l, b, ok = p.forwardGeneral(par, l, b)
	case f.season == MultiplicativeSeason:
		sse, sumlog, l, b, ok = p.forwardLinearMul(par, l, b)
	default:
		sse, sumlog, l, b, ok = p.forwardLinearAdd(par, l, b)
	}
	if !ok || math.IsNaN(sse) || math.IsInf(sse, 0) || math.IsNaN(l) || math.IsNaN(b) || math.IsInf(l, 0) || math.IsInf(b, 0) || (f.trend.multiplicative() && !(b > 0)) {
		return penalty
	}
	n := float64(len(p.y))
	sse = math.Max(sse, 1e-300)
	v := n*math.Log(sse) + 2*sumlog
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return penalty
	}
	w.ok, w.sse, w.par = true, sse, par
	return v
}

// The forward passes run the recursion of form.filter from level l and
// trend b with the seasonal ring p.ws, record the tape and return the sum
// of squared innovations, Σ log ŷ (multiplicative error), the final level
// and trend, and ok = false when ŷ ≤ 0 with multiplicative error.
// forwardGeneral handles every form with the arithmetic of form.filter.
// forwardLinearAdd and forwardLinearMul run the same recursion for the
// forms whose trend is none, additive or damped (written as L = ℓ + φb,
// b ← φb + βq with φ = 1 for an undamped trend and b = β = 0 without a
// trend: the extra terms are exact zeros and ones) with an additive or no
// season (s ≡ 0, γ = 0) and with a multiplicative season, without the
// per-step switches on the form, with the logarithm accumulator in
// registers, and arranged so that fewer operations wait for each other
// from one step to the next (the next L as L + φ²b + (α + φβ)q rather
// than through ℓ and b; q = y/s − L; reciprocals instead of divisions).
// They agree with form.filter to rounding (TestGradient).

func (p *problem) forwardGeneral(par Params, l, b float64) (sse, sumlog, lEnd, bEnd float64, ok bool) {
	f := p.f
	alpha, beta, gamma, phi := par.Alpha, par.Beta, par.Gamma, par.Phi
	m := f.m
	s := p.ws[:m]
	multErr := f.err == MultiplicativeError
	tape := p.aw.tape
	y := p.y[:len(tape)]
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
				return 0, 0, l, b, false
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
	return sse, logs.value(), l, b, true
}

func (p *problem) forwardLinearAdd(par Params, l, b float64) (sse, sumlog, lEnd, bEnd float64, ok bool) {
	alpha, beta, gamma, phi := par.Alpha, par.Beta, par.Gamma, par.Phi
	m := p.f.m
	s := p.ws[:m]
	if p.f.season == NoSeason {
		s[0], gamma = 0, 0
	}
	multErr := p.f.err == MultiplicativeError
	tape := p.aw.tape
	y := p.y[:len(tape)]
	lp, la, le := 1.0, 0.0, 0 // Σ log ŷ (logStep)
	// The next step's L = ℓ + φb, with ℓ = L + αa and b ← φb + βa, is
	// L + φ²b + (α + φβ)a: one multiply-add after a instead of four.
	ab, phi2 := alpha+phi*beta, phi*phi
	L := l + phi*b
	j := 0
	for t := range tape {
		st := &tape[t]
		sv := s[j]
		yhat := L + sv
		a := (y[t] - sv) - L
		e, iy := a, 0.0
		if multErr {
			if !(yhat > 0) {
				return 0, 0, l, b, false
			}
			iy = 1 / yhat
			e = a * iy
			if q := lp * yhat; yhat <= logSumRange && yhat >= 1/logSumRange && q <= logSumRange && q >= 1/logSumRange {
				lp = q
			} else {
				lp, la, le = logStep(lp, la, le, yhat)
			}
		}
		sse += e * e
		st.b, st.a, st.e, st.iy = b, a, e, iy
		l = L + alpha*a
		L = (L + phi2*b) + ab*a
		b = phi*b + beta*a
		s[j] = sv + gamma*a
		if j++; j == m {
			j = 0
		}
	}
	return sse, logValue(lp, la, le), l, b, true
}

func (p *problem) forwardLinearMul(par Params, l, b float64) (sse, sumlog, lEnd, bEnd float64, ok bool) {
	alpha, beta, gamma, phi := par.Alpha, par.Beta, par.Gamma, par.Phi
	m := p.f.m
	s := p.ws[:m]
	multErr := p.f.err == MultiplicativeError
	tape := p.aw.tape
	y := p.y[:len(tape)]
	lp, la, le := 1.0, 0.0, 0 // Σ log ŷ (logStep)
	// q = (y − L·s)/s is computed as y/s − L, whose division does not
	// wait for L, and the next L as in forwardLinearAdd.
	ab, phi2 := alpha+phi*beta, phi*phi
	L := l + phi*b
	j := 0
	for t := range tape {
		st := &tape[t]
		sv := s[j]
		isv := 1 / sv
		r := y[t] * isv
		yhat := L * sv
		q := r - L
		iL := 1 / L
		a := y[t] - yhat
		e := a
		if multErr {
			if !(yhat > 0) {
				return 0, 0, l, b, false
			}
			e = q * iL
			if v := lp * yhat; yhat <= logSumRange && yhat >= 1/logSumRange && v <= logSumRange && v >= 1/logSumRange {
				lp = v
			} else {
				lp, la, le = logStep(lp, la, le, yhat)
			}
		}
		sse += e * e
		st.b, st.L, st.sv, st.a, st.e, st.q, st.iL, st.isv = b, L, sv, a, e, q, iL, isv
		l = L + alpha*q
		s[j] = sv + gamma*a*iL
		L = (L + phi2*b) + ab*q
		b = phi*b + beta*q
		if j++; j == m {
			j = 0
		}
	}
	return sse, logValue(lp, la, le), l, b, true
}

// logStep is logSum.push on the accumulator (prod, add, exp) held in
// the forward passes' registers (prod starts at 1, which multiplies
// exactly): the same arithmetic. The common case, both v and the new
// product within range, is written out in the loops.
func logStep(prod, add float64, exp int, v float64) (float64, float64, int) {
	if v > logSumRange || v < 1/logSumRange {
		return prod, add + math.Log(v), exp
	}
	fr, e := math.Frexp(prod * v)
	return fr, add, exp + e
}

// logValue is logSum.value of the accumulator (prod, add, exp).
func logValue(prod, add float64, exp int) float64 {
	return add + math.Log(prod) + float64(exp)*math.Ln2
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
	alpha := w.par.Alpha
	lam := w.lam[:m]
	for i := range lam {
		lam[i] = 0
	}
	var gA, gB, gG, gP, lamL, lamB float64
	switch {
	case f.trend.multiplicative():
		gA, gB, gG, gP, lamL, lamB = p.backwardGeneral()
	case f.season == MultiplicativeSeason:
		gA, gB, gG, gP, lamL, lamB = p.backwardLinearMul()
	default:
		gA, gB, gG, gP, lamL, lamB = p.backwardLinearAdd()
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

// The backward passes propagate the adjoints of the states from the last
// step to the first over the tape of the forward pass, accumulate those
// of α, β, γ and φ, leave the adjoints of the initial seasonal ring in
// p.aw.lam and return the parameters' adjoints and those of the initial
// level and trend. backwardLinearAdd and backwardLinearMul mirror
// backwardGeneral's arithmetic, in the same order, for the forms of
// forwardLinearAdd and forwardLinearMul.

func (p *problem) backwardGeneral() (gA, gB, gG, gP, lamL, lamB float64) {
	f := p.f
	w := p.aw
	m := f.m
	alpha, beta, gamma, phi := w.par.Alpha, w.par.Beta, w.par.Gamma, w.par.Phi
	multErr := f.err == MultiplicativeError
	lam := w.lam[:m]
	dsse := float64(len(p.y)) / w.sse
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
	return gA, gB, gG, gP, lamL, lamB
}

func (p *problem) backwardLinearAdd() (gA, gB, gG, gP, lamL, lamB float64) {
	w := p.aw
	m := p.f.m
	alpha, beta, gamma, phi := w.par.Alpha, w.par.Beta, w.par.Gamma, w.par.Phi
	if p.f.season == NoSeason {
		gamma = 0
	}
	multErr := p.f.err == MultiplicativeError
	lam := w.lam[:m]
	dsse := float64(len(p.y)) / w.sse
	tape := w.tape
	j := (len(tape) - 1) % m
	for t := len(tape) - 1; t >= 0; t-- {
		st := &tape[t]
		bt, a, e := st.b, st.a, st.e
		// Seasonal update.
		ls := lam[j]
		barSv := ls
		barA := gamma * ls
		gG += a * ls
		// Trend update (q = a).
		barb := phi * lamB
		gP += bt * lamB
		barQ := beta * lamB
		gB += a * lamB
		// Level update.
		barL := lamL
		barQ += alpha * lamL
		gA += a * lamL
		barA += barQ
		// Innovation and likelihood terms.
		de := dsse * 2 * e
		var barY float64
		if multErr {
			iy := st.iy
			barA += de * iy
			barY = (2 - de*e) * iy
		} else {
			barA += de
		}
		barY -= barA
		// One-step forecast.
		barL += barY
		barSv += barY
		// Level/trend forecast.
		barl := barL
		barb += phi * barL
		gP += bt * barL
		lamL, lamB = barl, barb
		lam[j] = barSv
		if j--; j < 0 {
			j = m - 1
		}
	}
	return gA, gB, gG, gP, lamL, lamB
}

func (p *problem) backwardLinearMul() (gA, gB, gG, gP, lamL, lamB float64) {
	w := p.aw
	m := p.f.m
	alpha, beta, gamma, phi := w.par.Alpha, w.par.Beta, w.par.Gamma, w.par.Phi
	multErr := p.f.err == MultiplicativeError
	lam := w.lam[:m]
	dsse := float64(len(p.y)) / w.sse
	tape := w.tape
	j := (len(tape) - 1) % m
	for t := len(tape) - 1; t >= 0; t-- {
		st := &tape[t]
		bt, L, sv, a, e, q, iL, isv := st.b, st.L, st.sv, st.a, st.e, st.q, st.iL, st.isv
		// Seasonal update.
		ls := lam[j]
		u := a * iL
		gl := gamma * ls * iL
		barSv := ls
		barA := gl
		barL := -(gl * u)
		gG += u * ls
		// Trend update.
		barb := phi * lamB
		gP += bt * lamB
		barQ := beta * lamB
		gB += q * lamB
		// Level update.
		barL += lamL
		barQ += alpha * lamL
		gA += q * lamL
		// q from a.
		bq := barQ * isv
		barA += bq
		barSv -= bq * q
		// Innovation and likelihood terms.
		de := dsse * 2 * e
		var barY float64
		if multErr {
			iy := iL * isv
			barA += de * iy
			barY = (2 - de*e) * iy
		} else {
			barA += de
		}
		barY -= barA
		// One-step forecast.
		barL += barY * sv
		barSv += barY * L
		// Level/trend forecast.
		barl := barL
		barb += phi * barL
		gP += bt * barL
		lamL, lamB = barl, barb
		lam[j] = barSv
		if j--; j < 0 {
			j = m - 1
		}
	}
	return gA, gB, gG, gP, lamL, lamB
}
