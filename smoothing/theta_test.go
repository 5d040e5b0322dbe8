package smoothing_test

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/smoothing"
)

// quarterlyNIST is the quarterly series of the NIST/SEMATECH e-Handbook,
// section 6.4.3.5 (triple exponential smoothing; data printed, as
// transcribed in /work/shared/reference/published.md). It is used here
// as a real seasonal, trending series for property checks.
var quarterlyNIST = []float64{362, 385, 432, 341, 382, 409, 498, 387, 473, 513, 582, 474,
	544, 582, 681, 557, 628, 707, 773, 592, 627, 725, 854, 661}

// trendNIST is the data of the handbook's section 6.4.3.3–4 (printed).
var trendNIST = []float64{6.4, 5.6, 7.8, 8.8, 11, 11.6, 16.7, 15.3, 21.6, 22.4}

var start2000 = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

func quarterly(v []float64) almanac.Series {
	return almanac.Series{Key: "q", Start: start2000, Freq: calendar.Quarterly, Values: v}
}

func fitTheta(t *testing.T, m smoothing.Theta, y almanac.Series) *smoothing.ThetaFit {
	t.Helper()
	f, err := m.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("Fit: %v", err)
	}
	return f.(*smoothing.ThetaFit)
}

// olsNormal fits y = a + b·t, t = 1..n, by solving the 2×2 normal
// equations from raw sums (independent of the centred formula in the
// package).
func olsNormal(y []float64) (a, b float64) {
	var n, st, stt, sy, sty float64
	for i, v := range y {
		tt := float64(i + 1)
		n++
		st += tt
		stt += tt * tt
		sy += v
		sty += tt * v
	}
	det := n*stt - st*st
	return (stt*sy - st*sty) / det, (n*sty - st*sy) / det
}

// sesDirect runs SES from l0 and returns the final level and the SSE.
func sesDirect(y []float64, alpha, l0 float64) (level, sse float64) {
	level = l0
	for _, v := range y {
		e := v - level
		sse += e * e
		level = alpha*v + (1-alpha)*level
	}
	return level, sse
}

// thetaByFormula is the Hyndman & Billah (2003, IJF 19:287–290) form of
// the Theta forecast, ŷ_{n+h} = ℓ_n + b·(h − 1 + 1/α − (1−α)^n/α), with
// drift b = (1 − 1/θ) × the OLS slope, computed independently.
func thetaByFormula(y []float64, theta, alpha, l0 float64, h int) []float64 {
	n := float64(len(y))
	_, slope := olsNormal(y)
	b := (1 - 1/theta) * slope
	ln, _ := sesDirect(y, alpha, l0)
	out := make([]float64, h)
	for i := range out {
		hh := float64(i + 1)
		out[i] = ln + b*(hh-1+1/alpha-math.Pow(1-alpha, n)/alpha)
	}
	return out
}

// TestThetaEqualsSESWithDrift checks the equivalence shown by Hyndman &
// Billah (2003): the Theta forecast is SES plus a drift of (1 − 1/θ)
// times the least-squares slope (half of it for the classic θ = 2), with
// the slope and the SES run recomputed independently here, and checks
// that the estimated α and ℓ_0 minimise the SES sum of squares.
func TestThetaEqualsSESWithDrift(t *testing.T) {
	cases := []struct {
		name  string
		y     []float64
		theta float64
	}{
		{"trend/classic", trendNIST, 0},
		{"trend/theta3", trendNIST, 3},
		{"trend/theta1 is SES", trendNIST, 1},
		{"quarterly/classic", quarterlyNIST, 0},
		{"quarterly/theta1.5", quarterlyNIST, 1.5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			y := almanac.Series{Key: "x", Start: start2000, Freq: calendar.Yearly, Values: c.y}
			f := fitTheta(t, smoothing.Theta{Adjust: smoothing.AdjustNever, Theta: c.theta}, y)
			theta := c.theta
			if theta == 0 {
				theta = 2
			}
			fc, err := f.Forecast(12)
			if err != nil {
				t.Fatal(err)
			}
			want := thetaByFormula(c.y, theta, f.Alpha, f.InitialLevel, 12)
			numtest.Slice(t, "forecast", fc.Mean, want, 1e-9, 1e-12)
			_, slope := olsNormal(c.y)
			numtest.Scalar(t, "slope", f.Slope, slope, 1e-9, 1e-12)
			if theta == 1 {
				for h := 1; h < 12; h++ {
					numtest.Scalar(t, "SES forecast is flat", fc.Mean[h], fc.Mean[0], 1e-9, 1e-12)
				}
			}
			// Least squares: no small move of α or ℓ_0 lowers the SSE.
			_, sse := sesDirect(c.y, f.Alpha, f.InitialLevel)
			scale := math.Abs(f.InitialLevel) + 1
			for _, d := range []struct{ da, dl float64 }{{1e-3, 0}, {-1e-3, 0}, {0, 1e-3 * scale}, {0, -1e-3 * scale}} {
				a := f.Alpha + d.da
				if a <= 0 || a > 1 {
					continue
				}
				if _, s := sesDirect(c.y, a, f.InitialLevel+d.dl); s < sse*(1-1e-9) {
					t.Errorf("SSE %v at α %v, ℓ0 %v below the estimate's %v", s, a, f.InitialLevel+d.dl, sse)
				}
			}
		})
	}
}

// classicalIndices recomputes the multiplicative seasonal indices of a
// classical decomposition as defined for R's stats::decompose
// (/work/shared/reference/README.md, "R decompose"): centred moving
// average with weights (0.5, 1, …, 1, 0.5)/m for even m, ratios y/trend,
// mean by position counted from the first observation, normalised to
// mean one. Written independently of the package for this test.
func classicalIndices(y []float64, m int) []float64 {
	n := len(y)
	sum := make([]float64, m)
	cnt := make([]float64, m)
	half := m / 2
	for i := half; i < n-half; i++ {
		var tr float64
		if m%2 == 0 {
			tr = 0.5*y[i-half] + 0.5*y[i+half]
			for j := i - half + 1; j < i+half; j++ {
				tr += y[j]
			}
		} else {
			for j := i - half; j <= i+half; j++ {
				tr += y[j]
			}
		}
		tr /= float64(m)
		sum[i%m] += y[i] / tr
		cnt[i%m]++
	}
	mean := 0.0
	for i := range sum {
		sum[i] /= cnt[i]
		mean += sum[i] / float64(m)
	}
	for i := range sum {
		sum[i] /= mean
	}
	return sum
}

// airPassengers returns R's AirPassengers series (monthly airline
// passengers 1949–1960, Box & Jenkins series G), read from the dataset
// block of a reference fixture copied unchanged from
// /work/shared/reference/smoothing.
func airPassengers(t *testing.T) almanac.Series {
	t.Helper()
	fx, err := reftest.Load("testdata/reference/hw_airpassengers_multiplicative.json")
	if err != nil {
		t.Fatal(err)
	}
	v := fx.Floats(t, "dataset.values")
	return almanac.Series{Key: "AirPassengers", Start: time.Date(1949, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// TestThetaSeasonalAdjustment checks the seasonal path: the indices are
// those of a classical multiplicative decomposition (recomputed
// independently here from the R decompose definition), and the forecasts
// are the Theta forecasts of the adjusted series times the index of
// their position. AirPassengers is strongly seasonal (the 90%
// autocorrelation test must find it so); the handbook's quarterly series
// is adjusted on request (AdjustAlways).
func TestThetaSeasonalAdjustment(t *testing.T) {
	ap := airPassengers(t)
	cases := []struct {
		name string
		spec smoothing.Theta
		y    almanac.Series
		m    int
	}{
		{"AirPassengers/auto", smoothing.Theta{}, ap, 12},
		{"AirPassengers/always", smoothing.Theta{Adjust: smoothing.AdjustAlways}, ap, 12},
		{"quarterly/always", smoothing.Theta{Adjust: smoothing.AdjustAlways}, quarterly(quarterlyNIST), 4},
		{"quarterly/always theta3", smoothing.Theta{Adjust: smoothing.AdjustAlways, Theta: 3}, quarterly(quarterlyNIST), 4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := fitTheta(t, c.spec, c.y)
			if !f.Adjusted || f.Period != c.m {
				t.Fatalf("Adjusted = %v, Period = %d; want true, %d", f.Adjusted, f.Period, c.m)
			}
			y := c.y.Values
			idx := classicalIndices(y, c.m)
			numtest.Slice(t, "indices", f.Indices, idx, 1e-12, 1e-12)
			adj := make([]float64, len(y))
			for i, v := range y {
				adj[i] = v / idx[i%c.m]
			}
			fc, err := f.Forecast(2*c.m+1, 80)
			if err != nil {
				t.Fatal(err)
			}
			base := thetaByFormula(adj, f.Theta, f.Alpha, f.InitialLevel, 2*c.m+1)
			n := len(y)
			for h := range base {
				base[h] *= idx[(n+h)%c.m]
			}
			numtest.Slice(t, "forecast", fc.Mean, base, 1e-9, 1e-12)
			fv := f.FittedValues()
			res := f.Residuals()
			for i := range fv {
				numtest.Scalar(t, "y = fitted + residual", fv[i]+res[i], y[i], 1e-9, 1e-12)
			}
		})
	}
	f := fitTheta(t, smoothing.Theta{Adjust: smoothing.AdjustNever}, ap)
	if f.Adjusted || f.Indices != nil {
		t.Errorf("AdjustNever: Adjusted = %v", f.Adjusted)
	}
	f = fitTheta(t, smoothing.Theta{Period: 1}, ap)
	if f.Adjusted {
		t.Errorf("Period 1: Adjusted = %v", f.Adjusted)
	}
}

// TestThetaIntervals checks the interval formula σ·√(1 + α²(h−1))·z
// (ETS(A,N,N) variance, common practice; Hyndman & Billah 2003), that the
// intervals widen with the horizon and that 95% intervals contain 80%
// ones.
func TestThetaIntervals(t *testing.T) {
	y := almanac.Series{Key: "x", Start: start2000, Freq: calendar.Yearly, Values: trendNIST}
	f := fitTheta(t, smoothing.Theta{}, y)
	fc, err := f.Forecast(6, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	const z975 = 1.959963984540054 // standard normal 97.5% quantile (common practice)
	sigma := math.Sqrt(f.Sigma2)
	for h := range 6 {
		want := z975 * sigma * math.Sqrt(1+f.Alpha*f.Alpha*float64(h))
		numtest.Scalar(t, "95% half-width", fc.Intervals[1].Upper[h]-fc.Mean[h], want, 1e-9, 1e-9)
		if fc.Intervals[1].Lower[h] > fc.Intervals[0].Lower[h] || fc.Intervals[1].Upper[h] < fc.Intervals[0].Upper[h] {
			t.Errorf("h=%d: 95%% interval does not contain the 80%% one", h+1)
		}
		if h > 0 && fc.Intervals[1].Upper[h]-fc.Intervals[1].Lower[h] < fc.Intervals[1].Upper[h-1]-fc.Intervals[1].Lower[h-1] {
			t.Errorf("h=%d: interval narrower than at h=%d", h+1, h)
		}
	}
	// σ² is the mean squared one-step residual.
	ss := 0.0
	for _, r := range f.Residuals() {
		ss += r * r
	}
	numtest.Scalar(t, "Sigma2", f.Sigma2, ss/float64(len(trendNIST)), 1e-12, 1e-12)
}

// TestThetaScaleInvariance: forecasts and bounds of c·y are c times those
// of y (DESIGN.md numbers section), with seasonal adjustment
// (AirPassengers, automatic test) and without (handbook quarterly data).
func TestThetaScaleInvariance(t *testing.T) {
	series := map[smoothing.SeasonalAdjust]almanac.Series{
		smoothing.AdjustAuto:  airPassengers(t),
		smoothing.AdjustNever: quarterly(quarterlyNIST),
	}
	for _, mode := range []smoothing.SeasonalAdjust{smoothing.AdjustAuto, smoothing.AdjustNever} {
		y := series[mode]
		base := fitTheta(t, smoothing.Theta{Adjust: mode}, y)
		want, err := base.Forecast(8, 90)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range []float64{1e-6, 1e-3, 1, 1e3, 1e6} {
			t.Run(mode.String()+"/"+formatG(c), func(t *testing.T) {
				sy := y.Clone()
				for i := range sy.Values {
					sy.Values[i] *= c
				}
				f := fitTheta(t, smoothing.Theta{Adjust: mode}, sy)
				if f.Adjusted != base.Adjusted {
					t.Fatalf("Adjusted = %v at scale %g, %v at 1", f.Adjusted, c, base.Adjusted)
				}
				got, err := f.Forecast(8, 90)
				if err != nil {
					t.Fatal(err)
				}
				for h := range 8 {
					numtest.Scalar(t, "mean", got.Mean[h]/c, want.Mean[h], 0, 1e-7)
					numtest.Scalar(t, "upper", got.Intervals[0].Upper[h]/c, want.Intervals[0].Upper[h], 0, 1e-7)
				}
			})
		}
	}
}

func formatG(c float64) string {
	switch c {
	case 1e-6:
		return "1e-6"
	case 1e-3:
		return "1e-3"
	case 1:
		return "1"
	case 1e3:
		return "1e3"
	}
	return "1e6"
}

// TestThetaDeterministic: bit-identical results from concurrent fits on
// one shared spec (DESIGN.md: deterministic for any goroutine count).
func TestThetaDeterministic(t *testing.T) {
	spec := smoothing.Theta{}
	y := quarterly(quarterlyNIST)
	ref, err := fitTheta(t, spec, y).Forecast(8)
	if err != nil {
		t.Fatal(err)
	}
	const workers = 8
	out := make([][]float64, workers)
	var wg sync.WaitGroup
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			f, err := spec.Fit(context.Background(), y)
			if err != nil {
				return
			}
			fc, err := f.Forecast(8)
			if err == nil {
				out[w] = fc.Mean
			}
		}()
	}
	wg.Wait()
	for w, got := range out {
		if len(got) != len(ref.Mean) {
			t.Fatalf("worker %d: no forecast", w)
		}
		for h := range got {
			if math.Float64bits(got[h]) != math.Float64bits(ref.Mean[h]) {
				t.Errorf("worker %d step %d: %v != %v", w, h, got[h], ref.Mean[h])
			}
		}
	}
}

// TestThetaConstant: a constant series must forecast that constant with
// zero-width intervals, not fail.
func TestThetaConstant(t *testing.T) {
	v := []float64{5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 5}
	f := fitTheta(t, smoothing.Theta{}, quarterly(v))
	fc, err := f.Forecast(5, 95)
	if err != nil {
		t.Fatal(err)
	}
	for h := range 5 {
		numtest.Scalar(t, "mean", fc.Mean[h], 5, 1e-12, 0)
		numtest.Scalar(t, "upper", fc.Intervals[0].Upper[h], 5, 1e-12, 0)
	}
}

func TestThetaBadInput(t *testing.T) {
	good := quarterlyNIST
	neg := append([]float64(nil), good...)
	neg[3] = -1
	nan := append([]float64(nil), good...)
	nan[5] = math.NaN()
	inf := append([]float64(nil), good...)
	inf[5] = math.Inf(1)
	cases := []struct {
		name string
		spec smoothing.Theta
		y    almanac.Series
		want error
	}{
		{"empty", smoothing.Theta{}, quarterly(nil), almanac.ErrEmpty},
		{"too short", smoothing.Theta{}, quarterly([]float64{1, 2}), almanac.ErrTooShort},
		{"all missing", smoothing.Theta{}, quarterly([]float64{math.NaN(), math.NaN(), math.NaN()}), almanac.ErrAllMissing},
		{"missing", smoothing.Theta{}, quarterly(nan), almanac.ErrMissing},
		{"infinite", smoothing.Theta{}, quarterly(inf), almanac.ErrNonFinite},
		{"no frequency", smoothing.Theta{}, almanac.Series{Values: good}, almanac.ErrFrequency},
		{"theta below 1", smoothing.Theta{Theta: 0.5}, quarterly(good), almanac.ErrInvalid},
		{"theta NaN", smoothing.Theta{Theta: math.NaN()}, quarterly(good), almanac.ErrInvalid},
		{"alpha above 1", smoothing.Theta{Alpha: 1.5}, quarterly(good), almanac.ErrInvalid},
		{"alpha negative", smoothing.Theta{Alpha: -0.1}, quarterly(good), almanac.ErrInvalid},
		{"negative period", smoothing.Theta{Period: -4}, quarterly(good), almanac.ErrInvalid},
		{"unknown adjust", smoothing.Theta{Adjust: 7}, quarterly(good), almanac.ErrInvalid},
		{"always, non-positive", smoothing.Theta{Adjust: smoothing.AdjustAlways}, quarterly(neg), almanac.ErrNonPositive},
		{"always, period 1", smoothing.Theta{Adjust: smoothing.AdjustAlways, Period: 1}, quarterly(good), almanac.ErrInvalid},
		{"always, one season", smoothing.Theta{Adjust: smoothing.AdjustAlways}, quarterly(good[:7]), almanac.ErrTooShort},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.spec.Fit(context.Background(), c.y)
			if !errors.Is(err, c.want) {
				t.Fatalf("error %v, want one wrapping %v", err, c.want)
			}
			if err.Error()[:10] != "smoothing:" {
				t.Errorf("message %q does not start with the package name", err)
			}
		})
	}
	// Auto mode does not adjust a series with a non-positive value.
	f := fitTheta(t, smoothing.Theta{}, quarterly(neg))
	if f.Adjusted {
		t.Error("auto mode adjusted a series with a negative value")
	}
	// Forecast arguments.
	if _, err := f.Forecast(0); !errors.Is(err, almanac.ErrHorizon) {
		t.Errorf("h = 0: %v, want ErrHorizon", err)
	}
	if _, err := f.Forecast(3, 0.95); err != nil {
		t.Errorf("level 0.95 (a valid percentage): %v", err)
	}
	if _, err := f.Forecast(3, 100); !errors.Is(err, almanac.ErrLevel) {
		t.Errorf("level 100: %v, want ErrLevel", err)
	}
	// Cancelled context.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := (smoothing.Theta{}).Fit(ctx, quarterly(good)); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: %v", err)
	}
	// A ThetaFit not returned by Fit (its α of 0 would give 0/0 drifts).
	for _, z := range []*smoothing.ThetaFit{{}, nil} {
		if _, err := z.Forecast(3, 90); !errors.Is(err, almanac.ErrNotFitted) {
			t.Errorf("ThetaFit %p: Forecast: %v, want ErrNotFitted", z, err)
		}
		if _, err := z.Simulate(3, 10, rand.NewPCG(1, 1)); !errors.Is(err, almanac.ErrNotFitted) {
			t.Errorf("ThetaFit %p: Simulate: %v, want ErrNotFitted", z, err)
		}
	}
}

func TestThetaString(t *testing.T) {
	cases := []struct {
		name string
		spec smoothing.Theta
		want string
	}{
		{"classic", smoothing.Theta{}, "Theta"},
		{"theta 2 explicit", smoothing.Theta{Theta: 2}, "Theta"},
		{"theta 3", smoothing.Theta{Theta: 3}, "Theta(θ=3)"},
		{"theta 1.5", smoothing.Theta{Theta: 1.5}, "Theta(θ=1.5)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := fitTheta(t, c.spec, quarterly(quarterlyNIST)).String(); got != c.want {
				t.Errorf("String() = %q, want %q", got, c.want)
			}
		})
	}
	for _, c := range []struct {
		a    smoothing.SeasonalAdjust
		want string
	}{{smoothing.AdjustAuto, "auto"}, {smoothing.AdjustNever, "never"}, {smoothing.AdjustAlways, "always"}, {9, "SeasonalAdjust(9)"}} {
		if got := c.a.String(); got != c.want {
			t.Errorf("%d.String() = %q, want %q", int(c.a), got, c.want)
		}
	}
}

func TestThetaNumParams(t *testing.T) {
	f := fitTheta(t, smoothing.Theta{Adjust: smoothing.AdjustAlways}, quarterly(quarterlyNIST))
	// α, ℓ_0, slope, and 3 free seasonal indices (4 normalised to mean 1).
	if got := f.NumParams(); got != 6 {
		t.Errorf("NumParams = %d, want 6", got)
	}
	f = fitTheta(t, smoothing.Theta{Alpha: 0.5, Adjust: smoothing.AdjustNever}, quarterly(quarterlyNIST))
	if got := f.NumParams(); got != 2 {
		t.Errorf("fixed α, no season: NumParams = %d, want 2", got)
	}
	var _ almanac.ParamCounter = f
}

// TestThetaSimulate: the simulated paths reproduce the forecast mean and
// the analytic interval (Monte Carlo check of the ETS(A,N,N) variance
// σ²(1 + α²(h−1)), common practice), the same seed gives the same paths,
// and bad arguments are refused.
func TestThetaSimulate(t *testing.T) {
	f := fitTheta(t, smoothing.Theta{}, airPassengers(t))
	const h, n = 6, 20000
	paths, err := f.Simulate(h, n, rand.NewPCG(1, 2))
	if err != nil {
		t.Fatal(err)
	}
	fc, err := f.Forecast(h, 90)
	if err != nil {
		t.Fatal(err)
	}
	for j := range h {
		mean, sq := 0.0, 0.0
		for _, p := range paths {
			mean += p[j]
		}
		mean /= n
		for _, p := range paths {
			sq += (p[j] - mean) * (p[j] - mean)
		}
		sd := math.Sqrt(sq / (n - 1))
		// Analytic SD from the 90% bound: (upper − mean)/z_0.95.
		want := (fc.Intervals[0].Upper[j] - fc.Mean[j]) / 1.6448536269514722
		// Standard errors: mean sd/√n, SD about sd/√(2n); 5 of them.
		numtest.Scalar(t, "path mean", mean, fc.Mean[j], 5*want/math.Sqrt(n), 0)
		numtest.Scalar(t, "path sd", sd, want, 5*want/math.Sqrt(2*n), 0)
	}
	again, _ := f.Simulate(h, n, rand.NewPCG(1, 2))
	for i := range paths {
		for j := range paths[i] {
			if math.Float64bits(paths[i][j]) != math.Float64bits(again[i][j]) {
				t.Fatalf("path %d step %d differs with the same seed", i, j)
			}
		}
	}
	for _, c := range []struct {
		name string
		h, n int
		src  rand.Source
		want error
	}{
		{"h 0", 0, 10, rand.NewPCG(1, 1), almanac.ErrHorizon},
		{"n 0", 3, 0, rand.NewPCG(1, 1), almanac.ErrInvalid},
		{"nil source", 3, 10, nil, almanac.ErrInvalid},
	} {
		if _, err := f.Simulate(c.h, c.n, c.src); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.name, err, c.want)
		}
	}
}
