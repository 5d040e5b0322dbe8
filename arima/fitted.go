package arima

import (
	"fmt"
	"math"
	"strings"
	"sync"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"gonum.org/v1/gonum/mat"
)

// Fitted is an ARIMA model estimated on one series. It is read-only after
// Fit returns and safe for concurrent use.
type Fitted struct {
	spec   Spec
	lay    *layout
	key    string
	start  time.Time
	freq   calendar.Frequency
	n      int
	method Method
	nUsed  int
	ncond  int

	y    []float64
	x    [][]float64 // regression columns used in the fit
	coef []float64
	free []int
	// cov is the covariance of the free coefficients, computed on first
	// use from covFn (a numerical Hessian costs as much as the fit of a
	// small model, and model search does not need it).
	covOnce sync.Once
	covFn   func() *mat.SymDense
	cov     *mat.SymDense
	kal     *kalman // filtered state after the last observation
	timed   *timed  // regressors built from Spec.Calendar (nil: none)
	resid   []float64

	sigma2, loglik float64
	sigma          float64   // √σ², kept separately so extreme scales do not under/overflow
	covScale       []float64 // cov is for the coefficients divided by these (data scale for regression ones)
	converged      bool

	search *SearchResult // the record of the Search that chose the model, nil for Spec.Fit

	// For Update and saving: the filter's sums over the observations so
	// far (on the data divided by scale), the power of two the data were
	// divided by, and the number of observations the coefficients were
	// estimated on.
	sums  filterResult
	scale float64
	nfit  int
}

var (
	_ almanac.Fitted       = (*Fitted)(nil)
	_ almanac.ParamCounter = (*Fitted)(nil)
)

// Coefficient is one estimated or fixed coefficient of a fitted model.
type Coefficient struct {
	Name  string  // "ar1", "ma1", "sar1", "sma1", "mean", "drift" or a regressor name
	Value float64 // estimate (or the fixed value)
	// StdErr is the standard error from the numerical Hessian of the
	// objective (NaN for fixed coefficients or when the Hessian is not
	// positive definite). The Hessian is computed on the first call of
	// Coef or CoefCov.
	StdErr float64
	Fixed  bool // true when the value was given in Spec.Fixed
}

// Coef returns the coefficients in model order: ar1..arp, ma1..maq,
// sar1..sarP, sma1..smaQ, then mean, drift and the regressors.
func (f *Fitted) Coef() []Coefficient {
	out := make([]Coefficient, len(f.coef))
	for i, name := range f.lay.names {
		out[i] = Coefficient{Name: name, Value: f.coef[i], StdErr: math.NaN(), Fixed: true}
	}
	cov := f.covariance()
	for fi, i := range f.free {
		out[i].Fixed = false
		if cov != nil {
			out[i].StdErr = math.Sqrt(cov.At(fi, fi)) * f.covScale[fi]
		}
	}
	return out
}

// CoefCov returns the covariance matrix of the estimated (not fixed)
// coefficients, in Coef order with the fixed ones left out, or nil when it
// is not available (no estimated coefficient, or a Hessian that is not
// positive definite).
func (f *Fitted) CoefCov() *mat.SymDense {
	cov := f.covariance()
	if cov == nil {
		return nil
	}
	k := cov.SymmetricDim()
	out := mat.NewSymDense(k, nil)
	for i := 0; i < k; i++ {
		for j := 0; j <= i; j++ {
			out.SetSym(i, j, cov.At(i, j)*f.covScale[i]*f.covScale[j])
		}
	}
	return out
}

// covariance returns the (scaled) coefficient covariance, computing it on
// the first call.
func (f *Fitted) covariance() *mat.SymDense {
	f.covOnce.Do(func() {
		if f.covFn != nil {
			f.cov = f.covFn()
			f.covFn = nil
		}
	})
	return f.cov
}

// Sigma2 returns the estimated innovation variance σ²: the sum of squared
// standardised innovations over the observations in the likelihood
// divided by their number (for CSS: the mean squared conditional
// residual).
func (f *Fitted) Sigma2() float64 { return f.sigma2 }

// LogLik returns the maximised Gaussian log-likelihood (for Method CSS the
// conditional one, −n/2 (log 2π + 1 + log σ²)), on R's stats::arima
// definition (see the package documentation).
func (f *Fitted) LogLik() float64 { return f.loglik }

// NumParams returns the number of estimated coefficients k (σ² not
// counted; fixed coefficients not counted).
func (f *Fitted) NumParams() int { return len(f.free) }

// NumObs returns the number of observations in the likelihood: the
// observed values minus d + s·D.
func (f *Fitted) NumObs() int { return f.nUsed }

// AIC returns −2 log L + 2(k+1), k = NumParams (σ² counted as the +1).
func (f *Fitted) AIC() float64 { return -2*f.loglik + 2*float64(len(f.free)+1) }

// AICc returns the AIC with the small-sample correction
// 2(k+1)(k+2)/(n−k−2), n = NumObs; +Inf when n ≤ k+2.
func (f *Fitted) AICc() float64 {
	k := float64(len(f.free))
	n := float64(f.nUsed)
	if n-k-2 <= 0 {
		return math.Inf(1)
	}
	return f.AIC() + 2*(k+1)*(k+2)/(n-k-2)
}

// BIC returns −2 log L + log(n)(k+1), n = NumObs.
func (f *Fitted) BIC() float64 {
	return -2*f.loglik + math.Log(float64(f.nUsed))*float64(len(f.free)+1)
}

// Method returns the method actually used (CSSThenML becomes ML when the
// series has missing values or is too short for CSS).
func (f *Fitted) Method() Method { return f.method }

// Converged reports whether the optimiser met its convergence test (a
// line-search stall near the optimum gives false; the estimate is still
// returned).
func (f *Fitted) Converged() bool { return f.converged }

// SearchResult returns the record of the Search that chose this model
// (every candidate tried, with its score), or nil when the model was
// fitted by Spec.Fit.
func (f *Fitted) SearchResult() *SearchResult { return f.search }

// Spec returns the specification that was fitted.
func (f *Fitted) Spec() Spec { return f.spec }

// Period returns the seasonal period used (0 for a non-seasonal model).
func (f *Fitted) Period() int { return f.lay.s }

// Residuals returns the standardised one-step innovations v_t/√F_t of
// the Kalman filter (on the scale of σ; NaN where y is missing). The first
// d + s·D of them are divided by a very large √F_t and close to zero
// (NaN with DiffusePrior, where those observations only fix the
// differencing states). For
// Method CSS they are the conditional residuals (zero for the first
// d + s·D + p + s·P).
func (f *Fitted) Residuals() []float64 { return append([]float64(nil), f.resid...) }

// FittedValues returns the one-step-ahead predictions y_t minus
// Residuals()[t], with NaN where no prediction exists: at missing values
// and for the first d + s·D observations (which only fix the differencing
// states; for Method CSS the first d + s·D + p + s·P, the conditioning
// values).
func (f *Fitted) FittedValues() []float64 {
	skip := f.lay.d + f.lay.s*f.lay.sd
	if f.method == CSS {
		skip = f.ncond
	}
	out := make([]float64, f.n)
	for i := range out {
		if i < skip {
			out[i] = math.NaN()
			continue
		}
		out[i] = f.y[i] - f.resid[i]
	}
	return out
}

// String returns the model in the notation of Spec.String, "ARIMA(0,1,1)×(0,1,1)_12",
// with the deterministic and regression terms appended in our own form:
// " + mean" or " + drift" when present and " + regressors(name, ...)"
// when regressors were used, e.g.
// "ARIMA(2,0,0) + mean + regressors(year)".
func (f *Fitted) String() string {
	var b strings.Builder
	b.WriteString(f.lay.orders())
	if f.lay.mean {
		b.WriteString(" + mean")
	}
	if f.lay.drift {
		b.WriteString(" + drift")
	}
	if len(f.lay.regNames) > 0 {
		b.WriteString(" + regressors(" + strings.Join(f.lay.regNames, ", ") + ")")
	}
	b.WriteString(f.leftOutString())
	return b.String()
}

// Forecast returns forecasts for h steps after the end of the series with
// exact mean-squared errors from the state-space form (differencing and
// drift included), as Normal intervals at the given levels. As usual (and
// as in R's predict for arima fits) the mean-squared errors treat the
// estimated coefficients — mean, drift and regression coefficients
// included — as known.
//
// Special cases: a model fitted with regressors gives an error wrapping
// ErrNeedRegressors (use ForecastWith); h < 1 wraps almanac.ErrHorizon; a
// level outside (0, 100) wraps almanac.ErrLevel.
func (f *Fitted) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if user := f.lay.regNames[:len(f.lay.regNames)-f.numTimed()]; len(user) > 0 {
		return almanac.Forecast{}, fmt.Errorf("arima: %w: %s was fitted with regressors %s; call ForecastWith with their future values", ErrNeedRegressors, f, quoteJoin(user))
	}
	return f.ForecastWith(h, nil, levels...)
}

// ForecastWith is Forecast for models with regressors: future[j] holds the
// h future values of regressor j (in Spec.Regressors order). For a model
// without regressors future must be empty.
//
// Special cases: as Forecast; future with the wrong number of columns,
// a column of length ≠ h or a non-finite value gives an error wrapping
// ErrNeedRegressors; a Method CSS fit whose AR part is not stationary has
// no state-space form and gives an error wrapping ErrNonStationary.
func (f *Fitted) ForecastWith(h int, future [][]float64, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("arima: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("arima: %w", err)
	}
	nreg := len(f.lay.regNames) - f.numTimed() // the calendar's columns are built here
	if len(future) != nreg {
		return almanac.Forecast{}, fmt.Errorf("arima: %w: %d future regressor columns given, the model has %d", ErrNeedRegressors, len(future), nreg)
	}
	for j, col := range future {
		if len(col) != h {
			return almanac.Forecast{}, fmt.Errorf("arima: %w: regressor %q has %d future values, horizon is %d", ErrNeedRegressors, f.lay.regNames[j], len(col), h)
		}
		for i, v := range col {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return almanac.Forecast{}, fmt.Errorf("arima: %w: future value %d of regressor %q is %v", ErrNeedRegressors, i, f.lay.regNames[j], v)
			}
		}
	}
	if f.kal == nil {
		return almanac.Forecast{}, fmt.Errorf("arima: %w: %s has a non-stationary AR part, no state-space forecast", ErrNonStationary, f.lay.orders())
	}
	future, err := f.withTimed(h, future)
	if err != nil {
		return almanac.Forecast{}, err
	}
	k := f.kal.clone()
	mean := make([]float64, h)
	sd := make([]float64, h)
	k.forecast(mean, sd)
	for i := range sd {
		sd[i] = math.Sqrt(sd[i]) * f.sigma
	}
	na := f.lay.narma()
	j := na
	if f.lay.mean {
		for i := range mean {
			mean[i] += f.coef[j]
		}
		j++
	}
	if f.lay.drift {
		for i := range mean {
			mean[i] += f.coef[j] * float64(f.n+i+1)
		}
		j++
	}
	for c, col := range future {
		b := f.coef[j+c]
		for i := range mean {
			mean[i] += b * col[i]
		}
	}
	dist := &almanac.Normal{Mean: mean, SD: sd}
	fc, err := almanac.NewForecast(f.freq.Add(f.start, f.n), f.freq, append([]float64(nil), mean...), dist, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("arima: %w", err)
	}
	return fc, nil
}
