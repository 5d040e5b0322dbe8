package smoothing

import (
	"math"

	"github.com/almanac-go/almanac"
)

var errInvalid = almanac.ErrInvalid

// Params holds the smoothing parameters of an ETS model in the
// innovations form (Hyndman, Koehler, Ord & Snyder 2008): Alpha for the
// level, Beta for the trend, Gamma for the season, Phi the damping
// parameter (1 for undamped trends). Parameters of absent components are
// zero.
type Params struct {
	Alpha, Beta, Gamma, Phi float64
}

// form is a resolved model: component types and period (m = 1 without a
// season).
type form struct {
	err    ErrorType
	trend  TrendType
	season SeasonType
	m      int
}

func (f form) String() string {
	return Spec{Error: f.err, Trend: f.trend, Season: f.season}.String()
}

// trace holds optional outputs of one pass of the filter. Nil slices are
// skipped. level[t], trend[t] are the states after observation t;
// season[t] the seasonal state written at observation t.
type trace struct {
	fitted, resid        []float64
	level, trend, season []float64
}

// filter runs the innovations state-space recursion (Hyndman, Koehler,
// Ord & Snyder 2008, Table 2.3, written in terms of the response error
// a_t = y_t − ŷ_t, for which the state updates of the additive- and
// multiplicative-error models coincide) over y, starting from level l,
// trend b and the seasonal ring s (s[t mod m] is the seasonal for
// observation t; updated in place). start is the index in the ring of the
// first observation (0 for a fit from the beginning). It returns the sum
// of squared innovations (e_t = a_t, or a_t/ŷ_t for multiplicative error),
// Σ log ŷ_t (multiplicative error only), the final level and trend, and
// ok = false when the recursion leaves the model's domain (ŷ ≤ 0 with
// multiplicative error, non-finite states).
//
// It does not allocate.
func (f form) filter(y []float64, p Params, l, b float64, s []float64, start int, tr *trace) (sse, sumlog, lEnd, bEnd float64, ok bool) {
	alpha, beta, gamma, phi := p.Alpha, p.Beta, p.Gamma, p.Phi
	j := start
	m := f.m
	var logs logSum
	for t, yt := range y {
		var L float64
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
			L = l * math.Pow(b, phi)
		}
		sv := 0.0
		yhat := L
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
		if f.err == MultiplicativeError {
			if !(yhat > 0) {
				return math.Inf(1), 0, l, b, false
			}
			e = a / yhat
			logs.push(yhat)
		}
		sse += e * e
		q := a
		if f.season == MultiplicativeSeason {
			q = a / sv
		}
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
			b = math.Pow(b, phi) + beta*q/lprev
		}
		switch f.season {
		case AdditiveSeason:
			s[j] = sv + gamma*a
		case MultiplicativeSeason:
			s[j] = sv + gamma*a/L
		}
		if tr != nil {
			if tr.fitted != nil {
				tr.fitted[t] = yhat
			}
			if tr.resid != nil {
				tr.resid[t] = e
			}
			if tr.level != nil {
				tr.level[t] = l
			}
			if tr.trend != nil {
				tr.trend[t] = b
			}
			if tr.season != nil {
				tr.season[t] = s[j]
			}
		}
		if j++; j == m {
			j = 0
		}
	}
	if math.IsNaN(sse) || math.IsInf(sse, 0) || math.IsNaN(l) || math.IsNaN(b) || math.IsInf(l, 0) || math.IsInf(b, 0) {
		return math.Inf(1), 0, l, b, false
	}
	if f.trend.multiplicative() && !(b > 0) {
		return math.Inf(1), 0, l, b, false
	}
	return sse, logs.value(), l, b, true
}

// logLik is the concentrated Gaussian log-likelihood of the innovations
// form on statsmodels' definition (see the package documentation):
// −(n/2)(log(2π·sse/n) + 1) − Σ log ŷ_t.
func logLik(n int, sse, sumlog float64) float64 {
	fn := float64(n)
	return -fn/2*(math.Log(2*math.Pi*sse/fn)+1) - sumlog
}

// logSum accumulates Σ log v_t for positive v_t as a running product
// kept in range with math.Frexp, so a series of n values costs one
// logarithm instead of n (the logarithm dominated the likelihood's
// cost). Values far from 1 go straight into the additive part, so the
// product can neither overflow nor underflow. The zero value is empty.
type logSum struct {
	prod float64 // 0 means 1 (empty)
	exp  int     // binary exponent taken out of prod
	add  float64 // logarithms added directly
}

const logSumRange = 0x1p400

func (s *logSum) push(v float64) {
	if v > logSumRange || v < 1/logSumRange {
		s.add += math.Log(v)
		return
	}
	if s.prod == 0 {
		s.prod = v
		return
	}
	s.prod *= v
	if s.prod > logSumRange || s.prod < 1/logSumRange {
		fr, e := math.Frexp(s.prod)
		s.prod = fr
		s.exp += e
	}
}

// value returns the accumulated sum of logarithms.
func (s *logSum) value() float64 {
	if s.prod == 0 {
		return s.add
	}
	return s.add + math.Log(s.prod) + float64(s.exp)*math.Ln2
}
