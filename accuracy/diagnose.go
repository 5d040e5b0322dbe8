package accuracy

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/scaling"
	"github.com/almanac-go/almanac/internal/tsstat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Correlogram holds sample autocorrelations (or partial autocorrelations)
// by lag with the approximate 95% significance bound ±Bound of a white
// noise series, Φ⁻¹(0.975)/√n ≈ 1.96/√n with n the number of observed
// values (common practice; the bound R's plot.acf draws).
type Correlogram struct {
	Lags   []int     // 0..MaxLag for an ACF, 1..MaxLag for a PACF
	Values []float64 // one per lag
	Bound  float64   // half-width of the white-noise band
	N      int       // number of observed (non-NaN) values used
}

// Significant returns the lags whose value lies outside ±Bound.
func (c Correlogram) Significant() []int {
	var out []int
	for i, v := range c.Values {
		if c.Lags[i] > 0 && math.Abs(v) > c.Bound {
			out = append(out, c.Lags[i])
		}
	}
	return out
}

// DefaultMaxLag is the largest lag ACF, PACF and Autocovariances use when
// given maxLag 0, for a series of n values: ⌊10·log10(n)⌋, at most n − 1
// (the default lag.max of R's stats::acf for one series, documented on
// its help page; common practice). It is 0 for n < 2.
func DefaultMaxLag(n int) int {
	if n < 2 {
		return 0
	}
	return min(int(math.Floor(10*math.Log10(float64(n)))), n-1)
}

// checkSeries validates a series of residuals or data for the
// correlation statistics and returns the number of observed values and
// the maximum lag (DefaultMaxLag of len(x) for maxLag 0, then at most
// n − 1 for n observed values).
func checkSeries(fn string, x []float64, maxLag int) (n, lag int, err error) {
	if len(x) == 0 {
		return 0, 0, fmt.Errorf("accuracy: %s: %w", fn, almanac.ErrEmpty)
	}
	first := math.NaN()
	constant := true
	for i, v := range x {
		if math.IsInf(v, 0) {
			return 0, 0, fmt.Errorf("accuracy: %s: %w: %v at index %d", fn, almanac.ErrNonFinite, v, i)
		}
		if math.IsNaN(v) {
			continue
		}
		if n == 0 {
			first = v
		} else if v != first {
			constant = false
		}
		n++
	}
	if n == 0 {
		return 0, 0, fmt.Errorf("accuracy: %s: %w", fn, almanac.ErrAllMissing)
	}
	if maxLag < 0 {
		return 0, 0, fmt.Errorf("accuracy: %s: %w: maximum lag %d is negative (0 chooses it)", fn, almanac.ErrInvalid, maxLag)
	}
	if maxLag == 0 {
		maxLag = min(DefaultMaxLag(len(x)), n-1)
	}
	if maxLag >= n || maxLag < 1 {
		return 0, 0, fmt.Errorf("accuracy: %s: %w: lag %d needs more than %d observed values", fn, almanac.ErrTooShort, max(maxLag, 1), n)
	}
	if constant {
		return 0, 0, fmt.Errorf("accuracy: %s: %w: every observed value is %v, the autocorrelations are 0/0", fn, almanac.ErrConstant, first)
	}
	return n, maxLag, nil
}

// finiteValues returns an error wrapping almanac.ErrNonFinite when v
// holds NaN or ±Inf.
func finiteValues(fn, what string, v []float64) error {
	for k, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("accuracy: %s: %w: %s %v at lag %d", fn, almanac.ErrNonFinite, what, x, k)
		}
	}
	return nil
}

var z975 = distuv.UnitNormal.Quantile(0.975)

// Autocovariances returns the sample autocovariances at lags 0..maxLag,
// (1/n) Σ_t (x_t − x̄)(x_{t+k} − x̄), as R's acf(type = "covariance")
// computes them; NaN values are passed over (R's na.action = na.pass: n
// and x̄ count the observed values, the sum the pairs with both observed).
// maxLag 0 means DefaultMaxLag(len(x)), at most n − 1. They are computed
// on x·2^k (k a power of two bringing the largest magnitude near 2^256,
// exact) and multiplied back by 2^−2k: bit for bit the plain sums on
// ordinary data, and representable covariances of data near the float64
// limit; a covariance too small for a float64 comes back as 0 or a
// subnormal number.
//
// Special cases: empty wraps almanac.ErrEmpty, all NaN
// almanac.ErrAllMissing, ±Inf almanac.ErrNonFinite, maxLag < 0
// almanac.ErrInvalid, maxLag ≥ n almanac.ErrTooShort, a constant series
// almanac.ErrConstant, a covariance beyond the float64 range (the
// variance of ±1e300 is 1e600) almanac.ErrNonFinite.
func Autocovariances(x []float64, maxLag int) ([]float64, error) {
	_, maxLag, err := checkSeries("autocovariance", x, maxLag)
	if err != nil {
		return nil, err
	}
	k := scaling.Exponent(x)
	c := tsstat.Autocov(make([]float64, maxLag+1), scaling.Scale(nil, x, k), maxLag)
	scaling.Scale(c, c, -2*k)
	if err := finiteValues("autocovariance", "covariance", c); err != nil {
		return nil, fmt.Errorf("%w (beyond the float64 range)", err)
	}
	return c, nil
}

// ACF returns the sample autocorrelations of x at lags 0..maxLag (the
// value at lag 0 is 1) with their white-noise bound and the number of
// observed values, as R's acf computes them (mean removed, denominator
// n; NaN passed over as in Autocovariances). maxLag 0 means
// DefaultMaxLag(len(x)), at most n − 1. The autocorrelations do not
// depend on the scale of x and are computed on x times a power of two
// (exact), so data near the float64 limit give their autocorrelations.
// Special cases as for Autocovariances.
func ACF(x []float64, maxLag int) (Correlogram, error) {
	n, maxLag, err := checkSeries("ACF", x, maxLag)
	if err != nil {
		return Correlogram{}, err
	}
	c := Correlogram{Lags: make([]int, maxLag+1), Values: tsstat.ACF(x, maxLag), Bound: z975 / math.Sqrt(float64(n)), N: n}
	if err := finiteValues("ACF", "autocorrelation", c.Values); err != nil {
		return Correlogram{}, err
	}
	for k := range c.Lags {
		c.Lags[k] = k
	}
	return c, nil
}

// PACF returns the sample partial autocorrelations of x at lags
// 1..maxLag, from the autocorrelations by the Durbin–Levinson recursion
// (as R's pacf), with their white-noise bound and the number of observed
// values. maxLag and the special cases are as for ACF.
func PACF(x []float64, maxLag int) (Correlogram, error) {
	n, maxLag, err := checkSeries("PACF", x, maxLag)
	if err != nil {
		return Correlogram{}, err
	}
	c := Correlogram{Lags: make([]int, maxLag), Values: tsstat.PACF(x, maxLag), Bound: z975 / math.Sqrt(float64(n)), N: n}
	if err := finiteValues("PACF", "partial autocorrelation", c.Values); err != nil {
		return Correlogram{}, err
	}
	for k := range c.Lags {
		c.Lags[k] = k + 1
	}
	return c, nil
}

// PortmanteauKind tells which portmanteau statistic a test uses.
type PortmanteauKind int

const (
	// LjungBoxTest: Q = n(n+2) Σ_{k=1}^{lag} r_k² / (n − k) (Ljung & Box 1978).
	LjungBoxTest PortmanteauKind = iota + 1
	// BoxPierceTest: Q = n Σ_{k=1}^{lag} r_k² (Box & Pierce 1970).
	BoxPierceTest
)

// String returns "Ljung-Box" or "Box-Pierce", and PortmanteauKind(n) for
// other values.
func (k PortmanteauKind) String() string {
	switch k {
	case LjungBoxTest:
		return "Ljung-Box"
	case BoxPierceTest:
		return "Box-Pierce"
	}
	return fmt.Sprintf("PortmanteauKind(%d)", int(k))
}

// Portmanteau is the result of a Ljung–Box or Box–Pierce test that the
// first Lag autocorrelations are jointly zero.
type Portmanteau struct {
	Kind      PortmanteauKind
	Lag       int     // number of autocorrelations summed
	FitDF     int     // parameters subtracted from the degrees of freedom
	DF        int     // Lag − FitDF
	Statistic float64 // Q
	PValue    float64 // P(χ²_DF > Q)
}

// LjungBox returns the Ljung–Box test of x at lag with the chi-square
// degrees of freedom reduced by fitdf (the number of parameters fitted to
// produce x when x holds residuals). r_k are the autocorrelations of ACF
// and n the number of observed values, as in R's Box.test.
//
// Special cases: as for Autocovariances (with maxLag = lag); fitdf < 0 or
// lag − fitdf < 1 wraps almanac.ErrInvalid. Data near the float64 limit
// are tested like any other (the autocorrelations are computed on
// rescaled data).
func LjungBox(x []float64, lag, fitdf int) (Portmanteau, error) {
	return portmanteau(LjungBoxTest, x, lag, fitdf)
}

// BoxPierce returns the Box–Pierce test of x at lag with fitdf fitted
// parameters; see LjungBox.
func BoxPierce(x []float64, lag, fitdf int) (Portmanteau, error) {
	return portmanteau(BoxPierceTest, x, lag, fitdf)
}

func portmanteau(kind PortmanteauKind, x []float64, lag, fitdf int) (Portmanteau, error) {
	name := kind.String()
	if fitdf < 0 || lag-fitdf < 1 {
		return Portmanteau{}, fmt.Errorf("accuracy: %s: %w: lag %d with %d fitted parameters leaves %d degrees of freedom", name, almanac.ErrInvalid, lag, fitdf, lag-fitdf)
	}
	n, _, err := checkSeries(name, x, lag)
	if err != nil {
		return Portmanteau{}, err
	}
	r := tsstat.ACF(x, lag)
	if err := finiteValues(name, "autocorrelation", r); err != nil {
		return Portmanteau{}, err
	}
	return portmanteauFromACF(kind, r, n, lag, fitdf), nil
}

// portmanteauFromACF computes the statistic from autocorrelations r
// (r[0] = 1, at least lag+1 values) of n observed values.
func portmanteauFromACF(kind PortmanteauKind, r []float64, n, lag, fitdf int) Portmanteau {
	fn := float64(n)
	q := 0.0
	for k := 1; k <= lag; k++ {
		if kind == LjungBoxTest {
			q += r[k] * r[k] / (fn - float64(k))
		} else {
			q += r[k] * r[k]
		}
	}
	if kind == LjungBoxTest {
		q *= fn * (fn + 2)
	} else {
		q *= fn
	}
	df := lag - fitdf
	chi := distuv.ChiSquared{K: float64(df)}
	return Portmanteau{Kind: kind, Lag: lag, FitDF: fitdf, DF: df, Statistic: q, PValue: chi.Survival(q)}
}

// Residuals configures the residual diagnostics of Diagnose. The zero
// value chooses everything automatically.
type Residuals struct {
	// MaxLag is the largest lag of the ACF and PACF. 0 means R's default
	// ⌊10·log10(n)⌋, at most n − 1.
	MaxLag int
	// Lag is the number of autocorrelations in the portmanteau tests. 0
	// means min(2·Period, n/5) for a seasonal Period > 1 and min(10, n/5)
	// otherwise (common practice, as advised in Hyndman & Athanasopoulos,
	// "Forecasting: principles and practice", §5.4 — recalled from
	// memory), and at least FitDF + 1.
	Lag int
	// Period is the seasonal period of the series the model was fitted
	// to, used only for the default Lag. 0 or 1 means non-seasonal.
	Period int
	// FitDF is the number of fitted parameters subtracted from the
	// portmanteau degrees of freedom. 0 means automatic: the Fitted's
	// NumParams when it implements almanac.ParamCounter, else 0. A
	// negative value means none (0) even for a ParamCounter.
	FitDF int
}

// Diagnosis holds the residual diagnostics of a fitted model.
type Diagnosis struct {
	N         int         // number of observed (non-NaN) residuals
	Mean      float64     // mean of the observed residuals
	ACF       Correlogram // lags 0..MaxLag
	PACF      Correlogram // lags 1..MaxLag
	LjungBox  Portmanteau
	BoxPierce Portmanteau
}

// Diagnose computes the diagnostics of the residuals of f (its
// Residuals(), NaN entries — such as the first residual of a naive model
// — passed over as in ACF). Special cases as for ACF and LjungBox.
func (s Residuals) Diagnose(f almanac.Fitted) (Diagnosis, error) {
	if f == nil {
		return Diagnosis{}, fmt.Errorf("accuracy: diagnose: %w: nil fitted model", almanac.ErrInvalid)
	}
	fitdf := s.FitDF
	if fitdf == 0 {
		if pc, ok := f.(almanac.ParamCounter); ok {
			fitdf = pc.NumParams()
		}
	}
	if fitdf < 0 {
		fitdf = 0
	}
	return s.diagnose(f.Residuals(), fitdf)
}

// DiagnoseValues computes the diagnostics of the residuals r, with FitDF
// parameters subtracted (0 or negative: none).
func (s Residuals) DiagnoseValues(r []float64) (Diagnosis, error) {
	return s.diagnose(r, max(s.FitDF, 0))
}

func (s Residuals) diagnose(r []float64, fitdf int) (Diagnosis, error) {
	// The mean is summed on the residuals times a power of two (exact),
	// so residuals near the float64 limit give their representable mean.
	k := scaling.Exponent(r)
	n := 0
	sum := 0.0
	for _, v := range scaling.Scale(nil, r, k) {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			n++
			sum += v
		}
	}
	maxLag := s.MaxLag
	if maxLag == 0 {
		maxLag = DefaultMaxLag(n)
	}
	lag := s.Lag
	if lag == 0 {
		lag = 10
		if s.Period > 1 {
			lag = 2 * s.Period
		}
		lag = max(min(lag, n/5), fitdf+1)
	}
	acf, err := ACF(r, max(maxLag, lag))
	if err != nil {
		return Diagnosis{}, fmt.Errorf("accuracy: diagnose: %w", err)
	}
	pacf, err := PACF(r, maxLag)
	if err != nil {
		return Diagnosis{}, fmt.Errorf("accuracy: diagnose: %w", err)
	}
	if fitdf < 0 || lag-fitdf < 1 {
		return Diagnosis{}, fmt.Errorf("accuracy: diagnose: %w: lag %d with %d fitted parameters leaves %d degrees of freedom", almanac.ErrInvalid, lag, fitdf, lag-fitdf)
	}
	d := Diagnosis{
		N:         n,
		Mean:      math.Ldexp(sum/float64(n), -k), // |mean| ≤ max |r|: representable
		LjungBox:  portmanteauFromACF(LjungBoxTest, acf.Values, n, lag, fitdf),
		BoxPierce: portmanteauFromACF(BoxPierceTest, acf.Values, n, lag, fitdf),
		PACF:      pacf,
	}
	acf.Lags = acf.Lags[:maxLag+1]
	acf.Values = acf.Values[:maxLag+1]
	d.ACF = acf
	return d, nil
}
