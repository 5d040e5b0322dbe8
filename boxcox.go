package almanac

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/almanac-go/almanac/internal/brent"
)

// Default search interval for an automatic Box-Cox λ. Guerrero (1993)
// searches a bounded interval of plausible powers; [−1, 2] covers the
// reciprocal through the square (common practice).
const (
	DefaultLambdaLower = -1.0
	DefaultLambdaUpper = 2.0
)

// BoxCoxTransform writes the Box-Cox transform of y with parameter lambda
// into dst and returns it: (y^λ − 1)/λ, or log y at λ = 0 (Box & Cox
// 1964). dst may be nil (a new slice is allocated) or y itself; otherwise
// it must have len(y). NaN (missing) stays NaN.
//
// Special cases: a negative value, or a zero when λ ≤ 0, gives an error
// wrapping ErrNonPositive; ±Inf one wrapping ErrNonFinite; a non-finite
// lambda one wrapping ErrInvalid; len(dst) ≠ len(y) one wrapping
// ErrLength.
func BoxCoxTransform(dst, y []float64, lambda float64) ([]float64, error) {
	if err := checkLambda(lambda); err != nil {
		return nil, err
	}
	if dst == nil {
		dst = make([]float64, len(y))
	}
	if len(dst) != len(y) {
		return nil, fmt.Errorf("almanac: box-cox: %w: dst has %d elements, y %d", ErrLength, len(dst), len(y))
	}
	if err := checkBoxCoxDomain(y, lambda); err != nil {
		return nil, err
	}
	for i, v := range y {
		dst[i] = boxCox(v, lambda)
	}
	return dst, nil
}

// BoxCoxInverse writes the inverse Box-Cox transform of z into dst and
// returns it: (λz + 1)^(1/λ), or exp z at λ = 0. dst may be nil, z itself,
// or a slice of len(z). NaN stays NaN. Values outside the range of the
// transform map to the nearest end of the original scale: λz + 1 ≤ 0
// gives 0 when λ > 0 and +Inf when λ < 0, which keeps the map monotone
// for quantiles far in a tail.
//
// Special cases: a non-finite lambda gives an error wrapping ErrInvalid;
// len(dst) ≠ len(z) one wrapping ErrLength.
func BoxCoxInverse(dst, z []float64, lambda float64) ([]float64, error) {
	if err := checkLambda(lambda); err != nil {
		return nil, err
	}
	if dst == nil {
		dst = make([]float64, len(z))
	}
	if len(dst) != len(z) {
		return nil, fmt.Errorf("almanac: box-cox: %w: dst has %d elements, z %d", ErrLength, len(dst), len(z))
	}
	for i, v := range z {
		dst[i] = invBoxCox(v, lambda)
	}
	return dst, nil
}

func checkLambda(lambda float64) error {
	if math.IsNaN(lambda) || math.IsInf(lambda, 0) {
		return fmt.Errorf("almanac: box-cox: %w: lambda %v", ErrInvalid, lambda)
	}
	return nil
}

// checkBoxCoxDomain rejects values the transform cannot take.
func checkBoxCoxDomain(y []float64, lambda float64) error {
	for i, v := range y {
		switch {
		case math.IsNaN(v):
		case math.IsInf(v, 0):
			return fmt.Errorf("almanac: box-cox: %w: y[%d] = %v", ErrNonFinite, i, v)
		case v < 0, v == 0 && lambda <= 0:
			return fmt.Errorf("almanac: box-cox: %w: y[%d] = %v with lambda %v (need y > 0, or y ≥ 0 when lambda > 0)", ErrNonPositive, i, v, lambda)
		}
	}
	return nil
}

// boxCox is the transform of one value, computed as expm1(λ log y)/λ for
// accuracy when λ log y is small.
func boxCox(y, lambda float64) float64 {
	if lambda == 0 {
		return math.Log(y)
	}
	return math.Expm1(lambda*math.Log(y)) / lambda
}

// invBoxCox is the inverse transform of one value (see BoxCoxInverse).
func invBoxCox(z, lambda float64) float64 {
	if lambda == 0 {
		return math.Exp(z)
	}
	t := lambda * z
	if t <= -1 {
		if lambda > 0 {
			return 0
		}
		return math.Inf(1)
	}
	return math.Exp(math.Log1p(t) / lambda)
}

// BoxCoxLLF returns the Box-Cox profile log-likelihood of λ for the
// observed (non-NaN) values of y, as defined by scipy.stats.boxcox_llf:
//
//	llf(λ) = (λ − 1) Σ log y − (n/2) log var(y^λ/λ)
//
// with the variance taken with denominator n (var(log y) at λ = 0). It is
// the normal log-likelihood of the transformed data with mean and variance
// profiled out, up to a constant. It does not allocate.
//
// Special cases: fewer than two observed values give an error wrapping
// ErrTooShort; a value ≤ 0 one wrapping ErrNonPositive; ±Inf one wrapping
// ErrNonFinite; a constant series one wrapping ErrConstant.
func BoxCoxLLF(y []float64, lambda float64) (float64, error) {
	if err := checkLLFData(y, lambda); err != nil {
		return 0, err
	}
	return boxCoxLLF(y, lambda), nil
}

func checkLLFData(y []float64, lambda float64) error {
	if err := checkLambda(lambda); err != nil {
		return err
	}
	n := 0
	first, constant := math.NaN(), true
	for i, v := range y {
		switch {
		case math.IsNaN(v):
			continue
		case math.IsInf(v, 0):
			return fmt.Errorf("almanac: box-cox: %w: y[%d] = %v", ErrNonFinite, i, v)
		case v <= 0:
			return fmt.Errorf("almanac: box-cox: %w: y[%d] = %v; the likelihood needs y > 0", ErrNonPositive, i, v)
		}
		if n == 0 {
			first = v
		} else if v != first {
			constant = false
		}
		n++
	}
	if n < 2 {
		return fmt.Errorf("almanac: box-cox: %w: %d observed values, need at least 2", ErrTooShort, n)
	}
	if constant {
		return fmt.Errorf("almanac: box-cox: %w: no lambda can be estimated", ErrConstant)
	}
	return nil
}

// boxCoxLLF evaluates the log-likelihood on data already checked.
func boxCoxLLF(y []float64, lambda float64) float64 { return llfFromLogs(y, true, lambda) }

// llfFromLogs evaluates the log-likelihood from x, which holds the data
// (isData) or their logarithms, skipping NaN. It does not allocate. The
// variance of y^λ/λ = exp(λ log y)/λ is taken in two passes (mean, then
// squared deviations) as numpy.var does; the first pass also counts the
// observed values and sums their logs.
func llfFromLogs(x []float64, isData bool, lambda float64) float64 {
	logOf := func(v float64) float64 {
		if isData {
			return math.Log(v)
		}
		return v
	}
	t := func(l float64) float64 {
		if lambda == 0 {
			return l
		}
		return math.Exp(lambda*l) / lambda
	}
	n, sumLog, sum := 0, 0.0, 0.0
	for _, v := range x {
		if !math.IsNaN(v) {
			l := logOf(v)
			sumLog += l
			sum += t(l)
			n++
		}
	}
	mean := sum / float64(n)
	ss := 0.0
	for _, v := range x {
		if !math.IsNaN(v) {
			d := t(logOf(v)) - mean
			ss += d * d
		}
	}
	return (lambda-1)*sumLog - float64(n)/2*math.Log(ss/float64(n))
}

func lambdaBounds(lower, upper float64) (float64, float64, error) {
	if lower == 0 && upper == 0 {
		return DefaultLambdaLower, DefaultLambdaUpper, nil
	}
	if !(lower < upper) || math.IsInf(lower, 0) || math.IsInf(upper, 0) {
		return 0, 0, fmt.Errorf("almanac: box-cox: %w: search interval [%v, %v]", ErrInvalid, lower, upper)
	}
	return lower, upper, nil
}

// lambdaTol is the absolute tolerance on λ of the automatic searches.
const lambdaTol = 1e-10

// LambdaML returns the λ in [lower, upper] that maximises BoxCoxLLF,
// found by Brent's bounded minimisation of −llf (the quantity that
// scipy.stats.boxcox_normmax(method="mle") maximises). lower = upper = 0
// means the default interval [DefaultLambdaLower, DefaultLambdaUpper].
// Missing values are ignored.
//
// Special cases: as BoxCoxLLF; an empty or reversed interval gives an
// error wrapping ErrInvalid.
func LambdaML(y []float64, lower, upper float64) (float64, error) {
	lo, hi, err := lambdaBounds(lower, upper)
	if err != nil {
		return 0, err
	}
	if err := checkLLFData(y, 1); err != nil {
		return 0, err
	}
	// Take the logs once; each evaluation then needs no log, two exp per
	// value.
	logs := make([]float64, len(y))
	for i, v := range y {
		logs[i] = math.Log(v) // NaN stays NaN
	}
	lam, _ := brent.Minimize(func(l float64) float64 { return -llfFromLogs(logs, false, l) }, lo, hi, lambdaTol, 500)
	return lam, nil
}

// guerreroData holds the subseries summaries behind Guerrero's criterion.
type guerreroData struct {
	logMean []float64 // log of each subseries mean
	sd      []float64 // standard deviation of each subseries
}

// cv returns the coefficient of variation of sd_h / mean_h^(1−λ). It does
// not allocate.
func (g *guerreroData) cv(lambda float64) float64 {
	k := float64(len(g.sd))
	sum := 0.0
	for i, s := range g.sd {
		sum += s * math.Exp(-(1-lambda)*g.logMean[i])
	}
	mean := sum / k
	ss := 0.0
	for i, s := range g.sd {
		d := s*math.Exp(-(1-lambda)*g.logMean[i]) - mean
		ss += d * d
	}
	return math.Sqrt(ss/(k-1)) / mean
}

// LambdaGuerrero chooses λ in [lower, upper] by Guerrero's method: the
// series is cut into consecutive non-overlapping subseries of length
// period (the last ⌊n/period⌋·period observations, so that the most
// recent data are used), and λ minimises the coefficient of variation of
// s_h / m_h^(1−λ) over the subseries, with m_h and s_h the mean and
// standard deviation of subseries h. A λ that makes the ratio constant
// stabilises the variance: s_h ∝ m_h^(1−λ). lower = upper = 0 means the
// default interval [DefaultLambdaLower, DefaultLambdaUpper]; the minimum is
// found by Brent's bounded search.
//
// period < 2 (non-seasonal data) uses subseries of length 2. Missing
// values are ignored within a subseries; a subseries with fewer than two
// observed values is left out.
//
// Source: V. M. Guerrero (1993), "Time-series analysis supported by power
// transformations", Journal of Forecasting 12, 37–48.
//
// Special cases: a value ≤ 0 gives an error wrapping ErrNonPositive; ±Inf
// one wrapping ErrNonFinite; fewer than two usable subseries one wrapping
// ErrTooShort; subseries that are all constant one wrapping ErrConstant;
// an empty or reversed interval one wrapping ErrInvalid.
func LambdaGuerrero(y []float64, period int, lower, upper float64) (float64, error) {
	lo, hi, err := lambdaBounds(lower, upper)
	if err != nil {
		return 0, err
	}
	g, err := guerreroSubseries(y, period)
	if err != nil {
		return 0, err
	}
	lam, _ := brent.Minimize(g.cv, lo, hi, lambdaTol, 500)
	return lam, nil
}

func guerreroSubseries(y []float64, period int) (*guerreroData, error) {
	if period < 2 {
		period = 2
	}
	for i, v := range y {
		if math.IsInf(v, 0) {
			return nil, fmt.Errorf("almanac: box-cox: %w: y[%d] = %v", ErrNonFinite, i, v)
		}
		if v <= 0 {
			return nil, fmt.Errorf("almanac: box-cox: %w: y[%d] = %v; Guerrero's method needs y > 0", ErrNonPositive, i, v)
		}
	}
	k := len(y) / period
	x := y[len(y)-k*period:]
	g := &guerreroData{}
	anySpread := false
	for h := range k {
		sub := x[h*period : (h+1)*period]
		n, sum := 0, 0.0
		for _, v := range sub {
			if !math.IsNaN(v) {
				n++
				sum += v
			}
		}
		if n < 2 {
			continue
		}
		m := sum / float64(n)
		ss := 0.0
		for _, v := range sub {
			if !math.IsNaN(v) {
				ss += (v - m) * (v - m)
			}
		}
		s := math.Sqrt(ss / float64(n-1))
		if s > 0 {
			anySpread = true
		}
		g.logMean = append(g.logMean, math.Log(m))
		g.sd = append(g.sd, s)
	}
	if len(g.sd) < 2 {
		return nil, fmt.Errorf("almanac: box-cox: %w: %d usable subseries of length %d, Guerrero's method needs at least 2", ErrTooShort, len(g.sd), period)
	}
	if !anySpread {
		return nil, fmt.Errorf("almanac: box-cox: %w: every subseries is constant", ErrConstant)
	}
	return g, nil
}

// LambdaMethod says how BoxCox chooses λ. The zero value is LambdaByGuerrero.
// Programs should not rely on the numeric values of the constants.
type LambdaMethod int

const (
	// LambdaByGuerrero chooses λ by Guerrero's method (LambdaGuerrero).
	LambdaByGuerrero LambdaMethod = iota
	// LambdaMaxLikelihood chooses λ by maximum likelihood (LambdaML).
	LambdaMaxLikelihood
	// LambdaFixed uses BoxCox.Lambda as given (0 is the log transform).
	LambdaFixed
)

// String returns "guerrero", "max-likelihood" or "fixed", and
// "LambdaMethod(n)" for an unknown value.
func (m LambdaMethod) String() string {
	switch m {
	case LambdaByGuerrero:
		return "guerrero"
	case LambdaMaxLikelihood:
		return "max-likelihood"
	case LambdaFixed:
		return "fixed"
	}
	return fmt.Sprintf("LambdaMethod(%d)", int(m))
}

// BoxCox is a Model that fits Model to the Box-Cox transform of a series
// and transforms its forecasts back. The zero value of every field except
// Model is the default:
//
//	almanac.BoxCox{Model: almanac.Drift{}}                                      // λ by Guerrero, median forecasts
//	almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed}          // log transform (λ = 0)
//	almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed, Lambda: 0.5, BiasAdjust: true}
//
// Back-transformation: quantiles and interval bounds are the inverse
// transform of the inner model's (the map is increasing), so they keep
// their coverage. The point forecast is the inverse transform of the inner
// point forecast — the median of the forecast distribution when the
// inner one is symmetric — unless BiasAdjust asks for the mean. The mean
// uses the inner forecast variance: for a Normal inner distribution
// (μ, σ²) it is the second-order approximation
//
//	inv(μ) · (1 + σ²(1 − λ) / (2(λμ + 1)²))
//
// (exp(μ)(1 + σ²/2) at λ = 0; Hyndman & Athanasopoulos, Forecasting:
// Principles and Practice, 3rd ed., §5.6, common practice), and for a
// Sample it is the mean of the back-transformed paths.
//
// A BoxCox value is safe for concurrent use when Model is.
type BoxCox struct {
	// Model is fitted on the transformed scale. Required.
	Model Model
	// Method chooses λ; the zero value LambdaByGuerrero is Guerrero's method.
	Method LambdaMethod
	// Lambda is the parameter used with LambdaFixed (ignored otherwise).
	Lambda float64
	// Lower and Upper bound the automatic search; both zero means
	// [DefaultLambdaLower, DefaultLambdaUpper].
	Lower, Upper float64
	// Period is the subseries length of Guerrero's method; 0 means
	// y.Period() (subseries of 2 for non-seasonal data). Negative is
	// invalid.
	Period int
	// BiasAdjust makes the point forecast the back-transformed mean
	// instead of the median.
	BiasAdjust bool
}

var _ Model = BoxCox{}

// BoxCoxFit is a model fitted by BoxCox. It is read-only and safe for
// concurrent use.
type BoxCoxFit struct {
	lambda    float64
	estimated bool
	bias      bool
	inner     Fitted
	fitted    []float64
	response  []float64 // y − fitted on the original scale
}

// Fit implements Model.
//
// Special cases: a nil Model, an unknown Method or a negative Period
// gives an error wrapping ErrInvalid; negative data, or zeros with λ ≤ 0, one wrapping
// ErrNonPositive; an inner model whose FittedValues do not have one value
// per observation one wrapping ErrLength; the errors of Series.Validate,
// of the λ search and of the inner model are passed on.
func (b BoxCox) Fit(ctx context.Context, y Series) (Fitted, error) {
	if b.Model == nil {
		return nil, fmt.Errorf("almanac: box-cox: %w: no model", ErrInvalid)
	}
	if b.Period < 0 {
		return nil, fmt.Errorf("almanac: box-cox: %w: period %d", ErrInvalid, b.Period)
	}
	if err := y.Validate(); err != nil {
		return nil, err
	}
	var lam float64
	var err error
	switch b.Method {
	case LambdaByGuerrero:
		p := b.Period
		if p == 0 {
			p = y.Period()
		}
		lam, err = LambdaGuerrero(y.Values, p, b.Lower, b.Upper)
	case LambdaMaxLikelihood:
		lam, err = LambdaML(y.Values, b.Lower, b.Upper)
	case LambdaFixed:
		lam, err = b.Lambda, checkLambda(b.Lambda)
	default:
		err = fmt.Errorf("almanac: box-cox: %w: method %v", ErrInvalid, b.Method)
	}
	if err != nil {
		return nil, fmt.Errorf("almanac: series %q: %w", y.Key, err)
	}
	z, err := BoxCoxTransform(nil, y.Values, lam)
	if err != nil {
		return nil, fmt.Errorf("almanac: series %q: %w", y.Key, err)
	}
	inner, err := b.Model.Fit(ctx, Series{Key: y.Key, Start: y.Start, Freq: y.Freq, Values: z})
	if err != nil {
		return nil, err
	}
	fv, _ := BoxCoxInverse(nil, inner.FittedValues(), lam)
	if len(fv) != len(y.Values) {
		return nil, fmt.Errorf("almanac: box-cox: series %q: %w: inner model %s gave %d fitted values for %d observations", y.Key, ErrLength, inner, len(fv), len(y.Values))
	}
	resp := make([]float64, len(fv))
	for i, v := range y.Values {
		resp[i] = v - fv[i]
	}
	return &BoxCoxFit{lambda: lam, estimated: b.Method != LambdaFixed, bias: b.BiasAdjust, inner: inner, fitted: fv, response: resp}, nil
}

// Lambda returns the λ used.
func (f *BoxCoxFit) Lambda() float64 { return f.lambda }

// Inner returns the model fitted on the transformed scale.
func (f *BoxCoxFit) Inner() Fitted { return f.inner }

// String returns "BoxCox[λ](inner)", λ with four significant digits, e.g.
// "BoxCox[0.148](Drift)".
func (f *BoxCoxFit) String() string {
	return fmt.Sprintf("BoxCox[%.4g](%s)", f.lambda, f.inner.String())
}

// FittedValues returns the inner model's fitted values transformed back
// to the original scale (medians, not bias-adjusted).
func (f *BoxCoxFit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

// Residuals returns the inner model's residuals, on the transformed
// scale: they are the model's innovations, which residual diagnostics
// need. Compute y − FittedValues() for errors on the original scale.
func (f *BoxCoxFit) Residuals() []float64 { return f.inner.Residuals() }

// ResponseResiduals implements ResponseResidualer: y − FittedValues() on
// the original scale.
func (f *BoxCoxFit) ResponseResiduals() []float64 { return append([]float64(nil), f.response...) }

// NumParams implements ParamCounter: the inner model's count (0 when it
// does not report one) plus one when λ was estimated.
func (f *BoxCoxFit) NumParams() int {
	k := 0
	if pc, ok := f.inner.(ParamCounter); ok {
		k = pc.NumParams()
	}
	if f.estimated {
		k++
	}
	return k
}

// Forecast implements Fitted; see BoxCox for the back-transformation.
//
// Special cases: as the inner model's Forecast; BiasAdjust with an inner
// forecast that has neither a Normal nor a Sample distribution gives an
// error wrapping ErrNoDistribution.
func (f *BoxCoxFit) Forecast(h int, levels ...float64) (Forecast, error) {
	in, err := f.inner.Forecast(h, levels...)
	if err != nil {
		return Forecast{}, err
	}
	lam := f.lambda
	mean := make([]float64, len(in.Mean))
	switch {
	case !f.bias:
		for i, m := range in.Mean {
			mean[i] = invBoxCox(m, lam)
		}
	default:
		// An inner Forecast built by hand may carry a short distribution.
		if err := checkDistribution(in.Dist, len(in.Mean)); err != nil {
			return Forecast{}, fmt.Errorf("almanac: box-cox: inner model %s: %w", f.inner, err)
		}
		switch d := in.Dist.(type) {
		case *Normal:
			for i, m := range in.Mean {
				s2 := d.SD[i] * d.SD[i]
				den := lam*m + 1
				mean[i] = invBoxCox(m, lam) * (1 + s2*(1-lam)/(2*den*den))
			}
		case *Sample:
			for i := range mean {
				sum, n := 0.0, 0
				for _, p := range d.Paths {
					if v := p[i]; !math.IsNaN(v) {
						sum += invBoxCox(v, lam)
						n++
					}
				}
				mean[i] = sum / float64(n)
			}
		default:
			return Forecast{}, fmt.Errorf("almanac: box-cox: %w: bias adjustment needs a normal or sample forecast distribution, inner model %s gave %T", ErrNoDistribution, f.inner, in.Dist)
		}
	}
	out := Forecast{Start: in.Start, Freq: in.Freq, Mean: mean}
	if in.Dist != nil {
		out.Dist = &Mapped{Base: in.Dist, Map: func(z float64) float64 { return invBoxCox(z, lam) }}
	}
	for _, iv := range in.Intervals {
		lo, _ := BoxCoxInverse(nil, iv.Lower, lam)
		hi, _ := BoxCoxInverse(nil, iv.Upper, lam)
		out.Intervals = append(out.Intervals, Interval{Level: iv.Level, Lower: lo, Upper: hi})
	}
	return out, nil
}

// Simulate implements Simulator by back-transforming the inner model's
// sample paths. It returns an error wrapping ErrInvalid when the inner
// model does not implement Simulator.
func (f *BoxCoxFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	sim, ok := f.inner.(Simulator)
	if !ok {
		return nil, fmt.Errorf("almanac: box-cox: %w: inner model %s cannot simulate", ErrInvalid, f.inner)
	}
	paths, err := sim.Simulate(h, n, src)
	if err != nil {
		return nil, err
	}
	for _, p := range paths {
		for i, v := range p {
			p[i] = invBoxCox(v, f.lambda)
		}
	}
	return paths, nil
}
