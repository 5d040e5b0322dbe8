package almanac

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"strings"
)

// CombineRule says how a Combination joins its members' forecasts.
// Programs should not rely on the numeric values.
type CombineRule int

const (
	// CombineMean is the equal-weight mean of the members (the zero
	// value).
	CombineMean CombineRule = iota
	// CombineMedian is the median across the members at each step (the
	// mean of the two middle ones for an even count).
	CombineMedian
	// CombineWeighted is the weighted mean with Combination.Weights,
	// weights computed elsewhere (for example from an accuracy.Backtest).
	CombineWeighted
	// CombineInverseError is the weighted mean with weights proportional
	// to the inverse of each member's mean squared error in a small
	// rolling-origin evaluation run inside Fit (Bates & Granger 1969).
	CombineInverseError
)

// String returns "mean", "median", "weighted" or "inverse-error", and
// CombineRule(n) otherwise.
func (r CombineRule) String() string {
	switch r {
	case CombineMean:
		return "mean"
	case CombineMedian:
		return "median"
	case CombineWeighted:
		return "weighted"
	case CombineInverseError:
		return "inverse-error"
	}
	return fmt.Sprintf("CombineRule(%d)", int(r))
}

// Defaults of Combination.
const (
	// DefaultCombinationPaths is the number of combined sample paths
	// drawn for the bands when Combination.Paths is 0.
	DefaultCombinationPaths = 1000
	// DefaultWeightOrigins is the number of rolling origins of the
	// inverse-error weighting when Combination.Origins is 0.
	DefaultWeightOrigins = 3
)

// Combination is a Model that fits several models to the same series and
// combines their forecasts. Forecast combination is among the most
// reliable ways to improve accuracy (Bates & Granger 1969; Clemen 1989;
// the M3 and M4 competitions, Makridakis & Hibon 2000, Makridakis,
// Spiliotis & Assimakopoulos 2020); the equal-weight mean is hard to beat
// (Smith & Wallis 2009) and is the default.
//
// # Members and failures
//
// Fit fits the members one after the other on the whole series (no
// goroutines). A member that fails — returns an error, panics, or gives
// fitted values of the wrong length — is left out and recorded in
// CombinationFit.Failures with its reason; only when every member fails
// does Fit return an error, which wraps ErrNotFitted and every member's
// error (so errors.Is finds, say, ErrTooShort when a member reported it).
// A cancelled ctx is never a member failure: Fit returns ctx.Err().
//
// # Point forecasts, fitted values and residuals
//
// The point forecast at each step is the rule applied to the members'
// point forecasts (Forecast.Mean); the fitted values are the rule applied
// to the members' fitted values (NaN where any member has none), and the
// residuals are y − fitted value on the data's scale.
//
// # Bands
//
// When every member's forecast carries a distribution and can be drawn
// from (the fitted member implements Simulator, or its forecast holds
// sample paths), the bands come from Paths combined sample paths, made in
// two steps. First every member draws Paths paths from the same seeded
// source state (common random numbers: members that consume their random
// numbers alike, such as exponential smoothing and Theta with one normal
// draw per step, are driven by the same shocks), and the rule is applied
// draw by draw. Then, step by step, these raw combined values are
// replaced by the rule applied to the members' quantiles at the same rank
// — the Schaake shuffle (Clark et al. 2004; ensemble copula coupling,
// Schefzik, Thorarinsdottir & Gneiting 2013) of comonotone margins onto
// the ranks of the raw combination. So at every step the combined
// quantile is the rule applied to the members' quantiles ("quantile
// averaging", Lichtendahl, Grushka-Cockayne & Winkler 2013), and across
// steps the paths keep the dependence of the raw combination, so sums
// over the horizon have a distribution. Comonotone margins are a
// deliberate assumption: forecasts of one series by different models err
// together (their errors are strongly and positively correlated), and
// members whose simulations do not consume random numbers alike (ARIMA
// draws its starting state first) would otherwise be combined as if
// independent, which shrinks the spread of a mean of k members by up to
// √k and makes the bands too narrow. A draw that left its model's domain
// (NaN, as multiplicative exponential smoothing can give) is not used:
// the member's quantiles come from its finite draws, and a raw combined
// value that is NaN ranks lowest.
//
// When some member cannot be drawn from, the combined distribution is the
// rule applied to the members' quantiles, p by p (the same comonotone
// assumption, without paths; Forecast.SamplePaths is then nil and
// Simulate fails). Members whose forecast has no distribution at all
// (point forecasts only) take part in the point forecast but not in the
// spread: the distribution of the others is shifted to centre on the
// combined point forecast. With no member carrying a distribution the
// combined forecast has none, and asking for levels gives an error
// wrapping ErrNoDistribution.
//
// # Inverse-error weights
//
// With CombineInverseError, Fit first evaluates each member at Origins
// rolling origins at the end of the series (training on everything before
// each origin, forecasting Horizon steps), and weights each member by the
// inverse of its mean squared error over the (origin, step) cells every
// member completed. When some member completed no origin, or no origin
// was completed by all, or the series is too short for any origin, the
// members get equal weights; CombinationFit.Weighting says which
// happened. This costs Origins extra fits of every member. Weights
// computed elsewhere, for example from an accuracy.Backtest over a whole
// catalogue, can be given with CombineWeighted.
//
// A Combination is a specification, safe to share between goroutines
// when its members are.
type Combination struct {
	// Members are the models combined, in order. At least one; none nil.
	Members []Model
	// Rule is how forecasts are combined; the zero value is CombineMean.
	Rule CombineRule
	// Weights are the member weights for CombineWeighted: one finite,
	// non-negative weight per member, not all zero; they are divided by
	// their sum (over the members fitted). A member of weight 0 is not
	// fitted. Must be nil for the other rules.
	Weights []float64
	// Origins is the number of rolling origins of CombineInverseError; 0
	// means DefaultWeightOrigins. Ignored by the other rules. Negative is
	// invalid.
	Origins int
	// Horizon is the number of steps scored at each origin by
	// CombineInverseError; 0 means the seasonal period, at least 6. It is
	// cut to a third of the series when longer. Ignored by the other
	// rules. Negative is invalid.
	Horizon int
	// Paths is the number of combined sample paths behind the bands; 0
	// means DefaultCombinationPaths. Negative is invalid.
	Paths int
	// Seed seeds the generator (math/rand/v2 PCG) of the members' sample
	// paths in Forecast. The same Seed gives the same bands.
	Seed uint64
}

var _ Model = Combination{}

// MemberFailure is a member of a combination left out, and why.
type MemberFailure struct {
	// Index is the member's position in Combination.Members.
	Index int
	// Model names the member: its String method when it has one, else
	// its Go type (e.g. "smoothing.Select").
	Model string
	// Err is the member's error (or the recovered panic, wrapping
	// ErrNotFitted).
	Err error
}

// Error returns "member I (MODEL): ERROR".
func (m MemberFailure) Error() string {
	return fmt.Sprintf("member %d (%s): %v", m.Index, m.Model, m.Err)
}

// CombinedMember is a fitted member of a combination.
type CombinedMember struct {
	// Index is the member's position in Combination.Members.
	Index int
	// Fitted is the member fitted to the whole series.
	Fitted Fitted
	// Weight is its weight in the combined mean (they sum to 1); for
	// CombineMedian, 1/number of members.
	Weight float64
	// MSE is its mean squared error in the rolling-origin evaluation of
	// CombineInverseError, NaN otherwise or when it was not used.
	MSE float64
}

// CombinationFit is a fitted Combination. It is read-only and safe for
// concurrent use when its members are.
type CombinationFit struct {
	rule      CombineRule
	members   []CombinedMember
	specs     []Model // the Model of each member, for Update
	failures  []MemberFailure
	weighting string
	y         Series
	fitted    []float64
	resid     []float64
	paths     int
	seed      uint64
}

var (
	_ Fitted    = (*CombinationFit)(nil)
	_ Simulator = (*CombinationFit)(nil)
)

// memberName names member m for failure reports.
func memberName(m Model) (name string) {
	typ := strings.TrimPrefix(fmt.Sprintf("%T", m), "*")
	defer func() {
		if recover() != nil { // a String method that panics (a nil pointer)
			name = typ
		}
	}()
	if s, ok := m.(fmt.Stringer); ok {
		return s.String()
	}
	return typ
}

// check validates the specification.
func (c Combination) check() error {
	if len(c.Members) == 0 {
		return fmt.Errorf("almanac: combination: %w: no members", ErrInvalid)
	}
	for i, m := range c.Members {
		if m == nil {
			return fmt.Errorf("almanac: combination: %w: member %d is nil", ErrInvalid, i)
		}
	}
	switch c.Rule {
	case CombineMean, CombineMedian, CombineInverseError:
		if c.Weights != nil {
			return fmt.Errorf("almanac: combination: %w: weights given with rule %v (use CombineWeighted)", ErrInvalid, c.Rule)
		}
	case CombineWeighted:
		if len(c.Weights) != len(c.Members) {
			return fmt.Errorf("almanac: combination: %w: %w: %d weights for %d members", ErrInvalid, ErrLength, len(c.Weights), len(c.Members))
		}
		sum := 0.0
		for i, w := range c.Weights {
			if !(w >= 0) || math.IsInf(w, 0) {
				return fmt.Errorf("almanac: combination: %w: weight %d is %v; weights must be finite and non-negative", ErrInvalid, i, w)
			}
			sum += w
		}
		if !(sum > 0) || math.IsInf(sum, 0) {
			return fmt.Errorf("almanac: combination: %w: weights sum to %v", ErrInvalid, sum)
		}
	default:
		return fmt.Errorf("almanac: combination: %w: rule %v", ErrInvalid, c.Rule)
	}
	switch {
	case c.Origins < 0:
		return fmt.Errorf("almanac: combination: %w: %d origins", ErrInvalid, c.Origins)
	case c.Horizon < 0:
		return fmt.Errorf("almanac: combination: %w: horizon %d", ErrInvalid, c.Horizon)
	case c.Paths < 0:
		return fmt.Errorf("almanac: combination: %w: %d sample paths", ErrInvalid, c.Paths)
	}
	return nil
}

// fitMember fits m to y, turning a panic, a nil fit and fitted values of
// the wrong length into errors.
func fitMember(ctx context.Context, m Model, y Series) (f Fitted, err error) {
	defer func() {
		if r := recover(); r != nil {
			f, err = nil, fmt.Errorf("%w: model panicked: %v", ErrNotFitted, r)
		}
	}()
	f, err = m.Fit(ctx, y)
	if err != nil {
		return nil, err
	}
	if f == nil {
		return nil, fmt.Errorf("%w: model returned no fit and no error", ErrNotFitted)
	}
	if fv := f.FittedValues(); len(fv) != y.Len() {
		return nil, fmt.Errorf("%w: %s gave %d fitted values for %d observations", ErrLength, f, len(fv), y.Len())
	}
	return f, nil
}

// Fit implements Model: it fits every member (see Combination) and
// returns a *CombinationFit.
//
// Special cases: no members, a nil member, an unknown rule, weights that
// do not match the rule or the members, or a negative Origins, Horizon or
// Paths give an error wrapping ErrInvalid; an invalid series the error of
// Series.Validate; every member failing an error wrapping ErrNotFitted
// and each member's error; a cancelled ctx ctx.Err().
func (c Combination) Fit(ctx context.Context, y Series) (Fitted, error) {
	if err := c.check(); err != nil {
		return nil, err
	}
	if err := y.Validate(); err != nil {
		return nil, err
	}
	f := &CombinationFit{rule: c.Rule, y: y.Clone(), paths: c.Paths, seed: c.Seed}
	if f.paths == 0 {
		f.paths = DefaultCombinationPaths
	}
	for i, m := range c.Members {
		if c.Rule == CombineWeighted && c.Weights[i] == 0 {
			continue // not part of the combination
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		fit, err := fitMember(ctx, m, y)
		if err != nil {
			if cerr := ctx.Err(); cerr != nil {
				return nil, cerr
			}
			f.failures = append(f.failures, MemberFailure{Index: i, Model: memberName(m), Err: err})
			continue
		}
		f.members = append(f.members, CombinedMember{Index: i, Fitted: fit, MSE: math.NaN()})
		f.specs = append(f.specs, m)
	}
	if len(f.members) == 0 {
		return nil, allFailed(y.Key, "fit", f.failures)
	}
	switch c.Rule {
	case CombineMean, CombineMedian:
		for k := range f.members {
			f.members[k].Weight = 1 / float64(len(f.members))
		}
	case CombineWeighted:
		sum := 0.0
		for _, m := range f.members {
			sum += c.Weights[m.Index]
		}
		for k := range f.members {
			f.members[k].Weight = c.Weights[f.members[k].Index] / sum
		}
		f.weighting = "weights given"
	case CombineInverseError:
		if err := c.inverseErrorWeights(ctx, y, f); err != nil {
			return nil, err
		}
	}
	f.combineInSample()
	return f, nil
}

// failureErrs returns the errors of the failures, each prefixed by its
// member.
func failureErrs(fs []MemberFailure) []error {
	out := make([]error, len(fs))
	for i, m := range fs {
		out[i] = fmt.Errorf("member %d (%s): %w", m.Index, m.Model, m.Err)
	}
	return out
}

// allFailed is the error when every member failed at stage.
func allFailed(key, stage string, fs []MemberFailure) error {
	return fmt.Errorf("almanac: combination: series %q: %w: every member failed to %s: %w", key, ErrNotFitted, stage, errors.Join(failureErrs(fs)...))
}

// inverseErrorWeights runs the rolling-origin evaluation of the fitted
// members and sets their weights (equal weights when it cannot).
func (c Combination) inverseErrorWeights(ctx context.Context, y Series, f *CombinationFit) error {
	equal := func(why string) {
		for k := range f.members {
			f.members[k].Weight = 1 / float64(len(f.members))
			f.members[k].MSE = math.NaN()
		}
		f.weighting = "equal weights: " + why
	}
	if len(f.members) == 1 {
		f.members[0].Weight = 1
		f.weighting = "one member"
		return nil
	}
	n := y.Len()
	origins := c.Origins
	if origins == 0 {
		origins = DefaultWeightOrigins
	}
	h := c.Horizon
	if h == 0 {
		h = max(y.Period(), 6)
	}
	h = min(h, n/3)
	if h < 1 || n-h-(origins-1) < 2 {
		equal(fmt.Sprintf("%d observations are too few for %d origins", n, origins))
		return nil
	}
	// errs[k][o] are member k's errors at origin o (nil when it failed).
	errs := make([][][]float64, len(f.members))
	for k := range errs {
		errs[k] = make([][]float64, origins)
	}
	for o := range origins {
		end := n - h - (origins - 1 - o)
		train := y.Window(0, end)
		for k, m := range f.members {
			if err := ctx.Err(); err != nil {
				return err
			}
			fit, err := fitMember(ctx, c.Members[m.Index], train)
			if err != nil {
				if cerr := ctx.Err(); cerr != nil {
					return cerr
				}
				continue
			}
			fc, err := forecastMember(fit, h)
			if err != nil {
				continue
			}
			e := make([]float64, h)
			for s := range e {
				e[s] = y.Values[end+s] - fc.Mean[s]
			}
			errs[k][o] = e
		}
	}
	// Origins every member completed.
	var common []int
	for o := range origins {
		all := true
		for k := range errs {
			all = all && errs[k][o] != nil
		}
		if all {
			common = append(common, o)
		}
	}
	if len(common) == 0 {
		equal(fmt.Sprintf("no origin of %d was completed by every member", origins))
		return nil
	}
	inv := make([]float64, len(f.members))
	perfect := false
	for k := range f.members {
		sum, cnt := 0.0, 0
		for _, o := range common {
			for _, e := range errs[k][o] {
				if !math.IsNaN(e) {
					sum += e * e
					cnt++
				}
			}
		}
		if cnt == 0 {
			equal("every value forecast in the evaluation is missing")
			return nil
		}
		mse := sum / float64(cnt)
		f.members[k].MSE = mse
		if mse == 0 {
			perfect = true
		}
	}
	total := 0.0
	for k, m := range f.members {
		switch {
		case perfect && m.MSE == 0:
			inv[k] = 1
		case perfect:
			inv[k] = 0
		default:
			inv[k] = 1 / m.MSE
		}
		total += inv[k]
	}
	if !(total > 0) || math.IsInf(total, 0) {
		equal("the errors are too small or too large to invert")
		return nil
	}
	for k := range f.members {
		f.members[k].Weight = inv[k] / total
	}
	f.weighting = fmt.Sprintf("inverse mean squared error over %d origins of %d steps", len(common), h)
	return nil
}

// combineInSample sets the combined fitted values and residuals.
func (f *CombinationFit) combineInSample() {
	n := f.y.Len()
	fvs := make([][]float64, len(f.members))
	for k, m := range f.members {
		fvs[k] = m.Fitted.FittedValues()
	}
	w := f.weights()
	f.fitted = make([]float64, n)
	f.resid = make([]float64, n)
	vals := make([]float64, len(f.members))
	for t := range n {
		for k := range fvs {
			vals[k] = fvs[k][t]
		}
		f.fitted[t] = combineValues(f.rule, vals, w, nil)
		f.resid[t] = f.y.Values[t] - f.fitted[t]
	}
}

// Update returns the combination brought forward to y — the series it
// was fitted to with observations appended — keeping its members' model
// forms and its weights (inverse-error weights are not re-estimated).
// Rolling-origin evaluations use it to avoid re-estimating every member
// at every origin. extend is called with each member and returns it
// brought forward to y without re-estimation when it can (ok true), for
// instance an exponential smoothing model updated with the new
// observations; a member it cannot extend is refitted to y by its Model.
// A member that fails either way is left out (listed in Failures of the
// result).
//
// Special cases: a y shorter than the series fitted, or of another
// frequency, gives an error wrapping ErrInvalid; an invalid y the error
// of Series.Validate; every member failing an error wrapping
// ErrNotFitted and each member's error; a cancelled ctx ctx.Err().
func (f *CombinationFit) Update(ctx context.Context, y Series, extend func(member Fitted) (Fitted, bool)) (*CombinationFit, error) {
	if err := y.Validate(); err != nil {
		return nil, err
	}
	if y.Len() < f.y.Len() || y.Freq != f.y.Freq {
		return nil, fmt.Errorf("almanac: combination: %w: update to %d observations of %v from %d of %v", ErrInvalid, y.Len(), y.Freq, f.y.Len(), f.y.Freq)
	}
	out := &CombinationFit{rule: f.rule, failures: slices.Clone(f.failures), weighting: f.weighting, y: y.Clone(), paths: f.paths, seed: f.seed}
	for k, m := range f.members {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		var fit Fitted
		if extend != nil {
			if e, ok := extend(m.Fitted); ok && e != nil && len(e.FittedValues()) == y.Len() {
				fit = e
			}
		}
		if fit == nil {
			var err error
			if fit, err = fitMember(ctx, f.specs[k], y); err != nil {
				if cerr := ctx.Err(); cerr != nil {
					return nil, cerr
				}
				out.failures = append(out.failures, MemberFailure{Index: m.Index, Model: memberName(f.specs[k]), Err: err})
				continue
			}
		}
		m.Fitted = fit
		out.members = append(out.members, m)
		out.specs = append(out.specs, f.specs[k])
	}
	if len(out.members) == 0 {
		return nil, allFailed(y.Key, "update", out.failures)
	}
	if len(out.members) < len(f.members) {
		sum := 0.0
		for _, m := range out.members {
			sum += m.Weight
		}
		for k := range out.members {
			if sum > 0 {
				out.members[k].Weight /= sum
			} else {
				out.members[k].Weight = 1 / float64(len(out.members))
			}
		}
	}
	slices.SortStableFunc(out.failures, func(a, b MemberFailure) int { return a.Index - b.Index })
	out.combineInSample()
	return out, nil
}

// weights returns the members' weights.
func (f *CombinationFit) weights() []float64 {
	w := make([]float64, len(f.members))
	for k, m := range f.members {
		w[k] = m.Weight
	}
	return w
}

// combineValues applies rule to vals (NaN when any is NaN). w are the
// weights of the weighted rules; buf is scratch space for the median.
func combineValues(rule CombineRule, vals, w, buf []float64) float64 {
	for _, v := range vals {
		if math.IsNaN(v) {
			return math.NaN()
		}
	}
	if rule == CombineMedian {
		buf = append(buf[:0], vals...)
		slices.Sort(buf)
		m := len(buf)
		if m%2 == 1 {
			return buf[m/2]
		}
		// Halves first, so that two values near the float64 limit do
		// not overflow.
		return buf[m/2-1]/2 + buf[m/2]/2
	}
	s := 0.0
	for k, v := range vals {
		s += w[k] * v
	}
	return s
}

// Rule returns the combination rule.
func (f *CombinationFit) Rule() CombineRule { return f.rule }

// Members returns the members that were fitted and are combined, in the
// order of Combination.Members (a fresh slice).
func (f *CombinationFit) Members() []CombinedMember { return slices.Clone(f.members) }

// Failures returns the members left out because they failed to fit, in
// the order of Combination.Members (a fresh slice; empty when none
// failed).
func (f *CombinationFit) Failures() []MemberFailure { return slices.Clone(f.failures) }

// Weighting describes how the weights were set: "weights given",
// "inverse mean squared error over O origins of H steps", "equal
// weights: REASON", or "" for CombineMean and CombineMedian.
func (f *CombinationFit) Weighting() string { return f.weighting }

// String lists the members in the rule's name, e.g. "mean(ETS(M,Ad,N),
// ARIMA(0,1,1), Theta)"; the weighted rules put each member's weight
// before it, e.g. "weighted(0.6 Naive, 0.4 Drift)". Members left out are
// not listed.
func (f *CombinationFit) String() string {
	var sb strings.Builder
	sb.WriteString(f.rule.String())
	sb.WriteByte('(')
	for k, m := range f.members {
		if k > 0 {
			sb.WriteString(", ")
		}
		if f.rule == CombineWeighted || f.rule == CombineInverseError {
			sb.WriteString(strconv.FormatFloat(m.Weight, 'g', 3, 64))
			sb.WriteByte(' ')
		}
		sb.WriteString(m.Fitted.String())
	}
	sb.WriteByte(')')
	return sb.String()
}

// FittedValues returns the rule applied to the members' in-sample
// one-step forecasts, NaN where any member has none (a fresh slice).
func (f *CombinationFit) FittedValues() []float64 { return slices.Clone(f.fitted) }

// Residuals returns y − FittedValues() on the data's scale (a fresh
// slice).
func (f *CombinationFit) Residuals() []float64 { return slices.Clone(f.resid) }

// forecastMember forecasts h steps from fit without levels, turning a
// panic, a wrong length, non-finite points or a broken distribution into
// errors.
func forecastMember(fit Fitted, h int) (fc Forecast, err error) {
	defer func() {
		if r := recover(); r != nil {
			fc, err = Forecast{}, fmt.Errorf("%w: model panicked: %v", ErrNotFitted, r)
		}
	}()
	fc, err = fit.Forecast(h)
	if err != nil {
		return Forecast{}, err
	}
	if len(fc.Mean) != h {
		return Forecast{}, fmt.Errorf("%w: %d point forecasts for horizon %d", ErrLength, len(fc.Mean), h)
	}
	for s, v := range fc.Mean {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Forecast{}, fmt.Errorf("%w: point forecast %v at step %d", ErrNonFinite, v, s+1)
		}
	}
	if err := checkDistribution(fc.Dist, h); err != nil {
		return Forecast{}, err
	}
	return fc, nil
}

// Forecast implements Fitted; see Combination for how points and bands
// are combined. A member whose forecast fails is left out of this
// forecast (the others' weights are scaled up to sum to 1);
// ForecastReport says which.
//
// Special cases: h < 1 gives an error wrapping ErrHorizon; a bad level
// one wrapping ErrLevel; levels when no member's forecast has a
// distribution one wrapping ErrNoDistribution; every member failing one
// wrapping ErrNotFitted and each member's error; a combined value that
// is not finite one wrapping ErrNonFinite.
func (f *CombinationFit) Forecast(h int, levels ...float64) (Forecast, error) {
	fc, _, err := f.ForecastReport(h, levels...)
	return fc, err
}

// ForecastReport is Forecast that also returns the members left out of
// this forecast because their own forecast failed.
func (f *CombinationFit) ForecastReport(h int, levels ...float64) (Forecast, []MemberFailure, error) {
	return f.forecast(h, true, levels)
}

// ForecastQuantiles is Forecast without sample paths: the distribution is
// the rule applied to the members' quantiles p by p — the comonotone
// margins the combined paths have, computed without drawing them — so
// each step's bands are the same up to the paths' Monte Carlo error, at a
// fraction of the cost; Forecast.SamplePaths is nil. Rolling-origin
// evaluations that need only the bands at each step use it.
func (f *CombinationFit) ForecastQuantiles(h int, levels ...float64) (Forecast, error) {
	fc, _, err := f.forecast(h, false, levels)
	return fc, err
}

// forecast combines the members' forecasts, with sample paths when
// withPaths is set and every member with a distribution can give them.
func (f *CombinationFit) forecast(h int, withPaths bool, levels []float64) (Forecast, []MemberFailure, error) {
	if err := CheckHorizon(h); err != nil {
		return Forecast{}, nil, err
	}
	if err := CheckLevels(levels...); err != nil {
		return Forecast{}, nil, err
	}
	type part struct {
		k  int // index into f.members
		fc Forecast
	}
	var parts []part
	var failed []MemberFailure
	for k, m := range f.members {
		fc, err := forecastMember(m.Fitted, h)
		if err != nil {
			failed = append(failed, MemberFailure{Index: m.Index, Model: m.Fitted.String(), Err: err})
			continue
		}
		parts = append(parts, part{k, fc})
	}
	if len(parts) == 0 {
		return Forecast{}, failed, allFailed(f.y.Key, "forecast", failed)
	}
	w := make([]float64, len(parts))
	sum := 0.0
	for i, p := range parts {
		w[i] = f.members[p.k].Weight
		sum += w[i]
	}
	if !(sum > 0) {
		// Only zero-weight members are left: weigh them equally.
		for i := range w {
			w[i] = 1
		}
		sum = float64(len(w))
	}
	for i := range w {
		w[i] /= sum
	}
	mean := make([]float64, h)
	vals := make([]float64, len(parts))
	var buf []float64
	for s := range h {
		for i, p := range parts {
			vals[i] = p.fc.Mean[s]
		}
		mean[s] = combineValues(f.rule, vals, w, buf)
	}
	// The members that carry a distribution.
	var withDist []int
	for i, p := range parts {
		if p.fc.Dist != nil {
			withDist = append(withDist, i)
		}
	}
	var dist Distribution
	if len(withDist) > 0 {
		dw := make([]float64, len(withDist))
		dsum := 0.0
		for j, i := range withDist {
			dw[j] = w[i]
			dsum += dw[j]
		}
		for j := range dw {
			if dsum > 0 {
				dw[j] /= dsum
			} else {
				dw[j] = 1 / float64(len(dw))
			}
		}
		// shift moves the distribution of the members that have one to
		// the combined point forecast (zero when every member has one).
		var shift []float64
		if len(withDist) < len(parts) {
			shift = make([]float64, h)
			dv := make([]float64, len(withDist))
			for s := range h {
				for j, i := range withDist {
					dv[j] = parts[i].fc.Mean[s]
				}
				shift[s] = mean[s] - combineValues(f.rule, dv, dw, buf)
			}
		}
		fits := make([]Fitted, len(withDist))
		fcs := make([]Forecast, len(withDist))
		for j, i := range withDist {
			fits[j] = f.members[parts[i].k].Fitted
			fcs[j] = parts[i].fc
		}
		if withPaths {
			src := rand.NewPCG(f.seed, 0x5851f42d4c957f2d)
			paths, count, err := memberPaths(fits, fcs, h, f.paths, src)
			var comb [][]float64
			if err == nil {
				comb, err = coupleAndCombine(f.rule, paths, dw, h, count)
			}
			if err == nil {
				if shift != nil {
					for _, p := range comb {
						for s := range p {
							p[s] += shift[s]
						}
					}
				}
				dist = &Sample{Paths: comb}
			}
		}
		if dist == nil {
			ds := make([]Distribution, len(withDist))
			for j, i := range withDist {
				ds[j] = parts[i].fc.Dist
			}
			dist = &quantileBlend{rule: f.rule, parts: ds, w: dw, shift: shift}
		}
	}
	out, err := NewForecast(f.y.Time(f.y.Len()), f.y.Freq, mean, dist, levels...)
	if err != nil {
		return Forecast{}, failed, fmt.Errorf("almanac: combination: %w", err)
	}
	if err := checkFinite(out); err != nil {
		return Forecast{}, failed, fmt.Errorf("almanac: combination: series %q: %w", f.y.Key, err)
	}
	return out, failed, nil
}

// checkFinite returns an error wrapping ErrNonFinite when a point
// forecast or a band limit of fc is NaN or ±Inf.
func checkFinite(fc Forecast) error {
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
	for s, v := range fc.Mean {
		if bad(v) {
			return fmt.Errorf("%w: point forecast %v at step %d", ErrNonFinite, v, s+1)
		}
	}
	for _, iv := range fc.Intervals {
		for s := range iv.Lower {
			if bad(iv.Lower[s]) || bad(iv.Upper[s]) {
				return fmt.Errorf("%w: %v%% band [%v, %v] at step %d", ErrNonFinite, iv.Level, iv.Lower[s], iv.Upper[s], s+1)
			}
		}
	}
	return nil
}

// memberPaths returns each member's sample paths for h steps: n drawn
// by its Simulate from a copy of src (every member starts from the same
// state: common random numbers), or, for a member that does not
// implement Simulator, the paths its forecast holds. It also returns the
// number of combined paths to make: n, or the largest count held when no
// member simulates.
func memberPaths(fits []Fitted, fcs []Forecast, h, n int, src *rand.PCG) (out [][][]float64, count int, err error) {
	state, _ := src.MarshalBinary()
	out = make([][][]float64, len(fits))
	held := 0 // the most paths held by a member that does not simulate
	for k, fit := range fits {
		sim, ok := fit.(Simulator)
		if !ok {
			if p := fcs[k].SamplePaths(); p != nil {
				out[k] = p
				held = max(held, len(p))
				continue
			}
			return nil, 0, fmt.Errorf("almanac: combination: %w: member %s cannot simulate", ErrNoDistribution, fit)
		}
		s := &rand.PCG{}
		_ = s.UnmarshalBinary(state)
		p, err := simulateMember(sim, h, n, s)
		if err != nil {
			return nil, 0, fmt.Errorf("almanac: combination: member %s: %w", fit, err)
		}
		out[k] = p
		count = n
	}
	if count == 0 {
		count = held
	}
	return out, count, nil
}

// simulateMember calls sim.Simulate, turning a panic and paths of the
// wrong shape into errors.
func simulateMember(sim Simulator, h, n int, src rand.Source) (paths [][]float64, err error) {
	defer func() {
		if r := recover(); r != nil {
			paths, err = nil, fmt.Errorf("%w: simulation panicked: %v", ErrNotFitted, r)
		}
	}()
	paths, err = sim.Simulate(h, n, src)
	if err != nil {
		return nil, err
	}
	if len(paths) == 0 {
		return nil, fmt.Errorf("%w: no sample paths", ErrNoDistribution)
	}
	for i, p := range paths {
		if len(p) < h {
			return nil, fmt.Errorf("%w: sample path %d has %d steps, need %d", ErrLength, i, len(p), h)
		}
	}
	return paths, nil
}

// coupleAndCombine returns n combined paths of h steps. Path i is first
// combined draw by draw from path i of every member (path i mod the count
// of a member with fewer); then, step by step, these raw values are
// replaced by the combination of the members' quantiles at their rank
// (the Schaake shuffle of comonotone margins onto the ranks of the raw
// combination). The quantile for rank r of n is the r/(n−1) quantile
// (type 7) of the member's finite draws at that step, so one member's own
// draws come back unchanged when it is alone.
func coupleAndCombine(rule CombineRule, paths [][][]float64, w []float64, h, n int) ([][]float64, error) {
	flat := make([]float64, n*h)
	out := make([][]float64, n)
	for i := range out {
		out[i] = flat[i*h : (i+1)*h : (i+1)*h]
	}
	vals := make([]float64, len(paths))
	var buf []float64
	// The raw draw-by-draw combination, kept in out until replaced.
	for i, p := range out {
		for s := range p {
			for k, mp := range paths {
				vals[k] = mp[i%len(mp)][s]
				if math.IsInf(vals[k], 0) {
					vals[k] = math.NaN()
				}
			}
			p[s] = combineValues(rule, vals, w, buf)
		}
	}
	type keyed struct {
		v float64
		i int
	}
	order := make([]keyed, n)
	sorted := make([][]float64, len(paths))
	for s := range h {
		// NaN (a member's draw outside its domain) ranks lowest; ties
		// keep path order.
		for i := range order {
			v := out[i][s]
			if math.IsNaN(v) {
				v = math.Inf(-1)
			}
			order[i] = keyed{v, i}
		}
		slices.SortFunc(order, func(a, b keyed) int {
			switch {
			case a.v < b.v:
				return -1
			case a.v > b.v:
				return 1
			}
			return a.i - b.i
		})
		for k, mp := range paths {
			col := sorted[k][:0]
			for _, p := range mp {
				if v := p[s]; !math.IsNaN(v) && !math.IsInf(v, 0) {
					col = append(col, v)
				}
			}
			if len(col) == 0 {
				return nil, fmt.Errorf("almanac: combination: %w: every sample path of a member left its domain by step %d", ErrNoDistribution, s+1)
			}
			slices.Sort(col)
			sorted[k] = col
		}
		for r, o := range order {
			i := o.i
			p := 0.5
			if n > 1 {
				p = float64(r) / float64(n-1)
			}
			for k := range paths {
				vals[k] = quantileSorted(sorted[k], p)
			}
			out[i][s] = combineValues(rule, vals, w, buf)
		}
	}
	return out, nil
}

// quantileBlend is the combined distribution when the members cannot all
// be drawn from: the rule applied to the members' quantiles at each p
// (comonotone members), moved by shift when not nil.
type quantileBlend struct {
	rule  CombineRule
	parts []Distribution
	w     []float64
	shift []float64
}

// Quantile implements Distribution.
func (d *quantileBlend) Quantile(h int, p float64) float64 {
	vals := make([]float64, len(d.parts))
	for k, part := range d.parts {
		vals[k] = part.Quantile(h, p)
	}
	q := combineValues(d.rule, vals, d.w, nil)
	if d.shift != nil {
		q += d.shift[h]
	}
	return q
}

// Simulate implements Simulator: n combined sample paths of h steps,
// each member's paths drawn by its own Simulate from the same source
// state (seeded from src), coupled step by step and combined draw by draw
// as Forecast does (see Combination). The paths are not shifted for
// members without a distribution: every member must simulate.
//
// Special cases: h < 1 gives an error wrapping ErrHorizon; n < 1 or a
// nil src one wrapping ErrInvalid; a member that cannot simulate one
// wrapping ErrNoDistribution, and a member whose simulation fails its
// error.
func (f *CombinationFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if err := CheckHorizon(h); err != nil {
		return nil, err
	}
	if n < 1 || src == nil {
		return nil, fmt.Errorf("almanac: combination: %w: need n ≥ 1 paths and a random source, have n = %d", ErrInvalid, n)
	}
	rng := rand.New(src)
	pcg := rand.NewPCG(rng.Uint64(), rng.Uint64())
	fits := make([]Fitted, len(f.members))
	for k, m := range f.members {
		fits[k] = m.Fitted
	}
	paths, _, err := memberPaths(fits, make([]Forecast, len(fits)), h, n, pcg)
	if err != nil {
		return nil, err
	}
	return coupleAndCombine(f.rule, paths, f.weights(), h, n)
}
