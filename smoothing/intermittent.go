package smoothing

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// Default smoothing constants and the search range used when they are
// estimated. 0.1 is the customary fixed value for intermittent demand
// (common practice; Croston 1972 and Syntetos & Boylan 2005 study values
// between 0.05 and 0.3).
const (
	intermittentDefault = 0.1
	intermittentLower   = 0.01
	intermittentUpper   = 1
	intermittentGridN   = 20
)

// CrostonVariant selects the forecast formula of Croston's method. The
// zero value is CrostonClassic. Programs should not rely on the numeric
// values of the constants.
type CrostonVariant int

const (
	// CrostonClassic forecasts z/p (Croston 1972).
	CrostonClassic CrostonVariant = iota
	// CrostonSBA forecasts (1 − α/2)·z/p, the Syntetos–Boylan
	// approximation that removes most of the bias of z/p (Syntetos &
	// Boylan 2005).
	CrostonSBA
)

// String returns "classic" or "SBA", or "CrostonVariant(n)" for a value
// outside the defined set.
func (v CrostonVariant) String() string {
	switch v {
	case CrostonClassic:
		return "classic"
	case CrostonSBA:
		return "SBA"
	}
	return "CrostonVariant(" + strconv.Itoa(int(v)) + ")"
}

// Croston is Croston's (1972) method for intermittent demand, optionally
// with the Syntetos–Boylan (2005) bias correction. It implements
// almanac.Model:
//
//	smoothing.Croston{}                                      // α = 0.1, forecast z/p
//	smoothing.Croston{Variant: smoothing.CrostonSBA}         // (1 − α/2)·z/p
//	smoothing.Croston{Alpha: 0.2}                            // fixed α = 0.2
//	smoothing.Croston{Variant: smoothing.CrostonSBA, EstimateAlpha: true}
//
// Simple exponential smoothing with the same constant α is applied
// separately to the non-zero demand sizes (z) and to the intervals
// between demands (p), both updated only in periods with demand:
//
//	z ← z + α(y_t − z),  p ← p + α(q_t − p)   when y_t > 0,
//
// where q_t is the number of periods since the previous demand. The
// forecast for every horizon is z/p (or (1 − α/2)·z/p for CrostonSBA).
// Initialisation, fitted values, the all-zero series and the absence of
// intervals are described at [IntermittentFit].
//
// With EstimateAlpha, α is chosen in [0.01, 1] to minimise the mean
// squared one-step error of the method's own forecasts (variant
// included) over the periods after the first demand, by a grid search
// refined with Brent's method. Estimation needs at least two periods
// after the first demand. Croston values are specifications and safe for
// concurrent use.
type Croston struct {
	// Variant selects the forecast formula. Default CrostonClassic.
	Variant CrostonVariant
	// Alpha is the smoothing constant for sizes and intervals, in
	// (0, 1]. 0 means 0.1, or estimated when EstimateAlpha is set (then
	// Alpha must be 0).
	Alpha float64
	// EstimateAlpha estimates Alpha by minimum in-sample MSE.
	EstimateAlpha bool
	// Seed seeds the generator (math/rand/v2 PCG) of the sample paths
	// behind the prediction intervals; Paths is their number (0 means
	// 5000). See IntermittentFit.Simulate.
	Seed  uint64
	Paths int
}

// TSB is the method of Teunter, Syntetos & Babai (2011) for intermittent
// demand. It implements almanac.Model:
//
//	smoothing.TSB{}                            // α = β = 0.1
//	smoothing.TSB{Alpha: 0.2, Beta: 0.05}
//	smoothing.TSB{Estimate: true}
//
// Unlike Croston's method it smooths the probability of demand every
// period, so the forecast decays while no demand occurs (useful for items
// going obsolete):
//
//	π ← π + β(1{y_t > 0} − π)  every period,
//	z ← z + α(y_t − z)           when y_t > 0,
//
// and the forecast for every horizon is π·z. Initialisation, fitted
// values, the all-zero series and the absence of intervals are described
// at [IntermittentFit].
//
// With Estimate, α and β are chosen in [0.01, 1]² to minimise the mean
// squared one-step error over the periods after the first demand: for
// each β the best α is found by a one-dimensional search (grid refined by
// Brent's method), and β by the same search over that profile. TSB
// values are specifications and safe for concurrent use.
type TSB struct {
	// Alpha smooths the demand sizes, in (0, 1]. 0 means 0.1 (or
	// estimated with Estimate; then Alpha must be 0).
	Alpha float64
	// Beta smooths the demand probability, in (0, 1]. 0 means 0.1 (or
	// estimated with Estimate; then Beta must be 0).
	Beta float64
	// Estimate estimates Alpha and Beta by minimum in-sample MSE.
	Estimate bool
	// Seed and Paths set the simulated prediction intervals as for
	// Croston.
	Seed  uint64
	Paths int
}

var (
	_ almanac.Model        = Croston{}
	_ almanac.Model        = TSB{}
	_ almanac.Fitted       = (*IntermittentFit)(nil)
	_ almanac.ParamCounter = (*IntermittentFit)(nil)
	_ almanac.Simulator    = (*IntermittentFit)(nil)
)

// IntermittentFit is a Croston, SBA or TSB model fitted to one series:
// an intermittent-demand series of non-negative quantities with many zero
// periods (spare parts, slow-moving items), forecast as a demand rate per
// period, the same for every horizon. It implements almanac.Fitted and
// almanac.ParamCounter. It is read-only after Fit returns and safe for
// concurrent use; do not modify its fields.
//
// Conventions shared by Croston, SBA and TSB:
//
//   - Initialisation: the states start at the first period with demand,
//     k (0-based): the smoothed size is that first demand y_k, and the
//     smoothed interval is k + 1, the number of periods up to and
//     including the first demand, as if a demand had occurred just
//     before the series began (TSB: the demand probability starts at
//     1/(k + 1)). Starting from the first demand and its interval is
//     common practice (recalled from memory; implementations differ,
//     some average over the first few demands instead). The recursions
//     then run over periods k+1, ..., n−1.
//   - Fitted values are the one-step forecasts made from the states after
//     the previous period; there is none (NaN) up to and including
//     period k, since the states are built from it.
//   - Intervals and sample paths: these methods estimate a mean demand
//     rate and have no agreed forecast distribution of their own. The
//     sample paths (Simulate) come from the fitted process with its
//     states held at their final values: each period has a demand with
//     the final probability (1/p, or TSB's π), independently, and its
//     size is drawn from the observed non-zero demands (a bootstrap),
//     rescaled so that the mean of every step equals the point forecast
//     Rate. Each path first draws its own demand probability and size
//     multiplier around the final states, with the variance of the
//     exponentially smoothed estimates (see Simulate), so the bands
//     include the uncertainty of the smoothed rate. Paths are never below
//     zero. Forecast takes its interval bounds from Paths (default 5000)
//     such paths seeded by Seed. Because a demand of 0 has positive
//     probability, a central interval's lower bound is often 0 and then
//     covers more than its level (its upper bound still has the nominal
//     exceedance rate).
//   - A series with no demand at all (every value 0) is forecast as 0,
//     with fitted values and residuals 0.
//   - Negative values give an error wrapping almanac.ErrNonPositive, NaN
//     one wrapping almanac.ErrMissing.
type IntermittentFit struct {
	// Method is "Croston", "SBA" or "TSB" (also returned by String).
	Method string
	// Alpha is the smoothing constant of the sizes (Croston and SBA: of
	// the intervals too); Beta the one of the demand probability (TSB
	// only, 0 otherwise).
	Alpha, Beta float64
	// Estimated reports whether the constants were estimated.
	Estimated bool
	// Size is the final smoothed demand size z.
	Size float64
	// Interval is the final smoothed interval p between demands
	// (Croston and SBA; 0 for TSB).
	Interval float64
	// Probability is the final smoothed demand probability (TSB; 1/p for
	// Croston and SBA).
	Probability float64
	// Rate is the point forecast for every horizon (demand per period).
	Rate float64
	// FirstDemand is the 0-based index of the first period with demand,
	// −1 when the series has none.
	FirstDemand int
	// MSE is the mean squared one-step error over the periods after the
	// first demand (NaN when there are none).
	MSE float64

	start  time.Time
	freq   calendar.Frequency
	fitted []float64
	resid  []float64
	sizes  []float64 // observed non-zero demands
	seed   uint64
	paths  int
	y      almanac.Series // the data (for saving)
}

// checkDemand validates an intermittent-demand series and returns the
// index of its first demand (−1 when there is none).
func checkDemand(name string, y almanac.Series) (int, error) {
	if err := y.Validate(); err != nil {
		return 0, fmt.Errorf("smoothing: %s: %w", name, err)
	}
	if err := y.CheckComplete(); err != nil {
		return 0, fmt.Errorf("smoothing: %s needs complete data (record zero demand as 0): %w", name, err)
	}
	first := -1
	for i, v := range y.Values {
		if v < 0 {
			return 0, fmt.Errorf("smoothing: %s: demand must be ≥ 0: %w", name, &almanac.SeriesError{Key: y.Key, Index: i, Err: almanac.ErrNonPositive})
		}
		if v > 0 && first < 0 {
			first = i
		}
	}
	return first, nil
}

// checkConstant validates a smoothing constant given by the caller: 0
// (default or estimated) or a value in (0, 1].
func checkConstant(name, field string, v float64, estimate bool) error {
	if estimate && v != 0 {
		return fmt.Errorf("smoothing: %s: %w: %s = %v given together with estimation; leave it 0", name, almanac.ErrInvalid, field, v)
	}
	if v != 0 && !(v > 0 && v <= 1) {
		return fmt.Errorf("smoothing: %s: %w: %s = %v, need a value in (0, 1] (0 means the default 0.1)", name, almanac.ErrInvalid, field, v)
	}
	return nil
}

// crostonRun runs Croston's recursion on y from the first demand k with
// constant alpha and forecast factor (1, or 1 − α/2 for SBA). When fitted
// is not nil it receives the one-step forecasts of periods k+1..n−1. It
// returns the final size and interval and the sum of squared one-step
// errors. It allocates nothing.
func crostonRun(fitted, y []float64, k int, alpha, factor float64) (z, p, sse float64) {
	z, p = y[k], float64(k+1)
	q := 1.0
	for t := k + 1; t < len(y); t++ {
		f := factor * z / p
		if fitted != nil {
			fitted[t] = f
		}
		v := y[t]
		e := v - f
		sse += e * e
		if v > 0 {
			z += alpha * (v - z)
			p += alpha * (q - p)
			q = 1
		} else {
			q++
		}
	}
	return z, p, sse
}

// tsbRun runs the TSB recursion on y from the first demand k; see
// crostonRun for fitted and the results (prob is the final probability).
func tsbRun(fitted, y []float64, k int, alpha, beta float64) (z, prob, sse float64) {
	z, prob = y[k], 1/float64(k+1)
	for t := k + 1; t < len(y); t++ {
		f := prob * z
		if fitted != nil {
			fitted[t] = f
		}
		v := y[t]
		e := v - f
		sse += e * e
		if v > 0 {
			prob += beta * (1 - prob)
			z += alpha * (v - z)
		} else {
			prob -= beta * prob
		}
	}
	return z, prob, sse
}

// newIntermittentFit prepares the result for y with fitted values NaN up
// to and including the first demand (0 everywhere when there is none).
func newIntermittentFit(method string, y almanac.Series, first int, seed uint64, paths int) *IntermittentFit {
	n := y.Len()
	f := &IntermittentFit{
		Method:      method,
		FirstDemand: first,
		MSE:         math.NaN(),
		start:       y.Time(n),
		freq:        y.Freq,
		fitted:      make([]float64, n),
		resid:       make([]float64, n),
		seed:        seed,
		paths:       paths,
		y:           y.Clone(),
	}
	for _, v := range y.Values {
		if v > 0 {
			f.sizes = append(f.sizes, v)
		}
	}
	if first < 0 {
		return f // all zero: forecasts, fitted values and residuals 0
	}
	for t := 0; t <= first; t++ {
		f.fitted[t] = math.NaN()
	}
	return f
}

// finish fills the residuals and the MSE from the fitted values. A sum
// of squares that overflows (demands near the largest float64) gives an
// error wrapping almanac.ErrNotFitted.
func (f *IntermittentFit) finish(y []float64, sse float64) error {
	if math.IsInf(sse, 0) || math.IsNaN(sse) {
		return fmt.Errorf("smoothing: %s: %w: sum of squared one-step errors not finite (values too large?)", f.Method, almanac.ErrNotFitted)
	}
	for t, v := range y {
		f.resid[t] = v - f.fitted[t]
	}
	if m := len(y) - f.FirstDemand - 1; f.FirstDemand >= 0 && m > 0 {
		f.MSE = sse / float64(m)
	}
	return nil
}

// Fit estimates Croston's method (or SBA) on y.
//
// Special cases:
//   - Alpha outside (0, 1], Alpha set together with EstimateAlpha, or an
//     unknown Variant: error wrapping almanac.ErrInvalid;
//   - an invalid series: the error of almanac.Series.Validate; a missing
//     value: almanac.ErrMissing; a negative value: almanac.ErrNonPositive;
//   - EstimateAlpha with fewer than two periods after the first demand:
//     almanac.ErrTooShort;
//   - squared errors that overflow (demands near the largest float64):
//     almanac.ErrNotFitted;
//   - no demand at all: a fit whose forecasts are 0.
func (c Croston) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	const name = "croston"
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("smoothing: %s: %w", name, err)
	}
	if c.Variant < CrostonClassic || c.Variant > CrostonSBA {
		return nil, fmt.Errorf("smoothing: %s: %w: unknown Variant %v", name, almanac.ErrInvalid, c.Variant)
	}
	if err := checkConstant(name, "Alpha", c.Alpha, c.EstimateAlpha); err != nil {
		return nil, err
	}
	k, err := checkDemand(name, y)
	if err != nil {
		return nil, err
	}
	method := "Croston"
	if c.Variant == CrostonSBA {
		method = "SBA"
	}
	if c.Paths < 0 {
		return nil, fmt.Errorf("smoothing: %s: %w: negative Paths %d", name, almanac.ErrInvalid, c.Paths)
	}
	f := newIntermittentFit(method, y, k, c.Seed, c.Paths)
	factorOf := func(a float64) float64 {
		if c.Variant == CrostonSBA {
			return 1 - a/2
		}
		return 1
	}
	alpha := c.Alpha
	if alpha == 0 {
		alpha = intermittentDefault
	}
	if k < 0 {
		f.Alpha = alpha
		return f, nil
	}
	x := y.Values
	if c.EstimateAlpha {
		if len(x)-k-1 < 2 {
			return nil, fmt.Errorf("smoothing: %s: %w: estimating Alpha needs at least 2 periods after the first demand (period %d of %d)", name, almanac.ErrTooShort, k+1, len(x))
		}
		obj := func(a float64) float64 {
			_, _, sse := crostonRun(nil, x, k, a, factorOf(a))
			return sse
		}
		alpha, _ = minimize1D(obj, intermittentLower, intermittentUpper, intermittentGridN)
		f.Estimated = true
	}
	f.Alpha = alpha
	z, p, sse := crostonRun(f.fitted, x, k, alpha, factorOf(alpha))
	f.Size, f.Interval, f.Probability = z, p, 1/p
	f.Rate = factorOf(alpha) * z / p
	if err := f.finish(x, sse); err != nil {
		return nil, err
	}
	return f, nil
}

// Fit estimates the TSB method on y.
//
// Special cases:
//   - Alpha or Beta outside (0, 1], or set together with Estimate: error
//     wrapping almanac.ErrInvalid;
//   - an invalid series: the error of almanac.Series.Validate; a missing
//     value: almanac.ErrMissing; a negative value: almanac.ErrNonPositive;
//   - Estimate with fewer than two periods after the first demand:
//     almanac.ErrTooShort;
//   - squared errors that overflow (demands near the largest float64):
//     almanac.ErrNotFitted;
//   - no demand at all: a fit whose forecasts are 0.
func (s TSB) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	const name = "tsb"
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("smoothing: %s: %w", name, err)
	}
	if err := checkConstant(name, "Alpha", s.Alpha, s.Estimate); err != nil {
		return nil, err
	}
	if err := checkConstant(name, "Beta", s.Beta, s.Estimate); err != nil {
		return nil, err
	}
	k, err := checkDemand(name, y)
	if err != nil {
		return nil, err
	}
	if s.Paths < 0 {
		return nil, fmt.Errorf("smoothing: %s: %w: negative Paths %d", name, almanac.ErrInvalid, s.Paths)
	}
	f := newIntermittentFit("TSB", y, k, s.Seed, s.Paths)
	alpha, beta := s.Alpha, s.Beta
	if alpha == 0 {
		alpha = intermittentDefault
	}
	if beta == 0 {
		beta = intermittentDefault
	}
	if k < 0 {
		f.Alpha, f.Beta = alpha, beta
		return f, nil
	}
	x := y.Values
	if s.Estimate {
		if len(x)-k-1 < 2 {
			return nil, fmt.Errorf("smoothing: %s: %w: estimation needs at least 2 periods after the first demand (period %d of %d)", name, almanac.ErrTooShort, k+1, len(x))
		}
		// Profile: for each β the best α, then the best β.
		inner := func(b float64) (float64, float64) {
			obj := func(a float64) float64 {
				_, _, sse := tsbRun(nil, x, k, a, b)
				return sse
			}
			return minimize1D(obj, intermittentLower, intermittentUpper, intermittentGridN)
		}
		outer := func(b float64) float64 {
			_, sse := inner(b)
			return sse
		}
		beta, _ = minimize1D(outer, intermittentLower, intermittentUpper, intermittentGridN)
		alpha, _ = inner(beta)
		f.Estimated = true
	}
	f.Alpha, f.Beta = alpha, beta
	z, prob, sse := tsbRun(f.fitted, x, k, alpha, beta)
	f.Size, f.Probability = z, prob
	f.Rate = prob * z
	if err := f.finish(x, sse); err != nil {
		return nil, err
	}
	return f, nil
}

// Forecast returns the point forecast Rate for each of h steps after the
// end of the series, with prediction intervals at the given levels from
// the sample paths of Simulate (see IntermittentFit; never below zero).
// Without levels the forecast has no distribution (Dist nil).
//
// Special cases: h < 1 gives an error wrapping almanac.ErrHorizon, and so
// does h × Paths above 2^25 when levels are asked for; a level outside
// (0, 100) one wrapping almanac.ErrLevel; an IntermittentFit not returned
// by Fit (e.g. a zero value) one wrapping almanac.ErrNotFitted.
func (f *IntermittentFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if f == nil || f.fitted == nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: %s: %w", f.Method, err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: %s: %w", f.Method, err)
	}
	mean := make([]float64, h)
	for i := range mean {
		mean[i] = f.Rate
	}
	var dist almanac.Distribution
	if len(levels) > 0 {
		n := f.paths
		if n == 0 {
			n = defaultPaths
		}
		paths, err := f.Simulate(h, n, rand.NewPCG(f.seed, 0x9e3779b97f4a7c15))
		if err != nil {
			return almanac.Forecast{}, err
		}
		dist = &almanac.Sample{Paths: paths}
	}
	fc, err := almanac.NewForecast(f.start, f.freq, mean, dist, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: %s: %w", f.Method, err)
	}
	if err := checkFinite(f.Method, fc); err != nil {
		return almanac.Forecast{}, err
	}
	return fc, nil
}

// Simulate returns n sample paths of h future periods (paths[i][step])
// from the fitted process (see IntermittentFit): in each period a demand
// occurs with probability Probability, independently, and its size is
// one of the observed non-zero demands drawn uniformly, multiplied by
// Rate/(Probability·mean of the observed demands) so that each step's
// mean is Rate. Without any demand in the series the paths are 0. The
// draws come from src only: the same source state gives the same paths.
//
// Special cases: h < 1, or h × n above 2^25, gives an error wrapping
// almanac.ErrHorizon; n < 1 or a nil src one wrapping almanac.ErrInvalid;
// an IntermittentFit not returned by Fit one wrapping almanac.ErrNotFitted.
func (f *IntermittentFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if f == nil || f.fitted == nil {
		return nil, fmt.Errorf("smoothing: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("smoothing: %s: %w", f.Method, err)
	}
	if n < 1 {
		return nil, fmt.Errorf("smoothing: %s: %w: %d sample paths", f.Method, almanac.ErrInvalid, n)
	}
	if src == nil {
		return nil, fmt.Errorf("smoothing: %s: %w: nil random source", f.Method, almanac.ErrInvalid)
	}
	if h > maxSimValues/n {
		return nil, fmt.Errorf("smoothing: %s: %w: %d paths of %d steps exceed the %d simulated values allowed; ask for fewer steps or paths", f.Method, almanac.ErrHorizon, n, h, maxSimValues)
	}
	flat := make([]float64, h*n)
	paths := make([][]float64, n)
	for i := range paths {
		paths[i] = flat[i*h : (i+1)*h : (i+1)*h]
	}
	if len(f.sizes) == 0 || !(f.Rate > 0) {
		return paths, nil
	}
	// Scale of the bootstrapped sizes: Rate/(π·s̄), with s̄ computed on
	// sizes divided by their largest value so it cannot overflow.
	top := slices.Max(f.sizes)
	mean, sq := 0.0, 0.0
	for _, v := range f.sizes {
		mean += v / top
		sq += (v / top) * (v / top)
	}
	k := len(f.sizes)
	mean /= float64(k)
	cv2 := math.Max(sq/float64(k)/(mean*mean)-1, 0) // squared coefficient of variation of the sizes
	scale := f.Rate / f.Probability / mean          // multiplies sizes/top
	// Estimation uncertainty of the smoothed states: an exponentially
	// weighted mean with constant c of independent draws of variance s²
	// has variance c/(2−c)·s² (common practice, the steady-state variance
	// of an EWMA). TSB smooths the occurrence indicator every period
	// (c = β, s² = π(1−π)); Croston smooths the intervals (c = α, s² of a
	// geometric interval (1−π)/π², so by the delta method the variance of
	// π = 1/p is c/(2−c)·π²(1−π)). Both smooth the sizes when a demand
	// occurs (c = α, relative variance the sizes' squared coefficient of
	// variation). Each path draws its own occurrence probability from the
	// Beta distribution and its own size multiplier from the gamma
	// distribution with those means (π and 1) and variances, so the
	// mean of every step is still Rate.
	pi := f.Probability
	var wp float64
	if f.Method == "TSB" {
		wp = f.Beta / (2 - f.Beta) * pi * (1 - pi)
	} else {
		wp = f.Alpha / (2 - f.Alpha) * pi * pi * (1 - pi)
	}
	ws := f.Alpha / (2 - f.Alpha) * cv2
	rng := rand.New(src)
	for _, path := range paths {
		pPath := pi
		if wp > 0 && pi > 0 && pi < 1 {
			if kappa := pi*(1-pi)/wp - 1; kappa > 0 {
				a := gammaDraw(rng, pi*kappa)
				b := gammaDraw(rng, (1-pi)*kappa)
				if a+b > 0 {
					pPath = a / (a + b)
				}
			}
		}
		mult := 1.0
		if ws > 0 {
			shape := 1 / ws
			mult = gammaDraw(rng, shape) / shape
		}
		for t := range path {
			if rng.Float64() < pPath {
				path[t] = f.sizes[rng.IntN(k)] / top * scale * mult
			}
		}
	}
	return paths, nil
}

// FittedValues returns the in-sample one-step forecasts (NaN up to and
// including the first demand). Returns a fresh copy.
func (f *IntermittentFit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

// Residuals returns y − FittedValues() (NaN where there is no fitted
// value). Returns a fresh copy.
func (f *IntermittentFit) Residuals() []float64 { return append([]float64(nil), f.resid...) }

// NumParams returns the number of estimated constants (0 when they were
// fixed; the initial states follow a rule and are not estimated).
func (f *IntermittentFit) NumParams() int {
	switch {
	case !f.Estimated:
		return 0
	case f.Method == "TSB":
		return 2
	}
	return 1
}

// String returns the method's published name: "Croston", "SBA" or "TSB".
func (f *IntermittentFit) String() string { return f.Method }

// gammaDraw returns a draw from the gamma distribution with the given
// shape and scale 1, by the method of Marsaglia & Tsang (2000), with the
// usual boost U^{1/shape} for shape < 1.
func gammaDraw(rng *rand.Rand, shape float64) float64 {
	if !(shape > 0) {
		return 0
	}
	boost := 1.0
	if shape < 1 {
		boost = math.Pow(rng.Float64(), 1/shape)
		shape++
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := rng.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := rng.Float64()
		if u < 1-0.0331*x*x*x*x || math.Log(u) < 0.5*x*x+d*(1-v+math.Log(v)) {
			return d * v * boost
		}
	}
}
