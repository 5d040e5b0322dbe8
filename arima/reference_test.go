package arima

import (
	"context"
	"math"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// handlers dispatches the package's reference fixtures on their kind.
// "arima" and "arima_css" are checked here (R 4.2.2 stats::arima and
// predict.Arima, see each fixture's call); the "kpss" kind is registered
// by the KPSS test file with an init function adding to this map.
var handlers = map[string]reftest.Handler{
	"arima":     checkARIMAFixture,
	"arima_css": checkARIMAFixture,
}

// TestReference, the package's one data-driven reference test, runs
// every fixture in testdata/reference (copied unchanged from the shared
// reference set) through its handler; a fixture of an unknown kind
// fails. It runs them twice: with gonum's optimize.BFGS, the minimiser
// fits use, and with the package's own quasi-Newton minimiser (optim.go,
// useGonum false) as a cross-check, against the same R values and
// tolerances: both must reach R's optimum.
func TestReference(t *testing.T) {
	t.Run("gonum BFGS", func(t *testing.T) {
		reftest.Run(t, "testdata/reference", handlers)
	})
	t.Run("own quasi-Newton", func(t *testing.T) {
		defer func(old bool) { useGonum = old }(useGonum)
		useGonum = false
		reftest.Run(t, "testdata/reference", handlers)
	})
}

// fixtureSeries builds the series of a fixture from its input and its
// dataset's R tsp (frequency 12, 4 or 1).
func fixtureSeries(t *testing.T, f *reftest.Fixture) almanac.Series {
	t.Helper()
	y := f.Floats(t, "input")
	freq := f.Float(t, "dataset.frequency")
	start := f.Floats(t, "dataset.start")
	var fr calendar.Frequency
	var t0 time.Time
	switch freq {
	case 12:
		fr = calendar.Monthly
		t0 = time.Date(int(start[0]), time.Month(start[1]), 1, 0, 0, 0, 0, time.UTC)
	case 4:
		fr = calendar.Quarterly
		t0 = time.Date(int(start[0]), time.Month(3*int(start[1])-2), 1, 0, 0, 0, 0, time.UTC)
	case 1:
		fr = calendar.Yearly
		t0 = time.Date(int(start[0]), 1, 1, 0, 0, 0, 0, time.UTC)
	default:
		t.Fatalf("fixture frequency %v not handled", freq)
	}
	return almanac.Series{Key: f.Case, Start: t0, Freq: fr, Values: y}
}

// ourName maps a coefficient name of R's arima to ours (R's "intercept"
// is the process mean, our "mean").
func ourName(rname string) string {
	if rname == "intercept" {
		return "mean"
	}
	return rname
}

// fixtureSpec builds our Spec from the fixture's spec block, with the
// regressor columns (and their future values) of spec.xreg.
func fixtureSpec(t *testing.T, f *reftest.Fixture) (Spec, [][]float64) {
	t.Helper()
	order := f.Floats(t, "spec.order")
	seas := f.Floats(t, "spec.seasonal")
	s := Spec{P: int(order[0]), D: int(order[1]), Q: int(order[2]), SP: int(seas[0]), SD: int(seas[1]), SQ: int(seas[2])}
	if f.Has("spec.period") {
		s.Period = int(f.Float(t, "spec.period"))
	}
	mean, _ := f.Get("spec.include_mean")
	if m, _ := mean.(bool); m != (s.D+s.SD == 0) {
		t.Fatalf("include_mean %v with d + D = %d not mapped", m, s.D+s.SD)
	}
	switch f.String("spec.method") {
	case "ML":
		s.Method = ML
	case "CSS":
		s.Method = CSS
	case "CSS-ML":
		s.Method = CSSThenML
	default:
		t.Fatalf("method %q", f.String("spec.method"))
	}
	var future [][]float64
	if f.Has("spec.xreg") {
		cols, _ := f.Get("spec.xreg.columns")
		names := make([]string, 0)
		for name := range cols.(map[string]any) {
			names = append(names, name)
		}
		slices.Sort(names) // one column in these fixtures; order made explicit
		for _, name := range names {
			s.Regressors = append(s.Regressors, Regressor{Name: name, Values: f.Floats(t, "spec.xreg.columns."+name)})
			future = append(future, f.Floats(t, "spec.xreg.newxreg_columns."+name))
		}
	}
	return s, future
}

// tol returns the fixture's tolerance for key, failing when it has none.
func tol(t *testing.T, f *reftest.Fixture, key string) (abs, rel float64) {
	t.Helper()
	abs, rel, ok := f.Tol(key)
	if !ok {
		t.Fatalf("fixture has no tolerance %q", key)
	}
	return abs, rel
}

func forecastOf(t *testing.T, fit *Fitted, h int, future [][]float64) almanac.Forecast {
	t.Helper()
	for j := range future {
		future[j] = future[j][:h]
	}
	fc, err := fit.ForecastWith(h, future)
	if err != nil {
		t.Fatal(err)
	}
	return fc
}

func sdOf(fc almanac.Forecast) []float64 { return fc.Dist.(*almanac.Normal).SD }

// checkARIMAFixture checks one R stats::arima fixture (kinds arima and
// arima_css): first the model at the fixture's fixed coefficients
// (expect.at_fixed, no optimiser: log-likelihood, σ², residuals and
// forecasts at the fixture's tolerances), then the estimated fit
// (coefficients, our maximised log-likelihood not below R's minus the
// fixture's bar, σ², AIC, standard errors, residuals, forecasts).
func checkARIMAFixture(t *testing.T, f *reftest.Fixture) {
	y := fixtureSeries(t, f)
	spec, future := fixtureSpec(t, f)
	css := f.Kind == "arima_css"
	h := int(f.Float(t, "spec.n_ahead"))

	// At fixed coefficients.
	if f.Has("expect.at_fixed") {
		t.Run("at_fixed", func(t *testing.T) {
			fs := spec
			fs.Fixed = map[string]float64{}
			fixed, _ := f.Get("expect.at_fixed.fixed")
			for name, v := range fixed.(map[string]any) {
				fs.Fixed[ourName(name)] = v.(float64)
			}
			fm, err := fs.Fit(context.Background(), y)
			if err != nil {
				t.Fatal(err)
			}
			fit := fm.(*Fitted)
			if got, want := fit.NumObs(), int(f.Float(t, "expect.at_fixed.nobs")); got != want {
				t.Errorf("nobs = %d, want %d", got, want)
			}
			a, r := tol(t, f, "at_fixed.loglik")
			// R's value: we reproduce R's finite prior (kappa = 1e6,
			// F_t < 1e4), see doc.go.
			numtest.Scalar(t, "at_fixed.loglik", fit.LogLik(), f.Float(t, "expect.at_fixed.loglik"), a, r)
			if !css {
				// The same log-likelihood through the optimiser's path
				// (no residuals kept: closed-form start of the differencing
				// block, see kalman.diffuseStart).
				pr := newProblem(fit.lay, fit.y, fit.x, fs.Fixed, FinitePrior)
				res, ok := pr.likelihood(pr.base, nil)
				if !ok {
					t.Fatal("likelihood not available")
				}
				nobs := float64(pr.nUsed)
				ll := -0.5 * (nobs*math.Log(res.ssq/float64(res.nu)) + nobs/float64(res.nu)*res.sumlog + nobs + nobs*math.Log(2*math.Pi))
				numtest.Scalar(t, "at_fixed.loglik (objective path)", ll, f.Float(t, "expect.at_fixed.loglik"), a, r)
			}
			if f.Has("expect.at_fixed.exact_differenced_likelihood") {
				// The exact diffuse start (DiffusePrior) against the exact
				// likelihood of the differenced series that the fixture
				// generator computed by dense Cholesky factorisation (not
				// an R arima output; see the fixture's "what").
				ds := fs
				ds.Prior = DiffusePrior
				dm, err := ds.Fit(context.Background(), y)
				if err != nil {
					t.Fatal(err)
				}
				da, dr := tol(t, f, "at_fixed.exact_differenced_likelihood.loglik")
				numtest.Scalar(t, "at_fixed.exact_differenced_likelihood.loglik", dm.(*Fitted).LogLik(), f.Float(t, "expect.at_fixed.exact_differenced_likelihood.loglik"), da, dr)
				if got, want := dm.(*Fitted).NumObs(), int(f.Float(t, "expect.at_fixed.exact_differenced_likelihood.n")); got != want {
					t.Errorf("exact: n = %d, want %d", got, want)
				}
			}
			a, r = tol(t, f, "at_fixed.sigma2")
			numtest.Scalar(t, "at_fixed.sigma2", fit.Sigma2(), f.Float(t, "expect.at_fixed.sigma2"), a, r)
			a, r = tol(t, f, "at_fixed.residuals")
			numtest.Slice(t, "at_fixed.residuals", fit.Residuals(), f.Floats(t, "expect.at_fixed.residuals"), a, r)
			if css {
				// The fixture gives no tolerance of its own for the CSS
				// objective ½ log σ²; it follows σ², and a relative error
				// ε in σ² moves it by ε/2, so the at_fixed.sigma2
				// tolerance is used in that form.
				_, sr := tol(t, f, "at_fixed.sigma2")
				numtest.Scalar(t, "at_fixed.css_objective", 0.5*math.Log(fit.Sigma2()), f.Float(t, "expect.at_fixed.css_objective"), sr/2, 0)
			}
			if f.Has("expect.at_fixed.forecast") {
				a, r = 0, 1e-8
				if !css {
					a, r = tol(t, f, "at_fixed.forecast")
				}
				// The CSS fixtures give no forecast tolerance; their
				// forecast is the same Kalman prediction at given
				// coefficients as in the ML fixtures, whose at_fixed
				// tolerance (1e-8 relative) is used.
				fc := forecastOf(t, fit, h, future)
				numtest.Slice(t, "at_fixed.forecast.mean", fc.Mean, f.Floats(t, "expect.at_fixed.forecast.mean"), a, r)
				numtest.Slice(t, "at_fixed.forecast.se", sdOf(fc), f.Floats(t, "expect.at_fixed.forecast.se"), a, r)
			}
		})
	}

	// Estimated.
	fm, err := spec.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	fit := fm.(*Fitted)
	t.Logf("%s: loglik %.10g (R %.10g), coef %+v", fit, fit.LogLik(), f.Float(t, "expect.loglik"), fit.Coef())
	if got, want := fit.NumObs(), int(f.Float(t, "expect.nobs")); got != want {
		t.Errorf("nobs = %d, want %d", got, want)
	}
	coefs := map[string]Coefficient{}
	for _, c := range fit.Coef() {
		coefs[c.Name] = c
	}
	want, _ := f.Get("expect.coef")
	if len(want.(map[string]any)) != len(coefs) {
		t.Errorf("%d coefficients, R has %d", len(coefs), len(want.(map[string]any)))
	}
	a, r := tol(t, f, "coef")
	sa, sr := tol(t, f, "se")
	for name, v := range want.(map[string]any) {
		c, ok := coefs[ourName(name)]
		if !ok {
			t.Errorf("no coefficient %s", ourName(name))
			continue
		}
		numtest.Scalar(t, "coef."+name, c.Value, v.(float64), a, r)
		numtest.Scalar(t, "se."+name, c.StdErr, f.Float(t, "expect.se."+name), sa, sr)
	}
	// One-sided bar: our maximum must not be below R's by more than abs.
	a, _ = tol(t, f, "loglik")
	if ll, want := fit.LogLik(), f.Float(t, "expect.loglik"); ll < want-a {
		t.Errorf("loglik = %.10g, below R's %.10g by more than %g", ll, want, a)
	}
	a, r = tol(t, f, "sigma2")
	numtest.Scalar(t, "sigma2", fit.Sigma2(), f.Float(t, "expect.sigma2"), a, r)
	if f.Has("expect.at_fixed.exact_differenced_likelihood") {
		// With the exact diffuse start our maximum of the exact likelihood
		// must reach at least its value at the fixture's fixed (rounded
		// R) estimates, less the fixture's loglik bar.
		ds := spec
		ds.Prior = DiffusePrior
		dm, err := ds.Fit(context.Background(), y)
		if err != nil {
			t.Fatal(err)
		}
		bar, _ := tol(t, f, "loglik")
		if ll, at := dm.(*Fitted).LogLik(), f.Float(t, "expect.at_fixed.exact_differenced_likelihood.loglik"); ll < at-bar {
			t.Errorf("exact loglik maximum %.10g below its value %.10g at the fixed estimates", ll, at)
		}
	}
	if css {
		// The fixture's sigma2 entry states the bar for a correct CSS
		// fit: σ² ≤ R's value × (1 + 1e-6) (R's optim stops at reltol
		// 1e-8, so a better minimiser may go below it, never far above).
		if got, want := fit.Sigma2(), f.Float(t, "expect.sigma2"); got > want*(1+1e-6) {
			t.Errorf("sigma2 = %.10g, above R's %.10g × (1 + 1e-6)", got, want)
		}
		// ½ log σ² follows σ² (a relative error ε moves it by ε/2); the
		// fixture's sigma2 tolerance is used in that form.
		numtest.Scalar(t, "css_objective", 0.5*math.Log(fit.Sigma2()), f.Float(t, "expect.css_objective"), r/2, 0)
		return
	}
	a, r = tol(t, f, "aic")
	numtest.Scalar(t, "aic", fit.AIC(), f.Float(t, "expect.aic"), a, r)
	if f.Has("expect.bic") {
		// BIC − AIC = (log n − 2)(k + 1) does not depend on the optimum,
		// so R's BIC(fit) definition is checked exactly through it.
		numtest.Scalar(t, "bic − aic", fit.BIC()-fit.AIC(), f.Float(t, "expect.bic")-f.Float(t, "expect.aic"), 1e-9, 1e-12)
	}
	a, r = tol(t, f, "residuals")
	numtest.Slice(t, "residuals", fit.Residuals(), f.Floats(t, "expect.residuals"), a, r)
	fc := forecastOf(t, fit, h, future)
	// The fixture allows 1e-3 (mean) and 1e-2 (se) relative; the package
	// holds itself to 1e-4 relative for both, which is tighter and is
	// what is checked.
	a, r = tol(t, f, "forecast.mean")
	numtest.Slice(t, "forecast.mean", fc.Mean, f.Floats(t, "expect.forecast.mean"), a, min(r, 1e-4))
	a, r = tol(t, f, "forecast.se")
	numtest.Slice(t, "forecast.se", sdOf(fc), f.Floats(t, "expect.forecast.se"), a, min(r, 1e-4))
}
