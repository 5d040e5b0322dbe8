package almanac

import (
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac/internal/trigg"
)

// Refresher is implemented by fitted models that can take new
// observations without estimating anything again: Refresh returns a new
// fitted model on the series extended by newValues (NaN marks a missing
// one), with the estimated parameters unchanged and the states advanced
// by the model's own filter, so that it equals a fit of the whole series
// with the parameters fixed at their estimates. The receiver is not
// modified. ETS, ARIMA, Box-Cox and combinations (through their members)
// implement it.
type Refresher interface {
	Refresh(newValues []float64) (Fitted, error)
}

// Refresh calls f.Refresh when f implements Refresher, so callers need
// no type switch. A model that does not gives an error wrapping
// ErrNotRefreshable (refit it instead).
func Refresh(f Fitted, newValues []float64) (Fitted, error) {
	r, ok := f.(Refresher)
	if !ok || f == nil {
		return nil, fmt.Errorf("almanac: refresh: %w: %v takes no new observations without a refit", ErrNotRefreshable, f)
	}
	return r.Refresh(newValues)
}

var (
	_ Refresher = (*BoxCoxFit)(nil)
	_ Refresher = (*CombinationFit)(nil)
)

// Refresh implements Refresher: the new values are transformed with the
// fitted λ and given to the inner model's Refresh.
//
// Special cases: an inner model that cannot be refreshed gives an error
// wrapping ErrNotRefreshable; a new value outside the transform's domain
// one wrapping ErrNonPositive or ErrNonFinite; the inner model's errors
// are passed on.
func (f *BoxCoxFit) Refresh(newValues []float64) (Fitted, error) {
	z, err := BoxCoxTransform(nil, newValues, f.lambda)
	if err != nil {
		return nil, fmt.Errorf("almanac: box-cox refresh: %w", err)
	}
	inner, err := Refresh(f.inner, z)
	if err != nil {
		return nil, err
	}
	y := f.y.Clone()
	y.Values = append(y.Values, newValues...)
	return newBoxCoxFit(y, f.lambda, f.estimated, f.bias, inner)
}

// Refresh implements Refresher: every member is refreshed with the new
// values and the members keep their weights (nothing is evaluated
// again); members that failed to fit stay left out.
//
// Special cases: a member that cannot be refreshed gives an error
// wrapping ErrNotRefreshable; a member's error is passed on with its
// position.
func (f *CombinationFit) Refresh(newValues []float64) (Fitted, error) {
	y := f.y.Clone()
	y.Values = append(y.Values, newValues...)
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("almanac: combination refresh: %w", err)
	}
	out := &CombinationFit{rule: f.rule, failures: slices.Clone(f.failures), weighting: f.weighting, y: y, paths: f.paths, seed: f.seed}
	for _, m := range f.members {
		fit, err := Refresh(m.Fitted, newValues)
		if err != nil {
			return nil, fmt.Errorf("almanac: combination refresh: member %d (%s): %w", m.Index, m.Fitted, err)
		}
		if err := sameAxis(y, fit); err != nil {
			return nil, fmt.Errorf("almanac: combination refresh: member %d: %w", m.Index, err)
		}
		m.Fitted = fit
		out.members = append(out.members, m)
	}
	out.combineInSample()
	return out, nil
}

// Defaults of RefreshPolicy.
const (
	// DefaultRefitAfter is RefreshPolicy.RefitAfter when it is 0.
	DefaultRefitAfter = 12
	// DefaultSignalWeight is RefreshPolicy.SignalWeight when it is 0.
	DefaultSignalWeight = 0.1
	// DefaultSignalLimit is RefreshPolicy.SignalLimit when it is 0.
	DefaultSignalLimit = 0.5
)

// RefreshPolicy decides whether a model that has taken new observations
// by Refresh should be estimated again. Its zero value refits after
// DefaultRefitAfter new observations or when Trigg's tracking signal
// leaves ±DefaultSignalLimit. It is a plain value, safe to share.
//
// Trigg's (1964) tracking signal is the ratio of the exponentially
// smoothed one-step errors to the exponentially smoothed absolute
// errors, both with weight α (SignalWeight): T = E/M with
// E_t = α e_t + (1 − α) E_{t−1} and M_t = α |e_t| + (1 − α) M_{t−1},
// from E_0 = 0 and M_0 the mean absolute error of the first ⌈1/α⌉
// errors (common practice), missing errors passed over: the signal of
// accuracy.TriggSignal, computed by the same code. It
// lies in [−1, 1] and stays near 0 while the errors have no bias; a
// value near ±1 says the forecasts have been too low (positive) or too
// high (negative) for a while, the sign of a model that has drifted
// from the data. Limits near 0.5 for α = 0.1 are common practice (Trigg
// 1964 tabulates them; the value is recalled from memory). With
// unbiased, independent normal errors and α = 0.1 the signal passes ±0.5
// in about 7.6% of periods (simulated in accuracy's TestTriggLimit), a
// little more often than one in twenty: accuracy.TriggLimit, 0.54, is
// the 95% limit, checked there by simulation.
//
// Source: D. W. Trigg (1964), "Monitoring a forecasting system",
// Operational Research Quarterly 15, 271–274.
type RefreshPolicy struct {
	// RefitAfter is the number of observations added by refreshes since
	// the last estimation from which a refit is due; 0 means
	// DefaultRefitAfter, negative turns the rule off.
	RefitAfter int
	// SignalWeight is α of the tracking signal, in (0, 1); 0 means
	// DefaultSignalWeight.
	SignalWeight float64
	// SignalLimit is the bound on |T| beyond which a refit is due, in
	// (0, 1); 0 means DefaultSignalLimit, negative turns the rule off.
	SignalLimit float64
}

// RefreshDecision is what RefreshPolicy.Decide concluded and why.
type RefreshDecision struct {
	// Refit is true when the model should be estimated again on the
	// whole series, false when refreshing it is enough.
	Refit bool
	// Reason says why, in a sentence meant for logs and reports.
	Reason string
	// Added is the number of observations added since the last
	// estimation, as given to Decide.
	Added int
	// Signal is the tracking signal at the last observation (NaN when
	// it was not computed: too few errors, an infinite error, every
	// error zero, or the rule is off; Reason says which).
	Signal float64
}

// Decide says whether f — a model refreshed with added observations
// since it was last estimated — should be refitted: when f cannot be
// refreshed at all, when added reaches RefitAfter, or when the tracking
// signal of its one-step errors on the data's scale (ResponseResiduals;
// missing values skipped, computed once at least 1/α errors exist) lies
// beyond ±SignalLimit. Otherwise refreshing is enough. The usual loop is
//
//	refreshed, err := almanac.Refresh(fit, week)
//	d, err := policy.Decide(refreshed, added+len(week))
//	if d.Refit { /* fit the model again on the whole series */ }
//
// Special cases: a negative added, SignalWeight outside [0, 1) or
// SignalLimit ≥ 1 give an error wrapping ErrInvalid.
func (p RefreshPolicy) Decide(f Fitted, added int) (RefreshDecision, error) {
	alpha, limit, every := p.SignalWeight, p.SignalLimit, p.RefitAfter
	if alpha == 0 {
		alpha = DefaultSignalWeight
	}
	if limit == 0 {
		limit = DefaultSignalLimit
	}
	if every == 0 {
		every = DefaultRefitAfter
	}
	switch {
	case added < 0:
		return RefreshDecision{}, fmt.Errorf("almanac: refresh policy: %w: %d observations added", ErrInvalid, added)
	case !(alpha > 0 && alpha < 1):
		return RefreshDecision{}, fmt.Errorf("almanac: refresh policy: %w: signal weight %v outside (0, 1)", ErrInvalid, p.SignalWeight)
	case math.IsNaN(limit) || limit >= 1:
		return RefreshDecision{}, fmt.Errorf("almanac: refresh policy: %w: signal limit %v (need a value in (0, 1), or negative for none)", ErrInvalid, p.SignalLimit)
	case f == nil:
		return RefreshDecision{}, fmt.Errorf("almanac: refresh policy: %w: no model", ErrInvalid)
	}
	d := RefreshDecision{Added: added, Signal: math.NaN()}
	why := ""
	if _, ok := f.(Refresher); !ok {
		d.Refit, d.Reason = true, fmt.Sprintf("refit: %s cannot take new observations without estimation", f)
		return d, nil
	}
	if limit > 0 {
		d.Signal, why = trackingSignal(ResponseResiduals(f), alpha)
	}
	switch {
	case every > 0 && added >= every:
		d.Refit, d.Reason = true, fmt.Sprintf("refit: %d observations added since the last estimation (refit after %d)", added, every)
	case !math.IsNaN(d.Signal) && math.Abs(d.Signal) > limit:
		dir := "below"
		if d.Signal > 0 {
			dir = "above"
		}
		d.Refit, d.Reason = true, fmt.Sprintf("refit: tracking signal %.2f beyond ±%.2f (the data have run %s the forecasts)", d.Signal, limit, dir)
	case limit > 0 && math.IsNaN(d.Signal):
		d.Reason = fmt.Sprintf("refresh: %d observations added, %s", added, why)
	case limit > 0:
		d.Reason = fmt.Sprintf("refresh: %d observations added, tracking signal %.2f within ±%.2f", added, d.Signal, limit)
	default:
		d.Reason = fmt.Sprintf("refresh: %d observations added", added)
	}
	return d, nil
}

// trackingSignal returns Trigg's tracking signal (see RefreshPolicy;
// computed by internal/trigg, as accuracy.TriggSignal is) at the end of
// the errors e with smoothing weight alpha, and why there is none: NaN
// with a reason when fewer than ⌈1/α⌉ errors are observed, an error is
// infinite, or every error is zero.
func trackingSignal(e []float64, alpha float64) (float64, string) {
	s, r := trigg.Signal(e, alpha)
	switch {
	case r.Problem == trigg.NonFinite:
		return math.NaN(), fmt.Sprintf("no tracking signal: one-step error %d is %v", r.Index+1, e[r.Index])
	case r.Problem == trigg.AllZero:
		return math.NaN(), "no tracking signal: every one-step error is 0"
	case r.Problem != trigg.None || float64(r.Observed) < math.Ceil(1/alpha):
		return math.NaN(), "too few one-step errors for the tracking signal"
	}
	return s, ""
}
