package arima

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// fixtureData loads a reference fixture's series (and regressors).
func fixtureData(t *testing.T, name string) (*reftest.Fixture, almanac.Series) {
	t.Helper()
	f, err := reftest.Load("testdata/reference/" + name + ".json")
	if err != nil {
		t.Fatal(err)
	}
	return f, fixtureSeries(t, f)
}

func mustFit(t *testing.T, s Spec, y almanac.Series) *Fitted {
	t.Helper()
	f, err := s.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("%v: %v", s, err)
	}
	return f.(*Fitted)
}

func TestBadInput(t *testing.T) {
	_, lh := fixtureData(t, "lh_ar1")
	_, huron := fixtureData(t, "lakehuron_ar2_trend")
	year := make([]float64, huron.Len())
	for i := range year {
		year[i] = float64(1875 + i)
	}
	withValues := func(y almanac.Series, v []float64) almanac.Series {
		y.Values = v
		return y
	}
	nan := math.NaN()
	lhNaN := lh.Slice()
	lhNaN[3] = nan
	tests := []struct {
		name     string
		spec     Spec
		y        almanac.Series
		want     error
		contains []string
	}{
		{"empty", Spec{}, withValues(lh, nil), almanac.ErrEmpty, nil},
		{"all missing", Spec{}, withValues(lh, []float64{nan, nan, nan}), almanac.ErrAllMissing, nil},
		{"infinite value", Spec{}, withValues(lh, []float64{1, 2, math.Inf(1), 4}), almanac.ErrNonFinite, nil},
		{"constant", Spec{P: 1}, withValues(lh, []float64{3, 3, 3, 3, 3, 3, 3, 3}), almanac.ErrConstant, nil},
		// Values from 2^1023 up made the data scale 2^1024 = +Inf (the fit
		// then failed on a zero series with a misleading message).
		{"values near the largest float64", Spec{D: 1, Q: 1}, withValues(lh, scaled(lh.Values, math.MaxFloat64/4)), almanac.ErrNonFinite, []string{"2^1023"}},
		{"too short for the orders", Spec{P: 3, Q: 2}, lh.Head(6), almanac.ErrTooShort, []string{"ARIMA(3,0,2)"}},
		{"too short after differencing", Spec{D: 1, SD: 1, SQ: 1, Period: 12}, lh.Head(14), almanac.ErrTooShort, nil},
		{"negative order", Spec{P: -1}, lh, almanac.ErrInvalid, nil},
		// Orders and periods far beyond the series once sized the
		// state-space matrices before any length check (out of memory).
		{"AR order beyond the series", Spec{P: 1 << 40}, lh, almanac.ErrTooShort, []string{"P = 1099511627776"}},
		{"seasonal AR lag beyond the series", Spec{SP: 1, Period: 1 << 40}, lh, almanac.ErrTooShort, []string{"period"}},
		{"seasonal MA lag beyond the series", Spec{Q: 1, SQ: 1, Period: 47}, lh, almanac.ErrTooShort, []string{"MA polynomial"}},
		{"seasonal difference beyond the series", Spec{SD: 1, Period: 1 << 40}, lh, almanac.ErrTooShort, nil},
		{"seasonal order without period", Spec{SP: 1}, huron, almanac.ErrInvalid, []string{"period"}},
		{"unknown fixed name", Spec{P: 1, Fixed: map[string]float64{"ma1": 0.3}}, lh, almanac.ErrInvalid, []string{`"ma1"`}},
		{"non-finite fixed value", Spec{P: 1, Fixed: map[string]float64{"ar1": math.NaN()}}, lh, almanac.ErrInvalid, nil},
		{"non-stationary fixed AR", Spec{P: 1, Fixed: map[string]float64{"ar1": 1.2}}, lh, ErrNonStationary, nil},
		{"drift with two differences", Spec{D: 2, Constant: ConstantInclude}, lh, almanac.ErrInvalid, nil},
		{"unknown method", Spec{Method: Method(9)}, lh, almanac.ErrInvalid, nil},
		{"CSS with missing values", Spec{P: 1, Method: CSS}, withValues(lh, lhNaN), almanac.ErrMissing, nil},
		{"regressor of wrong length", Spec{P: 1, Regressors: []Regressor{{Name: "year", Values: year[:10]}}}, huron, almanac.ErrLength, []string{`"year"`}},
		{"regressor with NaN", Spec{P: 1, Regressors: []Regressor{{Name: "year", Values: append([]float64{nan}, year[1:]...)}}}, huron, almanac.ErrNonFinite, nil},
		{"regressor without name", Spec{P: 1, Regressors: []Regressor{{Values: year}}}, huron, almanac.ErrInvalid, nil},
		{"regressor with a reserved name", Spec{P: 1, Regressors: []Regressor{{Name: "ar1", Values: year}}}, huron, almanac.ErrInvalid, nil},
		{"duplicate regressor names", Spec{P: 1, Regressors: []Regressor{{Name: "year", Values: year}, {Name: "year", Values: year}}}, huron, almanac.ErrInvalid, nil},
		{"collinear regressors", Spec{P: 1, Regressors: []Regressor{
			{Name: "year", Values: year},
			{Name: "decade", Values: scaled(year, 0.1)},
		}}, huron, ErrCollinear, []string{`"decade"`, `"year"`}},
		{"regressor collinear with the mean", Spec{P: 1, Regressors: []Regressor{{Name: "ones", Values: scaled(year, 0)}}}, huron, ErrCollinear, []string{`"ones"`}},
		{"constant regressor removed by differencing", Spec{P: 1, D: 1, Regressors: []Regressor{{Name: "level", Values: plus(scaled(year, 0), 2)}}}, huron, ErrCollinear, []string{`"level"`, "differencing"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := tc.spec.Fit(context.Background(), tc.y)
			if !errors.Is(err, tc.want) {
				t.Fatalf("error %v, want one wrapping %v", err, tc.want)
			}
			if !strings.HasPrefix(err.Error(), "arima: ") {
				t.Errorf("message %q does not start with the package name", err)
			}
			for _, s := range tc.contains {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("message %q does not name %s", err, s)
				}
			}
		})
	}
}

func scaled(v []float64, c float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = c * x
	}
	return out
}

func plus(v []float64, c float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x + c
	}
	return out
}

func TestCancelledContext(t *testing.T) {
	_, y := fixtureData(t, "usaccdeaths_airline")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := airline.Fit(ctx, y)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
}

// TestForecastArguments checks the forecast special cases, with the
// LakeHuron regression of the reference fixtures.
func TestForecastArguments(t *testing.T) {
	f, huron := fixtureData(t, "lakehuron_ar2_trend")
	year := f.Floats(t, "spec.xreg.columns.year")
	fit := mustFit(t, Spec{P: 2, Regressors: []Regressor{{Name: "year", Values: year}}}, huron)
	if got, want := fit.String(), "ARIMA(2,0,0) + mean + regressors(year)"; got != want {
		t.Errorf("String() = %q, want %q", got, want)
	}
	future := []float64{1973, 1974, 1975}
	tests := []struct {
		name string
		call func() error
		want error
	}{
		{"plain Forecast with regressors", func() error { _, err := fit.Forecast(3); return err }, ErrNeedRegressors},
		{"no future columns", func() error { _, err := fit.ForecastWith(3, nil); return err }, ErrNeedRegressors},
		{"too many columns", func() error { _, err := fit.ForecastWith(3, [][]float64{future, future}); return err }, ErrNeedRegressors},
		{"column too short", func() error { _, err := fit.ForecastWith(4, [][]float64{future}); return err }, ErrNeedRegressors},
		{"NaN future value", func() error {
			_, err := fit.ForecastWith(3, [][]float64{{1973, math.NaN(), 1975}})
			return err
		}, ErrNeedRegressors},
		{"zero horizon", func() error { _, err := fit.ForecastWith(0, [][]float64{{}}); return err }, almanac.ErrHorizon},
		{"level 100", func() error { _, err := fit.ForecastWith(3, [][]float64{future}, 100); return err }, almanac.ErrLevel},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if err := tc.call(); !errors.Is(err, tc.want) {
				t.Fatalf("error %v, want one wrapping %v", err, tc.want)
			}
		})
	}
	fc, err := fit.ForecastWith(3, [][]float64{future}, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	if want := time.Date(1973, 1, 1, 0, 0, 0, 0, time.UTC); !fc.Start.Equal(want) {
		t.Errorf("forecast starts %v, want %v", fc.Start, want)
	}
	// 95% interval contains the 80% one (nesting of Normal quantiles).
	for h := range fc.Mean {
		if !(fc.Intervals[1].Lower[h] < fc.Intervals[0].Lower[h] && fc.Intervals[0].Upper[h] < fc.Intervals[1].Upper[h]) {
			t.Errorf("step %d: 95%% interval does not contain the 80%% one", h)
		}
	}
}

// TestDrift checks ARIMA(0,1,0) with drift on log air passengers against
// the closed form of the random walk with drift (common practice): the
// estimated drift is the mean of the differences, σ² their mean squared
// deviation, the h-step forecast y_n + h·drift with standard error σ√h.
func TestDrift(t *testing.T) {
	y := logAirPassengers(t)
	fit := mustFit(t, Spec{D: 1, Constant: ConstantInclude}, y)
	if got, want := fit.String(), "ARIMA(0,1,0) + drift"; got != want {
		t.Errorf("String() = %q, want %q", got, want)
	}
	v := y.Values
	n := len(v)
	mean := (v[n-1] - v[0]) / float64(n-1)
	ss := 0.0
	for i := 1; i < n; i++ {
		d := v[i] - v[i-1] - mean
		ss += d * d
	}
	s2 := ss / float64(n-1)
	c := coefMap(fit)
	numtest.Scalar(t, "drift", c["drift"].Value, mean, 1e-7, 0)
	numtest.Scalar(t, "sigma2", fit.Sigma2(), s2, 0, 1e-6)
	fc, err := fit.Forecast(12)
	if err != nil {
		t.Fatal(err)
	}
	for h := range fc.Mean {
		numtest.Scalar(t, "forecast", fc.Mean[h], v[n-1]+float64(h+1)*mean, 1e-6, 0)
		numtest.Scalar(t, "se", sdOf(fc)[h], math.Sqrt(s2*float64(h+1)), 0, 1e-5)
	}
}

// TestPartlyFixed fixes ma1 of the airline model at R's estimate
// (airpassengers_log_airline fixture, R stats::arima) and estimates sma1:
// it must land on R's sma1 within the fixture's coefficient tolerance.
func TestPartlyFixed(t *testing.T) {
	f, y := fixtureData(t, "airpassengers_log_airline")
	s := airline
	s.Fixed = map[string]float64{"ma1": f.Float(t, "expect.coef.ma1")}
	fit := mustFit(t, s, y)
	c := coefMap(fit)
	if !c["ma1"].Fixed || c["sma1"].Fixed || !math.IsNaN(c["ma1"].StdErr) {
		t.Errorf("fixed flags/SE wrong: %+v", fit.Coef())
	}
	if fit.NumParams() != 1 {
		t.Errorf("NumParams = %d, want 1", fit.NumParams())
	}
	a, r, _ := tol(t, f, "coef")
	numtest.Scalar(t, "sma1", c["sma1"].Value, f.Float(t, "expect.coef.sma1"), a, r)
}

// TestMissingAtEnd: at fixed coefficients, a missing last value is
// skipped by the filter, so the one-step forecast after it equals the
// two-step forecast from the series without it (a property of the Kalman
// filter, Durbin & Koopman 2012 §4.10). Checked on the airline model,
// where a missing value sends the filter through the full state.
func TestMissingAtEnd(t *testing.T) {
	for _, prior := range []Prior{FinitePrior, DiffusePrior} {
		t.Run(prior.String(), func(t *testing.T) { testMissingAtEnd(t, prior) })
	}
}

func testMissingAtEnd(t *testing.T, prior Prior) {
	f, y := fixtureData(t, "usaccdeaths_airline")
	s := airline
	s.Prior = prior
	s.Fixed = map[string]float64{"ma1": f.Float(t, "expect.at_fixed.fixed.ma1"), "sma1": f.Float(t, "expect.at_fixed.fixed.sma1")}
	short := y.Head(y.Len() - 1)
	gap := y.Clone()
	gap.Values[gap.Len()-1] = math.NaN()
	fs := mustFit(t, s, short)
	fg := mustFit(t, s, gap)
	numtest.Scalar(t, "loglik", fg.LogLik(), fs.LogLik(), 0, 1e-9)
	a, err := fs.Forecast(3)
	if err != nil {
		t.Fatal(err)
	}
	b, err := fg.Forecast(2)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "mean", b.Mean, a.Mean[1:], 0, 1e-9)
	numtest.Slice(t, "se", sdOf(b), sdOf(a)[1:], 0, 1e-9)
}

// TestShortcutEqualsFullFilter: the ARMA-only filter used after the first
// d + sD observations, started either by filtering those observations
// with the full state or by the closed form of diffuseStart, gives the
// sums, residuals and final state of the full filter (to rounding: the full filter carries κ = 1e6 in its
// covariance, which costs it about six digits, so agreement is asked to
// 1e-8 relative). Internal consistency, not a reference check.
func TestShortcutEqualsFullFilter(t *testing.T) {
	f, y := fixtureData(t, "usaccdeaths_airline")
	lay, err := airline.resolve(y)
	if err != nil {
		t.Fatal(err)
	}
	pr := newProblem(lay, y.Slice(), nil, nil, FinitePrior)
	coef := []float64{f.Float(t, "expect.coef.ma1"), f.Float(t, "expect.coef.sma1")}
	r1 := make([]float64, y.Len())
	r2 := make([]float64, y.Len())
	fast, _ := pr.likelihood(coef, r1)
	a1 := append([]float64(nil), pr.kal.a...)
	pr.lay.expand(coef, pr.phi, pr.theta)
	pr.kal.setARMA(pr.phi, pr.theta)
	pr.kal.init()
	pr.adjust(coef)
	full := pr.kal.filterFull(pr.w, r2)
	if fast.nu != full.nu {
		t.Fatalf("nu %d vs %d", fast.nu, full.nu)
	}
	// The objective's path: the first d + sD steps in closed form.
	noResid, _ := pr.likelihood(coef, nil)
	if noResid.nu != full.nu {
		t.Fatalf("nu %d vs %d", noResid.nu, full.nu)
	}
	numtest.Scalar(t, "ssq (closed-form start)", noResid.ssq, full.ssq, 0, 1e-8)
	numtest.Scalar(t, "sumlog (closed-form start)", noResid.sumlog, full.sumlog, 1e-8, 1e-8)
	pr.lay.expand(coef, pr.phi, pr.theta)
	pr.kal.setARMA(pr.phi, pr.theta)
	pr.kal.init()
	pr.adjust(coef)
	full = pr.kal.filterFull(pr.w, r2)
	numtest.Scalar(t, "ssq", fast.ssq, full.ssq, 0, 1e-8)
	numtest.Scalar(t, "sumlog", fast.sumlog, full.sumlog, 1e-8, 1e-8)
	numtest.Slice(t, "residuals", r1, r2, 1e-8, 1e-8)
	numtest.Slice(t, "state", a1, pr.kal.a, 1e-8, 1e-8)
}

// TestDiffuseFilterEqualsShortcut: with complete data the exact diffuse
// filter (used with missing values) and the differenced-series shortcut
// give the same likelihood sums and final state, and a gap inside the
// series changes the likelihood only by what the skipped observation
// contributed (it stays finite and the filter resolves the diffuse part).
func TestDiffuseFilterEqualsShortcut(t *testing.T) {
	f, y := fixtureData(t, "usaccdeaths_airline")
	lay, err := airline.resolve(y)
	if err != nil {
		t.Fatal(err)
	}
	pr := newProblem(lay, y.Slice(), nil, nil, DiffusePrior)
	coef := []float64{f.Float(t, "expect.coef.ma1"), f.Float(t, "expect.coef.sma1")}
	// With residuals the shortcut runs the covariance recursion and keeps
	// the final state; without, the Chandrasekhar recursions give the sums.
	fast, _ := pr.likelihood(coef, make([]float64, y.Len()))
	a1 := append([]float64(nil), pr.kal.a...)
	chandra, _ := pr.likelihood(coef, nil)
	pr.kal.init()
	pr.adjust(coef)
	full := pr.kal.filterDiffuse(pr.w, nil)
	if fast.nu != full.nu || fast.nu != y.Len()-13 || chandra.nu != full.nu {
		t.Fatalf("nu %d, %d vs %d", fast.nu, chandra.nu, full.nu)
	}
	numtest.Scalar(t, "ssq", full.ssq, fast.ssq, 0, 1e-10)
	numtest.Scalar(t, "sumlog", full.sumlog, fast.sumlog, 1e-10, 1e-10)
	numtest.Scalar(t, "ssq (Chandrasekhar)", full.ssq, chandra.ssq, 0, 1e-10)
	numtest.Scalar(t, "sumlog (Chandrasekhar)", full.sumlog, chandra.sumlog, 1e-10, 1e-10)
	numtest.Slice(t, "state", pr.kal.a, a1, 1e-8, 1e-10)
	if pr.kal.diffuseLeft() {
		t.Error("diffuse part left after complete data")
	}
	gap := y.Clone()
	gap.Values[30] = math.NaN()
	gap.Values[31] = math.NaN()
	s := airline
	s.Prior = DiffusePrior
	fit := mustFit(t, s, gap)
	if fit.NumObs() != y.Len()-2-13 || math.IsNaN(fit.LogLik()) {
		t.Errorf("with a gap: n = %d, loglik %v", fit.NumObs(), fit.LogLik())
	}
}

// TestScaleInvariance: forecasts of c·y are c times the forecasts of y
// (DESIGN.md), for a seasonal differenced model and one with a mean, for
// ordinary and extreme c (the fit works on y divided by a power of two).
func TestScaleInvariance(t *testing.T) {
	for _, tc := range []struct {
		name, fixture string
		spec          Spec
	}{
		{"airline", "usaccdeaths_airline", Spec{D: 1, Q: 1, SD: 1, SQ: 1}},
		{"ARMA(1,1) with mean", "lh_arma11", Spec{P: 1, Q: 1}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, y := fixtureData(t, tc.fixture)
			f1 := mustFit(t, tc.spec, y)
			a, err := f1.Forecast(12)
			if err != nil {
				t.Fatal(err)
			}
			for _, c := range []float64{1000, 1e-200, 3e250} {
				yc := y.Clone()
				for i := range yc.Values {
					yc.Values[i] *= c
				}
				f2 := mustFit(t, tc.spec, yc)
				b, err := f2.Forecast(12)
				if err != nil {
					t.Fatal(err)
				}
				numtest.Slice(t, fmt.Sprintf("mean, c = %g", c), b.Mean, scaled(a.Mean, c), 0, 1e-6)
				numtest.Slice(t, fmt.Sprintf("se, c = %g", c), sdOf(b), scaled(sdOf(a), c), 0, 1e-5)
				// log L(c·y) = log L(y) − n log c.
				numtest.Scalar(t, fmt.Sprintf("loglik, c = %g", c), f2.LogLik(), f1.LogLik()-float64(f1.NumObs())*math.Log(c), 1e-6, 1e-9)
			}
		})
	}
}

// TestDeterminism: fits of one Spec on one series are bit-identical,
// serially and from concurrent goroutines.
func TestDeterminism(t *testing.T) {
	_, y := fixtureData(t, "usaccdeaths_airline")
	ref := mustFit(t, airline, y)
	refFc, err := ref.Forecast(24, 95)
	if err != nil {
		t.Fatal(err)
	}
	const workers = 4
	fits := make([]*Fitted, workers)
	var wg sync.WaitGroup
	for i := range fits {
		wg.Go(func() {
			f, err := airline.Fit(context.Background(), y)
			if err == nil {
				fits[i] = f.(*Fitted)
			}
		})
	}
	wg.Wait()
	// Concurrent reads of one Fitted (the standard errors are computed on
	// first use) agree bit for bit.
	shared := mustFit(t, airline, y)
	ses := make([][]Coefficient, workers)
	var wg2 sync.WaitGroup
	for i := range ses {
		wg2.Go(func() { ses[i] = shared.Coef() })
	}
	wg2.Wait()
	for i := range ses {
		for j, c := range ses[i] {
			if c != ses[0][j] || c.StdErr != ref.Coef()[j].StdErr {
				t.Errorf("reader %d: coefficient %d differs: %+v vs %+v", i, j, c, ses[0][j])
			}
		}
	}
	for i, f := range fits {
		if f == nil {
			t.Fatalf("worker %d failed", i)
		}
		fc, err := f.Forecast(24, 95)
		if err != nil {
			t.Fatal(err)
		}
		for j := range f.coef {
			if f.coef[j] != ref.coef[j] {
				t.Errorf("worker %d: coefficient %d differs: %v vs %v", i, j, f.coef[j], ref.coef[j])
			}
		}
		for h := range fc.Mean {
			if fc.Mean[h] != refFc.Mean[h] || fc.Intervals[0].Upper[h] != refFc.Intervals[0].Upper[h] {
				t.Errorf("worker %d: forecast step %d differs", i, h)
			}
		}
		if f.LogLik() != ref.LogLik() {
			t.Errorf("worker %d: loglik differs", i)
		}
	}
}

// TestNoAllocPerLikelihood: evaluating the ML and CSS objectives does not
// allocate.
func TestNoAllocPerLikelihood(t *testing.T) {
	y := logAirPassengers(t)
	for _, s := range []Spec{airline, {P: 2, Q: 1, SP: 1}, {P: 1, D: 1, Q: 1, Constant: ConstantInclude},
		{D: 1, Q: 1, SD: 1, SQ: 1, Prior: DiffusePrior}} {
		lay, err := s.resolve(y)
		if err != nil {
			t.Fatal(err)
		}
		x := make([][]float64, 0)
		if lay.mean || lay.drift {
			col := make([]float64, y.Len())
			for i := range col {
				col[i] = float64(i + 1)
			}
			x = append(x, col)
		}
		pr := newProblem(lay, y.Slice(), x, nil, s.Prior)
		p := make([]float64, len(pr.free))
		for i := range p {
			p[i] = 0.1
		}
		if n := testing.AllocsPerRun(20, func() { pr.mlObjective(p, true) }); n != 0 {
			t.Errorf("%v: ML objective allocates %v times per evaluation", s, n)
		}
		if n := testing.AllocsPerRun(20, func() { pr.cssObjective(p) }); n != 0 {
			t.Errorf("%v: CSS objective allocates %v times per evaluation", s, n)
		}
		// And with a missing value (full state filter).
		pr.y[40] = math.NaN()
		if n := testing.AllocsPerRun(20, func() { pr.mlObjective(p, true) }); n != 0 {
			t.Errorf("%v with a missing value: ML objective allocates %v times per evaluation", s, n)
		}
	}
	// A long series whose covariance recursion reaches the fixed gain
	// (finite prior, seasonal differencing, period 24).
	src := rand.New(rand.NewPCG(5, 6))
	long := make([]float64, 960)
	for i := range long {
		long[i] = 10*math.Sin(2*math.Pi*float64(i%24)/24) + src.NormFloat64()
	}
	pr := newProblem(newLayout(1, 0, 1, 0, 1, 1, 24, false, false, nil), long, nil, nil, FinitePrior)
	p := []float64{0.3, 0.2, -0.3}
	if n := testing.AllocsPerRun(20, func() { pr.mlObjective(p, true) }); n != 0 {
		t.Errorf("period 24, 960 values: ML objective allocates %v times per evaluation", n)
	}
	if pr.kal.steadyFrom < 0 {
		t.Errorf("period 24, 960 values: the fixed gain was not reached")
	}
}

func TestEnumStrings(t *testing.T) {
	for _, tc := range []struct{ got, want string }{
		{CSSThenML.String(), "CSS-ML"}, {ML.String(), "ML"}, {CSS.String(), "CSS"}, {Method(7).String(), "Method(7)"},
		{FinitePrior.String(), "finite"}, {DiffusePrior.String(), "diffuse"}, {Prior(4).String(), "Prior(4)"},
		{ConstantAuto.String(), "auto"}, {ConstantNone.String(), "none"}, {ConstantInclude.String(), "include"}, {Constant(5).String(), "Constant(5)"},
		{Spec{P: 1, D: 1, Q: 1}.String(), "ARIMA(1,1,1)"},
		{Spec{D: 1, Q: 1, SD: 1, SQ: 1, Period: 12}.String(), "ARIMA(0,1,1)×(0,1,1)_12"},
		{Spec{SP: 1}.String(), "ARIMA(0,0,0)×(1,0,0)_s"},
	} {
		if tc.got != tc.want {
			t.Errorf("got %q, want %q", tc.got, tc.want)
		}
	}
}

// TestRegressorUnits: the fit does not depend on the units of a regressor
// — multiplying the column by c divides its coefficient and standard
// error by c and leaves the log-likelihood and the other coefficients
// alone (equivariance of least squares; our fits compared with each
// other, not a reference value). Series F with an invented regressor
// (normal draws, fixed seed). Before the columns were scaled, c = 1e10
// with a mean stopped at a log-likelihood 6 lower and c = 1e18 failed as
// collinear. Tolerance 1e-6 relative: different c give the optimiser
// the same problem up to the last bit of the scaled columns.
func TestRegressorUnits(t *testing.T) {
	y := almanac.Series{Key: "series F", Start: time.Date(2001, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: seriesF}
	src := rand.New(rand.NewPCG(3, 4))
	z := make([]float64, len(seriesF))
	for i := range z {
		z[i] = src.NormFloat64()
	}
	for _, sp := range []Spec{{P: 1}, {P: 1, D: 1}, {P: 1, Constant: ConstantNone}} {
		sp.Regressors = []Regressor{{Name: "z", Values: z}}
		base := mustFit(t, sp, y)
		bc := base.Coef()
		for _, c := range []float64{1e-100, 1e-10, 3, 1e10, 1e18, 1e100} {
			t.Run(fmt.Sprintf("%v constant %v c=%g", sp, sp.Constant, c), func(t *testing.T) {
				s := sp
				s.Regressors = []Regressor{{Name: "z", Values: scaled(z, c)}}
				f := mustFit(t, s, y)
				numtest.Scalar(t, "loglik", f.LogLik(), base.LogLik(), 0, 1e-6)
				for i, co := range f.Coef() {
					want, wantSE := bc[i].Value, bc[i].StdErr
					if co.Name == "z" {
						want, wantSE = want/c, wantSE/c
					}
					numtest.Scalar(t, co.Name, co.Value, want, 0, 1e-6)
					numtest.Scalar(t, co.Name+" se", co.StdErr, wantSE, 0, 1e-4)
				}
			})
		}
	}
	// The search's differencing choice on regression residuals, too.
	r, err := Search{Regressors: []Regressor{{Name: "z", Values: scaled(z, 1e18)}}}.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("search with a regressor of magnitude 1e18: %v", err)
	}
	if got := r.String(); !strings.Contains(got, "+ regressors(z)") {
		t.Errorf("search chose %s", got)
	}
}
