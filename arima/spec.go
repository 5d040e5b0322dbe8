package arima

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// Method is the estimation method of a Spec. Programs should not rely on
// the numeric values of the constants.
type Method int

const (
	// CSSThenML (the zero value): conditional sum of squares first, its
	// optimum (with non-invertible MA parts inverted) the starting point
	// of exact maximum likelihood. ML starts from zero ARMA coefficients
	// instead when values are missing (CSS is then skipped), when the
	// series is too short for CSS, when CSS fails, or when the CSS
	// estimate is not a usable start (AR part not stationary, likelihood
	// not finite); Fitted.Method still reports CSSThenML unless CSS was
	// skipped.
	CSSThenML Method = iota
	// ML: exact maximum likelihood from zero ARMA coefficients and
	// least-squares regression coefficients.
	ML
	// CSS: conditional sum of squares only (needs complete data). The
	// reported log-likelihood is then the conditional one.
	CSS
)

// String returns "CSS-ML", "ML" or "CSS", or "Method(n)" for an unknown
// value.
func (m Method) String() string {
	switch m {
	case CSSThenML:
		return "CSS-ML"
	case ML:
		return "ML"
	case CSS:
		return "CSS"
	}
	return fmt.Sprintf("Method(%d)", int(m))
}

// Constant says whether a Spec has a constant term. Programs should not
// rely on the numeric values of the constants.
type Constant int

const (
	// ConstantAuto (the zero value): a mean when the model has no
	// differencing (d + D = 0), no constant otherwise.
	ConstantAuto Constant = iota
	// ConstantNone: no mean and no drift.
	ConstantNone
	// ConstantInclude: a mean when d + D = 0, a drift (a linear trend in
	// the undifferenced series, i.e. a constant in the once-differenced
	// one) when d + D = 1. With d + D ≥ 2 it is invalid: the constant
	// would be a quadratic or higher trend.
	ConstantInclude
)

// String returns "auto", "none" or "include", or "Constant(n)".
func (c Constant) String() string {
	switch c {
	case ConstantAuto:
		return "auto"
	case ConstantNone:
		return "none"
	case ConstantInclude:
		return "include"
	}
	return fmt.Sprintf("Constant(%d)", int(c))
}

// Prior chooses how the differencing states of a model with d + D > 0
// start. Programs should not rely on the numeric values of the
// constants.
type Prior int

const (
	// FinitePrior (the zero value): the differencing states start with
	// the large but finite variance κ = 10⁶σ², and observations whose
	// innovation variance is 10⁴σ² or more are left out of the likelihood
	// — R's stats::arima scheme, so log-likelihoods and estimates agree
	// with R's.
	FinitePrior Prior = iota
	// DiffusePrior: the exact diffuse initialisation (κ → ∞; Durbin &
	// Koopman 2012, ch. 5). The log-likelihood is then the exact
	// likelihood of the differenced series (with missing values: of the
	// observed values given the diffuse start), and the residuals of the
	// first d + sD observations are NaN.
	DiffusePrior
)

// String returns "finite" or "diffuse", or "Prior(n)".
func (p Prior) String() string {
	switch p {
	case FinitePrior:
		return "finite"
	case DiffusePrior:
		return "diffuse"
	}
	return fmt.Sprintf("Prior(%d)", int(p))
}

// Regressor is one column of a regression with ARIMA errors: a name
// (used in Coef, Fixed and error messages) and one value per observation
// of the series, all finite.
type Regressor struct {
	Name   string
	Values []float64
}

// Spec is a seasonal ARIMA model (p,d,q)×(P,D,Q)_Period, optionally with
// a mean or drift and regressors (regression with ARIMA errors):
//
//	φ(B) Φ(B^s) (1−B)^d (1−B^s)^D (y_t − x_t'β) = θ(B) Θ(B^s) e_t,  e_t ~ N(0, σ²)
//
// with φ(B) = 1 − φ₁B − …, θ(B) = 1 + θ₁B + … (and likewise for the
// seasonal polynomials). The mean is the mean of the process (a
// regression coefficient on a column of ones), the drift the coefficient
// of the time index 1, 2, ….
//
// The zero value is the white-noise model with a mean, fitted by CSS then
// ML. A Spec is a plain value, safe to share between goroutines; Fit does
// not modify it (and does not keep the Regressors slices beyond Fit
// except by copying).
//
// Example: arima.Spec{P: 0, D: 1, Q: 1, SP: 0, SD: 1, SQ: 1} is the airline
// model on a monthly series (Period taken from the series' frequency).
type Spec struct {
	P, D, Q    int // non-seasonal orders, each ≥ 0
	SP, SD, SQ int // seasonal orders, each ≥ 0
	// Period is the seasonal period s. 0 takes it from the series'
	// frequency when a seasonal order is non-zero; it must be ≥ 2 then.
	Period int
	// Constant chooses the mean or drift term; the zero value
	// (ConstantAuto) includes a mean only in undifferenced models.
	Constant Constant
	// Regressors are the columns of x_t (regression with ARIMA errors).
	// Forecasts then need future values: use Fitted.ForecastWith.
	Regressors []Regressor
	// Calendar holds regressors given as rules on the time axis
	// (holidays, events, Fourier cycles; see calendar.Design): Fit builds
	// their values for the series' own periods and the fitted model
	// builds their future values itself, so Forecast and Simulate need
	// nothing more. Their columns follow Regressors in the regression. A
	// column constant over the observed values cannot be estimated from
	// this series and is left out (Fitted.LeftOut, and String says so).
	// The zero value has none.
	Calendar calendar.Design
	// Fixed holds values for coefficients that are not estimated, keyed
	// by name: "ar1".."arp", "ma1".., "sar1".., "sma1".., "mean",
	// "drift", or a regressor name. nil fixes nothing.
	Fixed map[string]float64
	// Method is the estimation method; the zero value is CSSThenML.
	Method Method
	// Prior is the start of the differencing states in the exact
	// likelihood; the zero value is FinitePrior (R-compatible).
	Prior Prior
}

var _ almanac.Model = Spec{}

// String returns the model in the multiplicative notation of Box &
// Jenkins, the seasonal orders after "×" and the period after "_", e.g.
// "ARIMA(0,1,1)×(0,1,1)_12" ("_s" when the period is not yet known from a
// series and Period is 0); "ARIMA(2,1,0)" for a non-seasonal model. The
// form is stable.
func (s Spec) String() string {
	return orderString(s.P, s.D, s.Q, s.SP, s.SD, s.SQ, s.Period)
}

func orderString(p, d, q, sp, sd, sq, period int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "ARIMA(%d,%d,%d)", p, d, q)
	if sp+sd+sq > 0 {
		per := "s"
		if period > 0 {
			per = strconv.Itoa(period)
		}
		fmt.Fprintf(&b, "×(%d,%d,%d)_%s", sp, sd, sq, per)
	}
	return b.String()
}

// reserved reports whether name is one of the model's own coefficient
// names (ar1, ma2, sar1, sma1, mean, drift, ...).
func reserved(name string) bool {
	if name == "mean" || name == "drift" {
		return true
	}
	for _, pre := range []string{"sar", "sma", "ar", "ma"} {
		if rest, ok := strings.CutPrefix(name, pre); ok {
			if _, err := strconv.Atoi(rest); err == nil {
				return true
			}
		}
	}
	return false
}

// resolve checks the specification against series y and returns the
// coefficient layout.
func (s Spec) resolve(y almanac.Series) (*layout, error) {
	for _, o := range []struct {
		name string
		v    int
	}{{"P", s.P}, {"D", s.D}, {"Q", s.Q}, {"SP", s.SP}, {"SD", s.SD}, {"SQ", s.SQ}, {"Period", s.Period}} {
		if o.v < 0 {
			return nil, fmt.Errorf("arima: %w: %s = %d, must be ≥ 0", almanac.ErrInvalid, o.name, o.v)
		}
	}
	period := 0
	if s.SP+s.SD+s.SQ > 0 {
		period = s.Period
		if period == 0 {
			period = y.Period()
		}
		if period < 2 {
			return nil, fmt.Errorf("arima: %w: seasonal orders (%d,%d,%d) need a seasonal period ≥ 2, have %d (set Spec.Period or give the series a seasonal frequency)", almanac.ErrInvalid, s.SP, s.SD, s.SQ, period)
		}
	}
	// Lags that reach back to or beyond the start of the series are
	// rejected before anything is sized by them: such a coefficient never
	// meets an observed pair, and an absurd order or period (say 1<<40)
	// would otherwise size the state-space matrices (r × r) and exhaust
	// memory. Each order is bounded first so that the products below
	// cannot overflow.
	n := y.Len()
	for _, o := range []struct {
		name string
		v    int
	}{{"P", s.P}, {"D", s.D}, {"Q", s.Q}, {"SP", s.SP}, {"SD", s.SD}, {"SQ", s.SQ}, {"period", period}} {
		if o.v >= n {
			return nil, fmt.Errorf("arima: %w: %s = %d, the series has %d values", almanac.ErrTooShort, o.name, o.v, n)
		}
	}
	for _, l := range []struct {
		what string
		lag  int
	}{{"AR", s.P + period*s.SP}, {"MA", s.Q + period*s.SQ}, {"differencing", s.D + period*s.SD}} {
		if l.lag >= n {
			return nil, fmt.Errorf("arima: %w: %s reaches back %d lags (%s polynomial), the series has %d values", almanac.ErrTooShort, orderString(s.P, s.D, s.Q, s.SP, s.SD, s.SQ, period), l.lag, l.what, n)
		}
	}
	var mean, drift bool
	nd := s.D + s.SD
	switch s.Constant {
	case ConstantAuto:
		mean = nd == 0
	case ConstantNone:
	case ConstantInclude:
		switch nd {
		case 0:
			mean = true
		case 1:
			drift = true
		default:
			return nil, fmt.Errorf("arima: %w: a constant with d + D = %d would be a polynomial trend of degree %d; use ConstantNone or less differencing", almanac.ErrInvalid, nd, nd)
		}
	default:
		return nil, fmt.Errorf("arima: %w: unknown Constant %v", almanac.ErrInvalid, s.Constant)
	}
	switch s.Method {
	case CSSThenML, ML, CSS:
	default:
		return nil, fmt.Errorf("arima: %w: unknown Method %v", almanac.ErrInvalid, s.Method)
	}
	switch s.Prior {
	case FinitePrior, DiffusePrior:
	default:
		return nil, fmt.Errorf("arima: %w: unknown Prior %v", almanac.ErrInvalid, s.Prior)
	}
	seen := map[string]bool{}
	names := make([]string, len(s.Regressors))
	for j, r := range s.Regressors {
		if r.Name == "" {
			return nil, fmt.Errorf("arima: %w: regressor %d has no name", almanac.ErrInvalid, j)
		}
		if reserved(r.Name) {
			return nil, fmt.Errorf("arima: %w: regressor name %q is reserved for a model coefficient", almanac.ErrInvalid, r.Name)
		}
		if seen[r.Name] {
			return nil, fmt.Errorf("arima: %w: two regressors named %q", almanac.ErrInvalid, r.Name)
		}
		seen[r.Name] = true
		if len(r.Values) != n {
			return nil, fmt.Errorf("arima: %w: regressor %q has %d values, the series %d", almanac.ErrLength, r.Name, len(r.Values), n)
		}
		for i, v := range r.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("arima: %w: regressor %q at index %d is %v", almanac.ErrNonFinite, r.Name, i, v)
			}
		}
		names[j] = r.Name
	}
	lay := newLayout(s.P, s.D, s.Q, s.SP, s.SD, s.SQ, period, mean, drift, names)
	for name, v := range s.Fixed {
		found := false
		for _, nm := range lay.names {
			if nm == name {
				found = true
				break
			}
		}
		if !found {
			return nil, fmt.Errorf("arima: %w: Fixed names %q, which is not a coefficient of %s (coefficients: %s)", almanac.ErrInvalid, name, lay.orders(), strings.Join(lay.names, ", "))
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("arima: %w: Fixed[%q] = %v", almanac.ErrInvalid, name, v)
		}
	}
	return lay, nil
}

func (l *layout) orders() string {
	return orderString(l.p, l.d, l.q, l.sp, l.sd, l.sq, l.s)
}

// Fit estimates the model on y and returns a *Fitted.
//
// Special cases:
//   - an invalid series (empty, all missing, ±Inf) gives the error of
//     almanac.Series.Validate; a constant one wraps almanac.ErrConstant;
//     values of magnitude 2^1023 (about 9e307) or more wrap
//     almanac.ErrNonFinite (the recursions would overflow);
//   - negative orders, a seasonal order without a period ≥ 2, an unknown
//     name in Fixed or a bad regressor name give errors wrapping
//     almanac.ErrInvalid;
//   - regressors of the wrong length wrap almanac.ErrLength, non-finite
//     regressor values almanac.ErrNonFinite, collinear ones ErrCollinear;
//   - too few observations for the orders wrap almanac.ErrTooShort, and
//     so does an AR, MA or differencing polynomial (multiplied out,
//     p + s·P, q + s·Q, d + s·D) that reaches back n lags or more;
//   - Method CSS with missing values wraps almanac.ErrMissing;
//   - a fit whose likelihood is nowhere finite wraps almanac.ErrNotFitted.
func (s Spec) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	f, err := s.fit(ctx, y)
	if err != nil {
		return nil, err
	}
	return f, nil
}
