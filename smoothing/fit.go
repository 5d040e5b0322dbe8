package smoothing

import (
	"context"
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
)

var (
	_ almanac.Model        = Spec{}
	_ almanac.Fitted       = (*Fitted)(nil)
	_ almanac.Simulator    = (*Fitted)(nil)
	_ almanac.ParamCounter = (*Fitted)(nil)
)

// Fitted is an ETS model estimated on one series. It is read-only after
// Fit returns and safe for concurrent use; Update returns a new value.
type Fitted struct {
	// Params are the smoothing parameters (estimated or fixed). Phi is 1
	// for undamped trends.
	Params Params
	// InitLevel, InitTrend and InitSeason are the states before the
	// first observation; InitSeason is chronological (InitSeason[k] is
	// used for observation k) and nil without a season.
	InitLevel, InitTrend float64
	InitSeason           []float64
	// LogLik is the maximised log-likelihood on statsmodels' definition
	// (see the package documentation, "Likelihood"); AIC, AICc and BIC
	// count DF parameters.
	LogLik, AIC, AICc, BIC float64
	// DF is the number of parameters counted by the information
	// criteria: the estimated smoothing parameters, the estimated initial
	// level and trend, all m initial seasonal states when they are
	// estimated (one of them is determined by the normalisation, but it
	// is counted, as statsmodels does), and σ².
	DF int
	// Sigma2 is the variance of the innovations, Σe²/n (the maximum
	// likelihood estimate; e relative for multiplicative error).
	Sigma2 float64
	// Converged reports whether the optimiser met its tolerance (true
	// when nothing was estimated).
	Converged bool

	spec   Spec // the specification, Period resolved
	nfit   int  // observations the parameters were estimated on (Update keeps it)
	f      form
	series almanac.Series // copy of the data
	free   int            // number of freely estimated parameters

	// Internal units (see scaling): z is the series mapped by tf, and
	// every state below is on z's scale.
	tf                 scaling
	z                  []float64
	fitted, resid      []float64
	level, trend, seas []float64 // level/trend len n+1 ([0] initial); seas len n+m
	lEnd, bEnd         float64
	ring               []float64 // final seasonal ring (position t mod m)
}

// States is the state sequence of a fitted model. Level[t] and Trend[t]
// are the states after observation t (1-based t; Level[0] is the initial
// level). Season holds m initial seasonal states (chronological, Season[k]
// used for observation k) followed by the seasonal state written at each
// observation: Season[m+t-1] after observation t (1-based). Trend is nil
// without a trend and Season nil without a season.
type States struct {
	Level, Trend, Season []float64
}

// Fit estimates the model on y by maximum likelihood (see the package
// documentation). y must be complete (no NaN), positive when any
// component is multiplicative, and long enough for the estimated
// parameters.
//
// Special cases:
//   - a NaN in y gives an error wrapping almanac.ErrMissing;
//   - a value ≤ 0 with a multiplicative component wraps almanac.ErrNonPositive;
//   - fewer observations than parameters + 2 (or, with estimated
//     seasonal states, fewer than two full seasons) wraps almanac.ErrTooShort;
//   - a period above MaxPeriod wraps ErrPeriodTooLong;
//   - an additive-error innovation variance or an initial state that is
//     not representable in float64 (data of order 1e154 and above)
//     wraps almanac.ErrNonFinite;
//   - a constant series is not optimised: the states reproduce it
//     exactly, Sigma2 is 0, LogLik +Inf, and the forecasts are the
//     constant with zero-width intervals.
func (s Spec) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	f, err := s.fit(ctx, y)
	if err != nil {
		return nil, err
	}
	return f, nil
}

// resolve validates s against y and returns the model form.
func (s Spec) resolve(y almanac.Series) (form, error) {
	if err := s.check(); err != nil {
		return form{}, err
	}
	if err := y.Validate(); err != nil {
		return form{}, fmt.Errorf("smoothing: %v: %w", s, err)
	}
	if err := y.CheckComplete(); err != nil {
		return form{}, fmt.Errorf("smoothing: %v needs complete data; fill the gaps first (e.g. the interpolation in package decompose): %w", s, err)
	}
	f := form{err: s.Error, trend: s.Trend, season: s.Season, m: 1}
	if s.Season != NoSeason {
		m := s.Period
		if m == 0 {
			m = y.Period()
		}
		if m < 2 {
			return form{}, fmt.Errorf("smoothing: %v: %w: seasonal period %d (need at least 2; set Period or use a seasonal frequency)", s, errInvalid, m)
		}
		if m > MaxPeriod {
			return form{}, fmt.Errorf("smoothing: %v: %w: period %d > %d; use decomposition-based forecasting (package decompose) for long seasonal periods", s, ErrPeriodTooLong, m, MaxPeriod)
		}
		f.m = m
		if s.InitSeason != nil && len(s.InitSeason) != m {
			return form{}, fmt.Errorf("smoothing: %v: %w: %d initial seasonal states for period %d", s, almanac.ErrLength, len(s.InitSeason), m)
		}
	}
	if s.multiplicativeParts() {
		if err := y.CheckPositive(); err != nil {
			return form{}, fmt.Errorf("smoothing: %v has multiplicative components and needs positive data: %w", s, err)
		}
		if s.InitLevel != nil && !(*s.InitLevel > 0) {
			return form{}, fmt.Errorf("smoothing: %v: %w: fixed initial level %v must be positive", s, almanac.ErrNonPositive, *s.InitLevel)
		}
		if s.Trend.multiplicative() && s.InitTrend != nil && !(*s.InitTrend > 0) {
			return form{}, fmt.Errorf("smoothing: %v: %w: fixed initial growth rate %v must be positive", s, almanac.ErrNonPositive, *s.InitTrend)
		}
		if s.Season == MultiplicativeSeason {
			for i, v := range s.InitSeason {
				if !(v > 0) {
					return form{}, fmt.Errorf("smoothing: %v: %w: fixed initial seasonal state %d is %v", s, almanac.ErrNonPositive, i, v)
				}
			}
		}
	}
	return f, nil
}

// newProblem sets up the likelihood for f on the internal series zs = tf(y).
func (s Spec) newProblem(f form, zs []float64, tf scaling) *problem {
	ys := zs
	p := &problem{f: f, y: ys, bounds: s.Bounds, ws: make([]float64, f.m)}
	p.estA = s.Alpha == nil
	p.estB = f.trend != NoTrend && s.Beta == nil
	p.estG = f.season != NoSeason && s.Gamma == nil
	p.estP = f.trend.damped() && s.Phi == nil
	p.estL = s.InitLevel == nil
	p.estT = f.trend != NoTrend && s.InitTrend == nil
	p.estS = f.season != NoSeason && s.InitSeason == nil
	p.fix.Phi = 1
	if s.Alpha != nil {
		p.fix.Alpha = *s.Alpha
	}
	if s.Beta != nil && f.trend != NoTrend {
		p.fix.Beta = *s.Beta
	}
	if s.Gamma != nil && f.season != NoSeason {
		p.fix.Gamma = *s.Gamma
	}
	if s.Phi != nil && f.trend.damped() {
		p.fix.Phi = *s.Phi
	}
	if s.InitLevel != nil {
		p.fixL = tf.toZ(*s.InitLevel)
	}
	if f.trend.multiplicative() {
		p.fixT = 1
	}
	if s.InitTrend != nil && f.trend != NoTrend {
		p.fixT = *s.InitTrend
		if !f.trend.multiplicative() {
			p.fixT = tf.diffToZ(p.fixT)
		}
	}
	if s.InitSeason != nil && f.season != NoSeason {
		p.fixS = slices.Clone(s.InitSeason)
		if f.season == AdditiveSeason {
			for i := range p.fixS {
				p.fixS[i] = tf.diffToZ(p.fixS[i])
			}
		}
	}
	p.prepare()
	return p
}

// start returns the optimiser's starting vector.
func (p *problem) start() []float64 {
	l0, b0, s0 := startValues(p.f, p.y)
	x := make([]float64, 0, p.dim())
	usual := p.bounds != AdmissibleBounds
	ratio := func(v, hi float64) float64 { return unsquash((v - boxLo) / (hi - boxLo)) }
	alpha := 0.3
	if !p.estA {
		alpha = p.fix.Alpha
	}
	if p.estA {
		if usual {
			x = append(x, ratio(alpha, boxHi))
		} else {
			x = append(x, ratio(alpha, admAlpha))
		}
	}
	if p.estB {
		if usual {
			x = append(x, ratio(0.1, boxHi))
		} else {
			x = append(x, ratio(0.1*alpha, admBeta))
		}
	}
	if p.estG {
		if usual {
			x = append(x, ratio(0.1, boxHi))
		} else {
			x = append(x, ratio(0.1*math.Abs(1-alpha), admGamma))
		}
	}
	if p.estP {
		x = append(x, unsquash((0.95-phiLo)/(phiHi-phiLo)))
	}
	if p.estL {
		x = append(x, l0)
	}
	if p.estT {
		x = append(x, b0)
	}
	if p.estS {
		x = append(x, s0[:p.f.m-1]...)
	}
	return x
}

func (s Spec) fit(ctx context.Context, y almanac.Series) (*Fitted, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	f, err := s.resolve(y)
	if err != nil {
		return nil, err
	}
	n := y.Len()
	tf := newScaling(y.Values, !s.multiplicativeParts())
	zs := make([]float64, n)
	for i, v := range y.Values {
		zs[i] = tf.toZ(v)
	}
	p := s.newProblem(f, zs, tf)
	free := p.dim()
	if p.estS && n < 2*f.m {
		return nil, fmt.Errorf("smoothing: %v: %w: estimating %d seasonal states needs at least two full seasons (%d observations), have %d", s, almanac.ErrTooShort, f.m, 2*f.m, n)
	}
	if n < free+2 {
		return nil, fmt.Errorf("smoothing: %v: %w: %d parameters to estimate need at least %d observations, have %d", s, almanac.ErrTooShort, free, free+2, n)
	}
	x := p.start()
	converged := true
	if y.IsConstant() {
		// Nothing to estimate: the start values reproduce the series.
	} else if len(x) > 0 {
		var fx float64
		x, fx, converged, err = p.multiStart(ctx, x)
		if err != nil {
			return nil, fmt.Errorf("smoothing: %v: %w", s, err)
		}
		if fx >= penalty {
			return nil, fmt.Errorf("smoothing: %v: %w: no parameter values in the %v region give a finite likelihood", s, almanac.ErrNotFitted, s.Bounds)
		}
	}
	par, l0, b0, ok := p.decode(x)
	if !ok {
		return nil, fmt.Errorf("smoothing: %v: %w: initial states left the model's domain", s, almanac.ErrNotFitted)
	}
	var s0 []float64
	if f.season != NoSeason {
		s0 = slices.Clone(p.ws)
	}
	if f.trend == NoTrend {
		b0 = 0
	}
	if !s.Trend.damped() {
		par.Phi = 1
	}
	out, err := newFitted(s, f, y, tf, zs, par, l0, b0, s0)
	if err != nil {
		return nil, err
	}
	out.Converged = converged
	out.free = free
	out.DF = free + 1
	if p.estS {
		out.DF++
	}
	out.setCriteria()
	return out, nil
}

// startSet is the deterministic set of starting smoothing parameters
// (α, β/α, γ/(1−α), φ) tried by multiStart.
var startSet = [][4]float64{
	{0.1, 0.01, 0.01, 0.98},
	{0.2, 0.1, 0.3, 0.95},
	{0.9, 0.05, 0.05, 0.8},
	{0.1, 0.9, 0.01, 0.82},
}

// setParams writes the smoothing parameters (α, β*, γ*, φ) into the
// optimiser's vector x (estimated ones only; β* = β/α and γ* = γ/(1−α) as
// in UsualBounds; under AdmissibleBounds β = β*·α, γ = γ*·(1−α)).
func (p *problem) setParams(x []float64, v [4]float64) {
	usual := p.bounds != AdmissibleBounds
	ratio := func(v, hi float64) float64 { return unsquash(math.Min(math.Max((v-boxLo)/(hi-boxLo), 0), 1)) }
	alpha := v[0]
	if !p.estA {
		alpha = p.fix.Alpha
	}
	i := 0
	if p.estA {
		if usual {
			x[i] = ratio(alpha, boxHi)
		} else {
			x[i] = ratio(alpha, admAlpha)
		}
		i++
	}
	if p.estB {
		if usual {
			x[i] = ratio(v[1], boxHi)
		} else {
			x[i] = ratio(v[1]*alpha, admBeta)
		}
		i++
	}
	if p.estG {
		if usual {
			x[i] = ratio(v[2], boxHi)
		} else {
			x[i] = ratio(v[2]*math.Abs(1-alpha), admGamma)
		}
		i++
	}
	if p.estP {
		x[i] = unsquash((v[3] - phiLo) / (phiHi - phiLo))
	}
}

// multiStart combines the heuristic initial states x0 with each parameter
// start of startSet, runs optimise from each and keeps the best end
// point. (Screening the starts by a few BFGS iterations and completing
// only the best was tried: with 5, 10 or 20 iterations it missed the
// optimum on 6 to 12 of the ets_estimated fixtures, against 2 for full
// searches.)
func (p *problem) multiStart(ctx context.Context, x0 []float64) ([]float64, float64, bool, error) {
	var best []float64
	fb, conv := math.Inf(1), false
	try := slices.Clone(x0)
	for _, st := range startSet {
		copy(try, x0)
		p.setParams(try, st)
		x, fx, c, err := p.optimise(ctx, try)
		if err != nil {
			return nil, 0, false, err
		}
		if fx < fb {
			best, fb, conv = x, fx, c
		}
	}
	return best, fb, conv, nil
}

// newFitted runs the filter over the internal series z = tf(y) with the
// given parameters and initial states (internal units) and fills a Fitted
// (information criteria left to the caller).
func newFitted(s Spec, f form, y almanac.Series, tf scaling, z []float64, par Params, l0, b0 float64, s0 []float64) (*Fitted, error) {
	n := y.Len()
	s.Period = f.m
	out := &Fitted{
		Params: par, spec: s, f: f, series: y.Clone(), Converged: true, nfit: n,
		tf: tf, z: z,
		fitted: make([]float64, n), resid: make([]float64, n),
		level: make([]float64, n+1),
	}
	out.level[0] = l0
	tr := &trace{fitted: out.fitted, resid: out.resid, level: out.level[1:]}
	if f.trend != NoTrend {
		out.trend = make([]float64, n+1)
		out.trend[0] = b0
		tr.trend = out.trend[1:]
	}
	ring := make([]float64, f.m)
	if f.season != NoSeason {
		out.seas = make([]float64, n+f.m)
		copy(out.seas, s0)
		tr.season = out.seas[f.m:]
		copy(ring, s0)
	}
	sse, sumlog, lEnd, bEnd, ok := f.filter(z, par, l0, b0, ring, 0, tr)
	if !ok {
		return nil, fmt.Errorf("smoothing: %v: %w: the recursion leaves the model's domain (non-positive forecast or non-finite state)", s, almanac.ErrNotFitted)
	}
	out.lEnd, out.bEnd, out.ring = lEnd, bEnd, ring
	if err := out.setStats(sse, sumlog); err != nil {
		return nil, err
	}
	out.InitLevel = tf.level(l0)
	out.InitTrend = out.trendOut(b0)
	if s0 != nil {
		out.InitSeason = make([]float64, len(s0))
		for i, v := range s0 {
			out.InitSeason[i] = out.seasonOut(v)
		}
	}
	if math.IsInf(out.InitLevel, 0) || math.IsInf(out.InitTrend, 0) {
		return nil, fmt.Errorf("smoothing: %v: %w: the initial states are not representable in float64", s, almanac.ErrNonFinite)
	}
	return out, nil
}

// setStats sets Sigma2 and LogLik from the internal sums: the
// log-likelihood of y is that of z minus n·log(scale) for both error
// forms; Sigma2 is in the data's units for additive error (an error
// wrapping almanac.ErrNonFinite when that overflows).
func (m *Fitted) setStats(sse, sumlog float64) error {
	n := observed(m.z)
	s2 := sse / float64(n)
	m.Sigma2 = s2
	if m.f.err == AdditiveError {
		m.Sigma2 = m.tf.diff(m.tf.diff(s2))
		if math.IsInf(m.Sigma2, 0) {
			return fmt.Errorf("smoothing: %v: %w: the innovation variance overflows float64 (the data span more than the float64 range allows for squared errors)", m.f, almanac.ErrNonFinite)
		}
	}
	if sse == 0 {
		m.LogLik = math.Inf(1)
	} else {
		m.LogLik = logLik(n, sse, sumlog) - float64(n)*m.tf.logScale()
	}
	return nil
}

// trendOut maps an internal trend state to the data's units (additive
// trends scale, growth rates do not).
func (m *Fitted) trendOut(b float64) float64 {
	if m.f.trend.multiplicative() {
		return b
	}
	return m.tf.diff(b)
}

// seasonOut maps an internal seasonal state to the data's units.
func (m *Fitted) seasonOut(v float64) float64 {
	if m.f.season == MultiplicativeSeason {
		return v
	}
	return m.tf.diff(v)
}

// setCriteria sets AIC, AICc and BIC from LogLik and DF (AICc +Inf when
// n ≤ DF + 1).
func (m *Fitted) setCriteria() {
	fn, k := float64(observed(m.z)), float64(m.DF)
	m.AIC = -2*m.LogLik + 2*k
	m.AICc = m.AIC + 2*k*(k+1)/(fn-k-1)
	if fn-k-1 <= 0 {
		m.AICc = math.Inf(1)
	}
	m.BIC = -2*m.LogLik + math.Log(fn)*k
}

// String returns the model in taxonomy notation, e.g. "ETS(M,Ad,M)".
func (m *Fitted) String() string { return m.f.String() }

// Spec returns the specification that was fitted, with Period resolved.
func (m *Fitted) Spec() Spec { return m.spec }

// Period returns the seasonal period (1 without a season).
func (m *Fitted) Period() int { return m.f.m }

// FittedValues returns the one-step forecasts ŷ_t.
func (m *Fitted) FittedValues() []float64 {
	out := make([]float64, len(m.fitted))
	for i, v := range m.fitted {
		out[i] = m.tf.level(v)
	}
	return out
}

// Residuals returns the innovations e_t on the model's scale: y − ŷ for
// additive error and (y − ŷ)/ŷ for multiplicative error (the convention
// of the reference fixtures). ResponseResiduals gives y − ŷ for both.
func (m *Fitted) Residuals() []float64 {
	if m.f.err == MultiplicativeError {
		return slices.Clone(m.resid)
	}
	out := make([]float64, len(m.resid))
	for i, v := range m.resid {
		out[i] = m.tf.diff(v)
	}
	return out
}

// ResponseResiduals returns y_t − ŷ_t.
func (m *Fitted) ResponseResiduals() []float64 {
	r := make([]float64, len(m.fitted))
	for i, v := range m.z {
		r[i] = m.tf.diff(v - m.fitted[i])
	}
	return r
}

// States returns a copy of the state sequence.
func (m *Fitted) States() States {
	st := States{Level: make([]float64, len(m.level))}
	for i, v := range m.level {
		st.Level[i] = m.tf.level(v)
	}
	if m.trend != nil {
		st.Trend = make([]float64, len(m.trend))
		for i, v := range m.trend {
			st.Trend[i] = m.trendOut(v)
		}
	}
	if m.seas != nil {
		st.Season = make([]float64, len(m.seas))
		for i, v := range m.seas {
			st.Season[i] = m.seasonOut(v)
		}
	}
	return st
}

// NumParams returns the number of freely estimated parameters (smoothing
// parameters and initial states, with m−1 free seasonal states), not
// counting σ².
func (m *Fitted) NumParams() int { return m.free }

// Update returns the model with newY appended to the series, running the
// filter forward from the final states with the parameters unchanged (no
// re-estimation). The states equal those of a filter run over the whole
// series from the same initial states. Sigma2, LogLik and the criteria
// are recomputed over the whole series with the same DF.
//
// A NaN in newY is a missing observation: as usual in the state-space
// form, the one-step prediction becomes the state (the recursion runs
// with a zero innovation), the fitted value is the prediction and the
// residual NaN, and the observation is left out of Sigma2 and LogLik.
// The new values must otherwise be finite, and positive for
// multiplicative components. See refresh.go.
func (m *Fitted) Update(newY []float64) (*Fitted, error) { return m.extend(newY) }
