package arima

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
)

// KPSSNull is the null hypothesis of a KPSS test: which deterministic
// part is removed before the partial sums are formed. Programs should not
// rely on the numeric values of the constants.
type KPSSNull int

const (
	// LevelStationary (the zero value): the series is stationary around
	// a constant; residuals are deviations from the mean.
	LevelStationary KPSSNull = iota
	// TrendStationary: the series is stationary around a linear trend;
	// residuals are those of the least-squares line on t = 1..n.
	TrendStationary
)

// String returns "level" or "trend", or "KPSSNull(n)" for an unknown value.
func (k KPSSNull) String() string {
	switch k {
	case LevelStationary:
		return "level"
	case TrendStationary:
		return "trend"
	}
	return fmt.Sprintf("KPSSNull(%d)", int(k))
}

// LagRule chooses the truncation lag L of the Bartlett long-run variance
// in a KPSS test. Programs should not rely on the numeric values of the
// constants.
type LagRule int

const (
	// LagSquareRoot (the zero value): L = ⌊3√n/13⌋, capped at n−1, a short
	// truncation used in automatic order selection (recalled from
	// memory). It is not a rule of the published sources (Kwiatkowski et
	// al. 1992 use l4 and l12, LagShort and LagLong; Hobijn et al. 2004
	// LagDataDependent); it is the default because Search forecasts the
	// M3 data best with it (package documentation, Order selection).
	LagSquareRoot LagRule = iota
	// LagShort: L = ⌊4 (n/100)^(1/4)⌋, the "l4" rule of Kwiatkowski et
	// al. (1992), capped at n−1.
	LagShort
	// LagDataDependent: the automatic bandwidth of Hobijn, Franses & Ooms
	// (2004), computed from the residual autocovariances up to lag
	// ⌊n^(2/9)⌋: L = ⌊1.1447 (ŝ₁/ŝ₀)^(2/3) n^(1/3)⌋, capped at n−1.
	LagDataDependent
	// LagLong: L = ⌈12 (n/100)^(1/4)⌉, capped at n−1 (the "l12" rule of
	// Kwiatkowski et al. 1992, rounded up; statsmodels' kpss computes the
	// same lag for its nlags="legacy", which the reference test checks).
	LagLong
	// LagFixed: L = KPSSSpec.Lags exactly (0 allowed; must be < n).
	LagFixed
)

// String returns the rule's name, or "LagRule(n)" for an unknown value.
func (r LagRule) String() string {
	switch r {
	case LagSquareRoot:
		return "square-root"
	case LagShort:
		return "short"
	case LagDataDependent:
		return "data-dependent"
	case LagLong:
		return "long"
	case LagFixed:
		return "fixed"
	}
	return fmt.Sprintf("LagRule(%d)", int(r))
}

// KPSSSpec configures a KPSS test. The zero value tests level
// stationarity with the square-root lag rule:
//
//	arima.KPSSSpec{Null: arima.TrendStationary, LagRule: arima.LagFixed, Lags: 4}
type KPSSSpec struct {
	// Null is the null hypothesis; default LevelStationary.
	Null KPSSNull
	// LagRule chooses the Bartlett truncation lag; default LagSquareRoot.
	LagRule LagRule
	// Lags is the truncation lag when LagRule is LagFixed (0 ≤ Lags < n);
	// ignored otherwise.
	Lags int
}

// PValueClip says whether, and on which side, a p-value read from a
// table was clipped to the table's range.
type PValueClip int

const (
	// NotClipped: the p-value was interpolated inside the table.
	NotClipped PValueClip = iota
	// ClippedAbove: the statistic is below the table's smallest critical
	// value; the reported p-value is the table's largest level and the
	// true p-value is larger.
	ClippedAbove
	// ClippedBelow: the statistic is beyond the table's largest critical
	// value; the reported p-value is the table's smallest level and the
	// true p-value is smaller.
	ClippedBelow
)

// String describes the clipping, or gives "PValueClip(n)".
func (c PValueClip) String() string {
	switch c {
	case NotClipped:
		return "not clipped"
	case ClippedAbove:
		return "true p-value is larger"
	case ClippedBelow:
		return "true p-value is smaller"
	}
	return fmt.Sprintf("PValueClip(%d)", int(c))
}

// CriticalValue is one entry of a table of asymptotic critical values:
// reject the null at significance Level (a probability, e.g. 0.05) when
// the statistic exceeds Value.
type CriticalValue struct {
	Level float64
	Value float64
}

// kpssTable holds the asymptotic upper-tail critical values of
// Kwiatkowski, Phillips, Schmidt & Shin (1992), Table 1, at the 10%, 5%,
// 2.5% and 1% levels (source: ../shared/reference/published.md, which
// copies the printed table).
var kpssTable = [2][4]CriticalValue{
	LevelStationary: {{0.10, 0.347}, {0.05, 0.463}, {0.025, 0.574}, {0.01, 0.739}},
	TrendStationary: {{0.10, 0.119}, {0.05, 0.146}, {0.025, 0.176}, {0.01, 0.216}},
}

// KPSSResult is the outcome of a KPSS test.
type KPSSResult struct {
	Null      KPSSNull
	N         int     // observations used
	Lags      int     // Bartlett truncation lag actually used
	Statistic float64 // η / s², see KPSS
	// PValue is interpolated linearly in the critical-value table and
	// clipped to [0.01, 0.10]; Clipped says whether and how.
	PValue  float64
	Clipped PValueClip
	// Critical holds the table for Null at 10%, 5%, 2.5% and 1%.
	Critical [4]CriticalValue
}

// Reject reports whether the null of stationarity is rejected at level
// alpha (one of 0.10, 0.05, 0.025, 0.01): whether the statistic exceeds
// the tabulated critical value. Any other alpha returns false and an
// error wrapping almanac.ErrLevel.
func (r KPSSResult) Reject(alpha float64) (bool, error) {
	for _, c := range r.Critical {
		if c.Level == alpha {
			return r.Statistic > c.Value, nil
		}
	}
	return false, fmt.Errorf("arima: %w: KPSS critical values exist at 0.10, 0.05, 0.025 and 0.01, not %g", almanac.ErrLevel, alpha)
}

// KPSS tests the null hypothesis that y is stationary around a level or a
// linear trend against a unit root (Kwiatkowski, Phillips, Schmidt & Shin
// 1992). With residuals e_t of y on the deterministic part and partial
// sums S_t = e_1 + … + e_t,
//
//	statistic = (Σ S_t² / n²) / s²,
//	s² = (Σ e_t² + 2 Σ_{i=1..L} (1 − i/(L+1)) Σ_t e_t e_{t−i}) / n,
//
// the Bartlett-weighted long-run variance with truncation lag L.
//
// Special cases:
//   - a NaN in y gives an error wrapping almanac.ErrMissing (difference
//     and drop missing values first, as Differences does);
//   - ±Inf, or values so large that the sums of squares overflow, give
//     almanac.ErrNonFinite;
//   - fewer than 3 values gives almanac.ErrTooShort;
//   - constant residuals (zero long-run variance) give almanac.ErrConstant;
//   - a fixed lag outside [0, n) or an unknown rule or null gives
//     almanac.ErrInvalid.
func KPSS(y []float64, spec KPSSSpec) (KPSSResult, error) {
	if spec.Null != LevelStationary && spec.Null != TrendStationary {
		return KPSSResult{}, fmt.Errorf("arima: %w: KPSS null %v", almanac.ErrInvalid, spec.Null)
	}
	n := len(y)
	if n < 3 {
		return KPSSResult{}, fmt.Errorf("arima: %w: KPSS needs at least 3 observations, have %d", almanac.ErrTooShort, n)
	}
	for i, v := range y {
		if math.IsNaN(v) {
			return KPSSResult{}, fmt.Errorf("arima: %w: KPSS input is NaN at index %d", almanac.ErrMissing, i)
		}
		if math.IsInf(v, 0) {
			return KPSSResult{}, fmt.Errorf("arima: %w: KPSS input is %g at index %d", almanac.ErrNonFinite, v, i)
		}
	}
	e := make([]float64, n)
	kpssResiduals(e, y, spec.Null)

	var lags int
	switch spec.LagRule {
	case LagSquareRoot:
		lags = min(int(3*math.Sqrt(float64(n))/13), n-1)
	case LagShort:
		lags = min(int(4*math.Pow(float64(n)/100, 0.25)), n-1)
	case LagDataDependent:
		lags = min(hobijnLag(e), n-1)
	case LagLong:
		lags = min(int(math.Ceil(12*math.Pow(float64(n)/100, 0.25))), n-1)
	case LagFixed:
		if spec.Lags < 0 || spec.Lags >= n {
			return KPSSResult{}, fmt.Errorf("arima: %w: KPSS lag %d outside [0, %d)", almanac.ErrInvalid, spec.Lags, n)
		}
		lags = spec.Lags
	default:
		return KPSSResult{}, fmt.Errorf("arima: %w: KPSS lag rule %v", almanac.ErrInvalid, spec.LagRule)
	}

	s2 := bartlettLRV(e, lags)
	if !(s2 > 0) {
		return KPSSResult{}, fmt.Errorf("arima: %w: KPSS residuals have zero long-run variance", almanac.ErrConstant)
	}
	var eta, s float64
	for _, v := range e {
		s += v
		eta += s * s
	}
	eta /= float64(n) * float64(n)
	stat := eta / s2
	if math.IsNaN(stat) || math.IsInf(stat, 0) || math.IsInf(s2, 0) {
		return KPSSResult{}, fmt.Errorf("arima: %w: KPSS sums overflow; the values are too large (rescale the series)", almanac.ErrNonFinite)
	}

	r := KPSSResult{Null: spec.Null, N: n, Lags: lags, Statistic: stat, Critical: kpssTable[spec.Null]}
	r.PValue, r.Clipped = kpssPValue(stat, r.Critical[:])
	return r, nil
}

// kpssResiduals writes into dst the residuals of y on a constant (level)
// or on a constant and t = 1..n (trend), by least squares.
func kpssResiduals(dst, y []float64, null KPSSNull) {
	n := len(y)
	mean := 0.0
	for _, v := range y {
		mean += v
	}
	mean /= float64(n)
	if null == LevelStationary {
		for i, v := range y {
			dst[i] = v - mean
		}
		return
	}
	tbar := float64(n+1) / 2
	var sxy, sxx float64
	for i, v := range y {
		dt := float64(i+1) - tbar
		sxy += dt * (v - mean)
		sxx += dt * dt
	}
	b := sxy / sxx
	for i, v := range y {
		dst[i] = v - mean - b*(float64(i+1)-tbar)
	}
}

// kpssLagProduct returns Σ_t e_t e_{t−i}.
func kpssLagProduct(e []float64, i int) float64 {
	s := 0.0
	for t := i; t < len(e); t++ {
		s += e[t] * e[t-i]
	}
	return s
}

// bartlettLRV is the Bartlett-kernel long-run variance with truncation
// lag L (Newey & West 1987 weights 1 − i/(L+1)).
func bartlettLRV(e []float64, lags int) float64 {
	s := kpssLagProduct(e, 0)
	for i := 1; i <= lags; i++ {
		s += 2 * kpssLagProduct(e, i) * (1 - float64(i)/float64(lags+1))
	}
	return s / float64(len(e))
}

// hobijnLag is the data-dependent bandwidth of Hobijn, Franses & Ooms
// (2004, Statistica Neerlandica 58(4), sec. 3), with the Bartlett kernel
// constant 1.1447 and pre-whitening window ⌊n^(2/9)⌋.
func hobijnLag(e []float64) int {
	n := float64(len(e))
	cov := int(math.Pow(n, 2.0/9.0))
	s0 := kpssLagProduct(e, 0) / n
	s1 := 0.0
	for i := 1; i <= cov && i < len(e); i++ {
		g := 2 * kpssLagProduct(e, i) / n
		s0 += g
		s1 += float64(i) * g
	}
	sHat := s1 / s0
	l := 1.1447 * math.Pow(sHat*sHat, 1.0/3.0) * math.Pow(n, 1.0/3.0)
	if !(l >= 0) || math.IsInf(l, 0) {
		return 0
	}
	return int(l)
}

// kpssPValue interpolates stat linearly in an upper-tail table of
// critical values ordered from the largest level to the smallest, and
// clips the result to the table's range.
func kpssPValue(stat float64, tab []CriticalValue) (float64, PValueClip) {
	last := len(tab) - 1
	switch {
	case stat < tab[0].Value:
		return tab[0].Level, ClippedAbove
	case stat > tab[last].Value:
		return tab[last].Level, ClippedBelow
	}
	for j := 0; j < last; j++ {
		if stat <= tab[j+1].Value {
			slope := (tab[j+1].Level - tab[j].Level) / (tab[j+1].Value - tab[j].Value)
			return slope*(stat-tab[j].Value) + tab[j].Level, NotClipped
		}
	}
	return tab[last].Level, NotClipped
}
