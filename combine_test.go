package almanac_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// fixed is a test model with known forecasts: Level at every step with a
// normal distribution of standard deviation SD (none when SD < 0). With
// Paths > 0 its forecast carries that many sample paths instead, level +
// SD·z with z from a generator seeded by Seed. Err makes Fit fail, Panic
// makes it panic, ForecastErr makes Forecast fail.
type fixed struct {
	Level, SD   float64
	Paths       int
	Seed        uint64
	Err         error
	Panic       bool
	ForecastErr error
	Name        string
}

type fixedFit struct {
	m fixed
	y almanac.Series
}

func (m fixed) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	if m.Panic {
		panic("fixed: told to panic")
	}
	if m.Err != nil {
		return nil, m.Err
	}
	return &fixedFit{m: m, y: y}, nil
}

func (f *fixedFit) String() string {
	if f.m.Name != "" {
		return f.m.Name
	}
	return fmt.Sprintf("Fixed(%g)", f.m.Level)
}

func (f *fixedFit) FittedValues() []float64 {
	out := make([]float64, f.y.Len())
	for i := range out {
		out[i] = f.m.Level
	}
	return out
}

func (f *fixedFit) Residuals() []float64 {
	out := f.FittedValues()
	for i := range out {
		out[i] = f.y.Values[i] - out[i]
	}
	return out
}

func (f *fixedFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if f.m.ForecastErr != nil {
		return almanac.Forecast{}, f.m.ForecastErr
	}
	mean := make([]float64, h)
	for i := range mean {
		mean[i] = f.m.Level
	}
	var dist almanac.Distribution
	switch {
	case f.m.Paths > 0:
		rng := rand.New(rand.NewPCG(f.m.Seed, 1))
		paths := make([][]float64, f.m.Paths)
		for i := range paths {
			paths[i] = make([]float64, h)
			x := f.m.Level
			for s := range h {
				x += f.m.SD * rng.NormFloat64()
				paths[i][s] = x
			}
		}
		dist = &almanac.Sample{Paths: paths}
	case f.m.SD >= 0:
		sd := make([]float64, h)
		for i := range sd {
			sd[i] = f.m.SD
		}
		dist = &almanac.Normal{Mean: slices.Clone(mean), SD: sd}
	}
	return almanac.NewForecast(f.y.Time(f.y.Len()), f.y.Freq, mean, dist, levels...)
}

var (
	jan2020 = time.Date(2020, time.January, 1, 0, 0, 0, 0, time.UTC)
	// trendy: invented monthly sales of a hardware store, trend and season.
	trendy = func() almanac.Series {
		v := make([]float64, 48)
		for i := range v {
			v[i] = 100 + 2*float64(i) + 10*math.Sin(2*math.Pi*float64(i)/12) + 3*math.Cos(float64(i*i))
		}
		return almanac.Series{Key: "store", Start: jan2020, Freq: calendar.Monthly, Values: v}
	}()
)

func TestCombinationKnownForecasts(t *testing.T) {
	ctx := context.Background()
	a := fixed{Level: 10, SD: 1}
	b := fixed{Level: 20, SD: 3}
	c := fixed{Level: 35, SD: 2}
	// Source: the definitions of the mean and the median; the quantile of
	// comonotone members is the combination of their quantiles (quantile
	// averaging, Lichtendahl, Grushka-Cockayne & Winkler 2013), so with
	// normal members the bound is the combination of the members' bounds.
	z90 := 1.2815515655446004 // Φ⁻¹(0.9), common value of the normal quantile
	cases := []struct {
		name     string
		spec     almanac.Combination
		mean     float64
		upper80  float64
		str      string
		weighted bool
	}{
		{"mean of two", almanac.Combination{Members: []almanac.Model{a, b}}, 15, 15 + 2*z90, "mean(Fixed(10), Fixed(20))", false},
		{"median of three", almanac.Combination{Members: []almanac.Model{a, b, c}, Rule: almanac.CombineMedian}, 20, 20 + 3*z90, "median(Fixed(10), Fixed(20), Fixed(35))", false},
		{"median of two", almanac.Combination{Members: []almanac.Model{a, c}, Rule: almanac.CombineMedian}, 22.5, 22.5 + 1.5*z90, "median(Fixed(10), Fixed(35))", false},
		{"weighted", almanac.Combination{Members: []almanac.Model{a, b}, Rule: almanac.CombineWeighted, Weights: []float64{3, 1}}, 12.5, 12.5 + 1.5*z90, "weighted(0.75 Fixed(10), 0.25 Fixed(20))", true},
		{"zero weight not fitted", almanac.Combination{Members: []almanac.Model{a, b, c}, Rule: almanac.CombineWeighted, Weights: []float64{1, 1, 0}}, 15, 15 + 2*z90, "weighted(0.5 Fixed(10), 0.5 Fixed(20))", true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			fit, err := tc.spec.Fit(ctx, trendy)
			if err != nil {
				t.Fatal(err)
			}
			if got := fit.String(); got != tc.str {
				t.Errorf("String = %q, want %q", got, tc.str)
			}
			fc, err := fit.Forecast(4, 80)
			if err != nil {
				t.Fatal(err)
			}
			for s := range 4 {
				if math.Abs(fc.Mean[s]-tc.mean) > 1e-12 {
					t.Errorf("step %d: mean %v, want %v", s+1, fc.Mean[s], tc.mean)
				}
				if math.Abs(fc.Intervals[0].Upper[s]-tc.upper80) > 1e-9 {
					t.Errorf("step %d: 80%% upper %v, want %v", s+1, fc.Intervals[0].Upper[s], tc.upper80)
				}
			}
			if fc.SamplePaths() != nil {
				t.Error("members that cannot simulate gave sample paths")
			}
			fv := fit.FittedValues()
			res := fit.Residuals()
			for i := range fv {
				if math.Abs(fv[i]-tc.mean) > 1e-12 || math.Abs(res[i]-(trendy.Values[i]-tc.mean)) > 1e-9 {
					t.Fatalf("index %d: fitted %v residual %v, want %v and y − that", i, fv[i], res[i], tc.mean)
				}
			}
		})
	}
}

func TestCombinationSingleMemberIsTheMember(t *testing.T) {
	ctx := context.Background()
	members := []almanac.Model{
		almanac.Naive{}, almanac.Drift{}, almanac.SeasonalNaive{},
		fixed{Level: 5, SD: 2, Paths: 400, Seed: 9},
	}
	for _, m := range members {
		t.Run(fmt.Sprintf("%T", m), func(t *testing.T) {
			one, err := m.Fit(ctx, trendy)
			if err != nil {
				t.Fatal(err)
			}
			comb, err := almanac.Combination{Members: []almanac.Model{m}}.Fit(ctx, trendy)
			if err != nil {
				t.Fatal(err)
			}
			if want := "mean(" + one.String() + ")"; comb.String() != want {
				t.Errorf("String = %q, want %q", comb, want)
			}
			a, err := one.Forecast(12, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			b, err := comb.Forecast(12, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(a.Mean, b.Mean) || !a.Start.Equal(b.Start) || a.Freq != b.Freq {
				t.Errorf("forecast %v from %v, member %v from %v", b.Mean, b.Start, a.Mean, a.Start)
			}
			if !equalNaN(one.FittedValues(), comb.FittedValues()) {
				t.Error("fitted values differ from the member's")
			}
			if ap := a.SamplePaths(); ap != nil {
				// The member's own paths come back unchanged.
				if !slices.EqualFunc(ap, b.SamplePaths(), slices.Equal) {
					t.Error("paths differ from the member's")
				}
				return
			}
			// Bands from simulated paths of a member with normal bands:
			// within Monte Carlo error of the bands of the member's own
			// paths drawn from another seed (1000 paths each).
			paths, err := one.(almanac.Simulator).Simulate(12, 1000, rand.NewPCG(77, 78))
			if err != nil {
				t.Fatal(err)
			}
			sa, err := almanac.NewForecast(a.Start, a.Freq, a.Mean, &almanac.Sample{Paths: paths}, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			for k := range a.Intervals {
				for s := range 12 {
					wa := sa.Intervals[k].Upper[s] - sa.Intervals[k].Lower[s]
					wb := b.Intervals[k].Upper[s] - b.Intervals[k].Lower[s]
					if math.Abs(wb/wa-1) > 0.12 {
						t.Errorf("%v%% band at step %d: width %v, member's %v", a.Intervals[k].Level, s+1, wb, wa)
					}
				}
			}
		})
	}
}

func equalNaN(a, b []float64) bool {
	return slices.EqualFunc(a, b, func(x, y float64) bool { return x == y || math.IsNaN(x) && math.IsNaN(y) })
}

// A model combined with itself is that model: common random numbers give
// both copies the same draws, and comonotone coupling adds nothing. Drawn
// independently, the mean of two copies would have a spread √2 smaller.
func TestCombinationOfACopyKeepsTheSpread(t *testing.T) {
	ctx := context.Background()
	one, err := almanac.Naive{}.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	two, err := almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Naive{}}}.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	a, err := two.(almanac.Simulator).Simulate(6, 500, rand.NewPCG(1, 2))
	if err != nil {
		t.Fatal(err)
	}
	b, err := almanac.Combination{Members: []almanac.Model{almanac.Naive{}}}.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	c, err := b.(almanac.Simulator).Simulate(6, 500, rand.NewPCG(1, 2))
	if err != nil {
		t.Fatal(err)
	}
	if !slices.EqualFunc(a, c, slices.Equal) {
		t.Error("a model combined with itself simulates differently from the model alone")
	}
	// The horizon total of the combined paths has the member's spread:
	// the total of six random-walk steps is Σ (7 − j) e_j, of variance
	// σ²(1² + 2² + … + 6²) = 91σ² (common practice).
	sigma := residualSD(one.Residuals())
	var sum, sumSq float64
	for _, p := range a {
		tot := 0.0
		for _, v := range p {
			tot += v
		}
		sum += tot
		sumSq += tot * tot
	}
	n := float64(len(a))
	sd := math.Sqrt((sumSq - sum*sum/n) / (n - 1))
	if want := sigma * math.Sqrt(91); math.Abs(sd/want-1) > 0.1 {
		t.Errorf("sd of the 6-step total %v, want about %v", sd, want)
	}
}

func residualSD(r []float64) float64 {
	var s float64
	var n int
	for _, v := range r {
		if !math.IsNaN(v) {
			s += v * v
			n++
		}
	}
	return math.Sqrt(s / float64(n))
}

func TestCombinationScaleInvariance(t *testing.T) {
	ctx := context.Background()
	spec := almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Drift{}, almanac.SeasonalNaive{}}, Seed: 3}
	for _, rule := range []almanac.CombineRule{almanac.CombineMean, almanac.CombineMedian, almanac.CombineInverseError} {
		for _, c := range []float64{1e-6, 1e-3, 7, 1e3, 1e6} {
			t.Run(fmt.Sprintf("%v/%g", rule, c), func(t *testing.T) {
				s := spec
				s.Rule = rule
				b, err := s.Fit(ctx, trendy)
				if err != nil {
					t.Fatal(err)
				}
				want, err := b.Forecast(12, 80, 95)
				if err != nil {
					t.Fatal(err)
				}
				y := trendy.Clone()
				for i := range y.Values {
					y.Values[i] *= c
				}
				fit, err := s.Fit(ctx, y)
				if err != nil {
					t.Fatal(err)
				}
				if fit.String() != b.String() {
					t.Errorf("String %q, unscaled %q", fit, b)
				}
				got, err := fit.Forecast(12, 80, 95)
				if err != nil {
					t.Fatal(err)
				}
				close := func(g, w float64) bool { return math.Abs(g-c*w) <= 1e-9*math.Abs(c*w) }
				for s := range 12 {
					if !close(got.Mean[s], want.Mean[s]) {
						t.Errorf("step %d: mean %v, want %v", s+1, got.Mean[s], c*want.Mean[s])
					}
					for k := range got.Intervals {
						if !close(got.Intervals[k].Lower[s], want.Intervals[k].Lower[s]) || !close(got.Intervals[k].Upper[s], want.Intervals[k].Upper[s]) {
							t.Errorf("step %d: %v%% band [%v, %v], want c × [%v, %v]", s+1, got.Intervals[k].Level, got.Intervals[k].Lower[s], got.Intervals[k].Upper[s], want.Intervals[k].Lower[s], want.Intervals[k].Upper[s])
						}
					}
				}
			})
		}
	}
}

func TestCombinationDeterministic(t *testing.T) {
	ctx := context.Background()
	spec := almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Drift{}, almanac.SeasonalNaive{}}, Rule: almanac.CombineInverseError}
	fit, err := spec.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	want, err := fit.Forecast(12, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	got := make([]almanac.Forecast, 4)
	for i := range got {
		wg.Go(func() {
			f, err := spec.Fit(ctx, trendy)
			if err != nil {
				t.Error(err)
				return
			}
			got[i], _ = f.Forecast(12, 80, 95)
			// Concurrent forecasts from one fitted value.
			_, _ = fit.Forecast(12, 80)
		})
	}
	wg.Wait()
	for i, g := range got {
		if !slices.Equal(g.Mean, want.Mean) || !slices.EqualFunc(g.SamplePaths(), want.SamplePaths(), slices.Equal) {
			t.Errorf("run %d differs", i)
		}
	}
	// A different seed gives other draws (the bands still agree within
	// Monte Carlo error).
	spec.Seed = 99
	other, err := spec.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	o, err := other.Forecast(12, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	if slices.EqualFunc(o.SamplePaths(), want.SamplePaths(), slices.Equal) {
		t.Error("another seed gave the same paths")
	}
}

func TestCombinationFailureIsolation(t *testing.T) {
	ctx := context.Background()
	good := fixed{Level: 7, SD: 1}
	tooShort := fixed{Err: fmt.Errorf("test: %w: need 100 observations", almanac.ErrTooShort)}
	panics := fixed{Panic: true}
	spec := almanac.Combination{Members: []almanac.Model{tooShort, good, panics, almanac.Naive{}}}
	fit, err := spec.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	cf := fit.(*almanac.CombinationFit)
	fails := cf.Failures()
	if len(fails) != 2 || fails[0].Index != 0 || fails[1].Index != 2 {
		t.Fatalf("failures %v, want members 0 and 2", fails)
	}
	if !errors.Is(fails[0].Err, almanac.ErrTooShort) || !errors.Is(fails[1].Err, almanac.ErrNotFitted) {
		t.Errorf("failure reasons %v, %v", fails[0].Err, fails[1].Err)
	}
	if fails[0].Model != "almanac_test.fixed" {
		t.Errorf("member named %q", fails[0].Model)
	}
	if !strings.Contains(fails[1].Error(), "panicked") {
		t.Errorf("panic reported as %q", fails[1].Error())
	}
	if got := fit.String(); got != "mean(Fixed(7), Naive)" {
		t.Errorf("String = %q", got)
	}
	ms := cf.Members()
	if len(ms) != 2 || ms[0].Index != 1 || ms[1].Index != 3 || ms[0].Weight != 0.5 {
		t.Errorf("members %+v", ms)
	}

	t.Run("all fail", func(t *testing.T) {
		_, err := almanac.Combination{Members: []almanac.Model{tooShort, panics, almanac.Drift{}}}.Fit(ctx, almanac.Series{Start: jan2020, Freq: calendar.Yearly, Values: []float64{1, 2}})
		if !errors.Is(err, almanac.ErrNotFitted) || !errors.Is(err, almanac.ErrTooShort) {
			t.Fatalf("error %v, want ErrNotFitted and the members' ErrTooShort", err)
		}
		for _, want := range []string{"member 0", "member 1", "member 2", "panicked"} {
			if !strings.Contains(err.Error(), want) {
				t.Errorf("error %q does not mention %q", err, want)
			}
		}
	})
	t.Run("member forecast fails", func(t *testing.T) {
		bad := fixed{Level: 1, ForecastErr: fmt.Errorf("test: %w", almanac.ErrNoDistribution)}
		fit, err := almanac.Combination{Members: []almanac.Model{bad, good}}.Fit(ctx, trendy)
		if err != nil {
			t.Fatal(err)
		}
		fc, left, err := fit.(*almanac.CombinationFit).ForecastReport(3, 80)
		if err != nil {
			t.Fatal(err)
		}
		if len(left) != 1 || left[0].Index != 0 || !errors.Is(left[0].Err, almanac.ErrNoDistribution) {
			t.Errorf("left out %v", left)
		}
		if fc.Mean[0] != 7 {
			t.Errorf("mean %v, want the good member's 7", fc.Mean[0])
		}
		only, err := almanac.Combination{Members: []almanac.Model{bad}}.Fit(ctx, trendy)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := only.Forecast(3); !errors.Is(err, almanac.ErrNotFitted) || !errors.Is(err, almanac.ErrNoDistribution) {
			t.Errorf("every member failing to forecast: %v", err)
		}
	})
	t.Run("point-only member", func(t *testing.T) {
		pts := fixed{Level: 17, SD: -1}
		fit, err := almanac.Combination{Members: []almanac.Model{good, pts}}.Fit(ctx, trendy)
		if err != nil {
			t.Fatal(err)
		}
		fc, err := fit.Forecast(2, 80)
		if err != nil {
			t.Fatal(err)
		}
		// The good member's spread, centred on the mean of 7 and 17.
		z90 := 1.2815515655446004
		if fc.Mean[0] != 12 || math.Abs(fc.Intervals[0].Upper[0]-(12+z90)) > 1e-9 {
			t.Errorf("mean %v, upper %v", fc.Mean[0], fc.Intervals[0].Upper[0])
		}
		none, err := almanac.Combination{Members: []almanac.Model{pts}}.Fit(ctx, trendy)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := none.Forecast(2, 80); !errors.Is(err, almanac.ErrNoDistribution) {
			t.Errorf("levels without any distribution: %v", err)
		}
		if fc, err := none.Forecast(2); err != nil || fc.Mean[1] != 17 {
			t.Errorf("points only: %v %v", fc.Mean, err)
		}
		if _, err := fit.(almanac.Simulator).Simulate(2, 10, rand.NewPCG(1, 1)); !errors.Is(err, almanac.ErrNoDistribution) {
			t.Errorf("Simulate with members that cannot: %v", err)
		}
	})
	t.Run("cancelled", func(t *testing.T) {
		cctx, cancel := context.WithCancel(ctx)
		cancel()
		if _, err := spec.Fit(cctx, trendy); !errors.Is(err, context.Canceled) {
			t.Errorf("cancelled fit: %v", err)
		}
	})
}

func TestCombinationBadInput(t *testing.T) {
	ctx := context.Background()
	two := []almanac.Model{almanac.Naive{}, almanac.Drift{}}
	cases := []struct {
		name string
		spec almanac.Combination
		y    almanac.Series
		want error
	}{
		{"no members", almanac.Combination{}, trendy, almanac.ErrInvalid},
		{"nil member", almanac.Combination{Members: []almanac.Model{almanac.Naive{}, nil}}, trendy, almanac.ErrInvalid},
		{"unknown rule", almanac.Combination{Members: two, Rule: 42}, trendy, almanac.ErrInvalid},
		{"weights with mean", almanac.Combination{Members: two, Weights: []float64{1, 1}}, trendy, almanac.ErrInvalid},
		{"weights count", almanac.Combination{Members: two, Rule: almanac.CombineWeighted, Weights: []float64{1}}, trendy, almanac.ErrLength},
		{"negative weight", almanac.Combination{Members: two, Rule: almanac.CombineWeighted, Weights: []float64{1, -1}}, trendy, almanac.ErrInvalid},
		{"NaN weight", almanac.Combination{Members: two, Rule: almanac.CombineWeighted, Weights: []float64{1, math.NaN()}}, trendy, almanac.ErrInvalid},
		{"Inf weight", almanac.Combination{Members: two, Rule: almanac.CombineWeighted, Weights: []float64{1, math.Inf(1)}}, trendy, almanac.ErrInvalid},
		{"zero weights", almanac.Combination{Members: two, Rule: almanac.CombineWeighted, Weights: []float64{0, 0}}, trendy, almanac.ErrInvalid},
		{"overflowing weights", almanac.Combination{Members: two, Rule: almanac.CombineWeighted, Weights: []float64{math.MaxFloat64, math.MaxFloat64}}, trendy, almanac.ErrInvalid},
		{"negative paths", almanac.Combination{Members: two, Paths: -1}, trendy, almanac.ErrInvalid},
		{"negative origins", almanac.Combination{Members: two, Origins: -1}, trendy, almanac.ErrInvalid},
		{"negative horizon", almanac.Combination{Members: two, Horizon: -1}, trendy, almanac.ErrInvalid},
		{"empty series", almanac.Combination{Members: two}, almanac.Series{Start: jan2020, Freq: calendar.Monthly}, almanac.ErrEmpty},
		{"infinite value", almanac.Combination{Members: two}, almanac.Series{Start: jan2020, Freq: calendar.Monthly, Values: []float64{1, math.Inf(1), 3}}, almanac.ErrNonFinite},
		{"all missing", almanac.Combination{Members: two}, almanac.Series{Start: jan2020, Freq: calendar.Monthly, Values: []float64{math.NaN(), math.NaN()}}, almanac.ErrAllMissing},
		{"no frequency", almanac.Combination{Members: two}, almanac.Series{Start: jan2020, Values: []float64{1, 2, 3}}, almanac.ErrFrequency},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			fit, err := tc.spec.Fit(ctx, tc.y)
			if !errors.Is(err, tc.want) || fit != nil {
				t.Errorf("got %v, %v; want an error wrapping %v", fit, err, tc.want)
			}
		})
	}
	fit, err := almanac.Combination{Members: two}.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		h      int
		levels []float64
		want   error
	}{
		{"horizon 0", 0, nil, almanac.ErrHorizon},
		{"horizon too long", almanac.MaxHorizon + 1, nil, almanac.ErrHorizon},
		{"level 100", 3, []float64{100}, almanac.ErrLevel},
		{"level NaN", 3, []float64{math.NaN()}, almanac.ErrLevel},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := fit.Forecast(tc.h, tc.levels...); !errors.Is(err, tc.want) {
				t.Errorf("got %v, want %v", err, tc.want)
			}
		})
	}
	sim := fit.(almanac.Simulator)
	if _, err := sim.Simulate(3, 0, rand.NewPCG(1, 1)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("0 paths: %v", err)
	}
	if _, err := sim.Simulate(3, 5, nil); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("nil source: %v", err)
	}
}

// Values near the float64 limit: a finite result or an error wrapping a
// sentinel, never NaN or ±Inf with a nil error.
func TestCombinationExtremeValues(t *testing.T) {
	ctx := context.Background()
	for _, v := range [][]float64{
		{1e308, 1.5e308, 1.7e308, 1e308, 1.2e308, 1.6e308},
		{-1e308, 1e308, -1e308, 1e308, -1e308, 1e308},
		{1e-300, 2e-300, 1e-300, 3e-300, 2e-300, 1e-300},
	} {
		y := almanac.Series{Start: jan2020, Freq: calendar.Quarterly, Values: v}
		for _, rule := range []almanac.CombineRule{almanac.CombineMean, almanac.CombineMedian, almanac.CombineInverseError} {
			spec := almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Mean{}}, Rule: rule}
			fit, err := spec.Fit(ctx, y)
			if err != nil {
				if !isSentinel(err) {
					t.Errorf("%v %v: error %v wraps no sentinel", v[:2], rule, err)
				}
				continue
			}
			fc, err := fit.Forecast(4, 80, 95)
			if err != nil {
				if !isSentinel(err) {
					t.Errorf("%v %v: error %v wraps no sentinel", v[:2], rule, err)
				}
				continue
			}
			for _, x := range append(slices.Clone(fc.Mean), slices.Concat(fc.Intervals[0].Lower, fc.Intervals[1].Upper)...) {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Errorf("%v %v: non-finite forecast without an error: %v %v", v[:2], rule, fc.Mean, fc.Intervals)
					break
				}
			}
		}
	}
}

func isSentinel(err error) bool {
	for _, s := range []error{almanac.ErrNonFinite, almanac.ErrNotFitted, almanac.ErrNoDistribution, almanac.ErrTooShort, almanac.ErrInvalid} {
		if errors.Is(err, s) {
			return true
		}
	}
	return false
}

func TestCombinationInverseErrorWeights(t *testing.T) {
	ctx := context.Background()
	// A steady trend: the drift method forecasts it far better than the
	// mean, so it must get most of the weight.
	v := make([]float64, 40)
	for i := range v {
		v[i] = 50 + 3*float64(i) + math.Sin(float64(i))
	}
	y := almanac.Series{Start: jan2020, Freq: calendar.Yearly, Values: v}
	fit, err := almanac.Combination{Members: []almanac.Model{almanac.Mean{}, almanac.Drift{}}, Rule: almanac.CombineInverseError}.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	cf := fit.(*almanac.CombinationFit)
	ms := cf.Members()
	if ms[1].Weight < 0.95 || math.Abs(ms[0].Weight+ms[1].Weight-1) > 1e-15 {
		t.Errorf("weights %v, %v: want drift near 1, sum 1", ms[0].Weight, ms[1].Weight)
	}
	if !(ms[0].MSE > ms[1].MSE) || math.Abs(ms[0].Weight/ms[1].Weight-ms[1].MSE/ms[0].MSE) > 1e-12 {
		t.Errorf("weights %v not inverse to the errors %v", ms, []float64{ms[0].MSE, ms[1].MSE})
	}
	if got := cf.Weighting(); got != "inverse mean squared error over 3 origins of 6 steps" {
		t.Errorf("Weighting %q", got)
	}
	if !strings.HasPrefix(cf.String(), "inverse-error(0.0") {
		t.Errorf("String %q", cf)
	}

	t.Run("too short: equal weights", func(t *testing.T) {
		short := almanac.Series{Start: jan2020, Freq: calendar.Yearly, Values: v[:3]}
		fit, err := almanac.Combination{Members: []almanac.Model{almanac.Mean{}, almanac.Drift{}}, Rule: almanac.CombineInverseError}.Fit(ctx, short)
		if err != nil {
			t.Fatal(err)
		}
		cf := fit.(*almanac.CombinationFit)
		if ms := cf.Members(); ms[0].Weight != 0.5 || !math.IsNaN(ms[0].MSE) || !strings.HasPrefix(cf.Weighting(), "equal weights: ") {
			t.Errorf("members %+v, weighting %q", ms, cf.Weighting())
		}
	})
	t.Run("a member that completes no origin: equal weights", func(t *testing.T) {
		// Drift needs three observed values; the early windows have them
		// but a member that needs 38 observations completes no origin.
		needy := needs{n: 38}
		fit, err := almanac.Combination{Members: []almanac.Model{almanac.Drift{}, needy}, Rule: almanac.CombineInverseError}.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		cf := fit.(*almanac.CombinationFit)
		if !strings.Contains(cf.Weighting(), "no origin") {
			t.Errorf("weighting %q", cf.Weighting())
		}
	})
}

// needs is Naive that refuses series shorter than n.
type needs struct{ n int }

func (m needs) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if y.Len() < m.n {
		return nil, fmt.Errorf("needs: %w", almanac.ErrTooShort)
	}
	return almanac.Naive{}.Fit(ctx, y)
}

// The combined paths give the horizon total a distribution. Naive and
// Drift consume their random numbers alike, so with common random numbers
// their paths move together, and the total of their mean has the mean of
// their totals' quantiles (comonotone members, quantile averaging).
func TestCombinationHorizonTotal(t *testing.T) {
	ctx := context.Background()
	members := []almanac.Model{almanac.Naive{}, almanac.Drift{}}
	fit, err := almanac.Combination{Members: members, Paths: 4000, Seed: 8}.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := fit.Forecast(12, 80)
	if err != nil {
		t.Fatal(err)
	}
	paths := fc.SamplePaths()
	if len(paths) != 4000 {
		t.Fatalf("%d combined paths", len(paths))
	}
	band := func(paths [][]float64) (lo, hi float64) {
		tot := make([]float64, len(paths))
		for i, p := range paths {
			for _, v := range p {
				tot[i] += v
			}
		}
		slices.Sort(tot)
		return tot[len(tot)/10], tot[len(tot)*9/10]
	}
	lo, hi := band(paths)
	var wlo, whi float64
	for _, m := range members {
		f, err := m.Fit(ctx, trendy)
		if err != nil {
			t.Fatal(err)
		}
		p, err := f.(almanac.Simulator).Simulate(12, 4000, rand.NewPCG(5, 6))
		if err != nil {
			t.Fatal(err)
		}
		l, h := band(p)
		wlo += l / 2
		whi += h / 2
	}
	// Monte Carlo error of a 10% quantile of 4000 draws: about 3% of the
	// band's half-width.
	tol := 0.05 * (whi - wlo)
	if math.Abs(lo-wlo) > tol || math.Abs(hi-whi) > tol {
		t.Errorf("total's 80%% band [%v, %v], want about [%v, %v]", lo, hi, wlo, whi)
	}
}

// BenchmarkCombination measures fitting three benchmark members and
// forecasting 12 steps with two bands: the cost beyond the members' own
// is the combined sample paths (Paths per member) and their coupling.
func BenchmarkCombination(b *testing.B) {
	members := []almanac.Model{almanac.Naive{}, almanac.Drift{}, almanac.SeasonalNaive{}}
	for _, tc := range []struct {
		name string
		spec almanac.Combination
	}{
		{"mean/paths=1000", almanac.Combination{Members: members}},
		{"mean/paths=200", almanac.Combination{Members: members, Paths: 200}},
		{"inverse-error/paths=1000", almanac.Combination{Members: members, Rule: almanac.CombineInverseError}},
	} {
		b.Run(tc.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				f, err := tc.spec.Fit(context.Background(), trendy)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := f.Forecast(12, 80, 95); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func TestCombinationUpdate(t *testing.T) {
	ctx := context.Background()
	short := trendy.Head(40)
	spec := almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Drift{}, needs{n: 44}}, Rule: almanac.CombineInverseError}
	fit, err := spec.Fit(ctx, short)
	if err != nil {
		t.Fatal(err)
	}
	cf := fit.(*almanac.CombinationFit)
	if len(cf.Failures()) != 1 {
		t.Fatalf("failures %v", cf.Failures())
	}
	// Refitting every member (extend never succeeds) on the longer series
	// keeps the weights; the member that could not fit at 40 stays out.
	var seen []string
	up, err := cf.Update(ctx, trendy, func(m almanac.Fitted) (almanac.Fitted, bool) {
		seen = append(seen, m.String())
		return nil, false
	})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(seen, []string{"Naive", "Drift"}) {
		t.Errorf("extend saw %v", seen)
	}
	direct, err := almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Drift{}}, Rule: almanac.CombineWeighted,
		Weights: []float64{cf.Members()[0].Weight, cf.Members()[1].Weight}}.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := up.Forecast(6, 80)
	b, _ := direct.Forecast(6, 80)
	for s := range 6 {
		if math.Abs(a.Mean[s]-b.Mean[s]) > 1e-9 {
			t.Errorf("step %d: updated %v, refitted with the same weights %v", s+1, a.Mean[s], b.Mean[s])
		}
	}
	if !equalNaN(up.FittedValues(), direct.FittedValues()) || len(up.Failures()) != 1 || up.Weighting() != cf.Weighting() {
		t.Error("fitted values, failures or weighting differ")
	}
	// An extend that succeeds is used as is.
	naive48, _ := almanac.Naive{}.Fit(ctx, trendy)
	up2, err := cf.Update(ctx, trendy, func(m almanac.Fitted) (almanac.Fitted, bool) {
		if m.String() == "Naive" {
			return naive48, true
		}
		return nil, false
	})
	if err != nil || up2.Members()[0].Fitted != naive48 {
		t.Errorf("extended member not used: %v", err)
	}
	for _, tc := range []struct {
		name string
		y    almanac.Series
		want error
	}{
		{"shorter", trendy.Head(30), almanac.ErrInvalid},
		{"other frequency", almanac.Series{Start: jan2020, Freq: calendar.Quarterly, Values: trendy.Values}, almanac.ErrInvalid},
		{"infinite", almanac.Series{Start: jan2020, Freq: calendar.Monthly, Values: append(slices.Clone(trendy.Values), math.Inf(1))}, almanac.ErrNonFinite},
	} {
		if _, err := cf.Update(ctx, tc.y, nil); !errors.Is(err, tc.want) {
			t.Errorf("%s: %v, want %v", tc.name, err, tc.want)
		}
	}
}

// ForecastQuantiles gives the comonotone margins without paths: for the
// mean of two members with normal bands, the mean of their bounds
// (quantile averaging, Lichtendahl, Grushka-Cockayne & Winkler 2013); the
// path-based bands agree within Monte Carlo error.
func TestCombinationForecastQuantiles(t *testing.T) {
	ctx := context.Background()
	fit, err := almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Drift{}}, Paths: 4000}.Fit(ctx, trendy)
	if err != nil {
		t.Fatal(err)
	}
	q, err := fit.(*almanac.CombinationFit).ForecastQuantiles(6, 80)
	if err != nil {
		t.Fatal(err)
	}
	if q.SamplePaths() != nil {
		t.Error("paths drawn")
	}
	var want [2][]float64
	for k, m := range []almanac.Model{almanac.Naive{}, almanac.Drift{}} {
		f, _ := m.Fit(ctx, trendy)
		fc, _ := f.Forecast(6, 80)
		want[k] = fc.Intervals[0].Upper
	}
	p, err := fit.Forecast(6, 80)
	if err != nil {
		t.Fatal(err)
	}
	for s := range 6 {
		w := (want[0][s] + want[1][s]) / 2
		if math.Abs(q.Intervals[0].Upper[s]-w) > 1e-9 {
			t.Errorf("step %d: upper %v, want %v", s+1, q.Intervals[0].Upper[s], w)
		}
		// Paths: the benchmarks' paths leave out the 1/T term of the
		// closed form (Drift's up to 12% here), plus Monte Carlo error.
		hw := (w - q.Mean[s])
		if math.Abs(p.Intervals[0].Upper[s]-w) > 0.15*hw {
			t.Errorf("step %d: path-based upper %v, quantile-based %v", s+1, p.Intervals[0].Upper[s], w)
		}
	}
}

// panicky is a member whose methods all panic through a nil pointer.
type panicky struct{ p *int }

func (m *panicky) String() string { return fmt.Sprint(*m.p) }

func (m *panicky) Fit(context.Context, almanac.Series) (almanac.Fitted, error) {
	return nil, fmt.Errorf("%d", *m.p)
}

func TestCombinationNilPointerMember(t *testing.T) {
	var nilMember *panicky
	fit, err := almanac.Combination{Members: []almanac.Model{nilMember, almanac.Naive{}}}.Fit(context.Background(), trendy)
	if err != nil {
		t.Fatal(err)
	}
	fs := fit.(*almanac.CombinationFit).Failures()
	if len(fs) != 1 || fs[0].Model != "almanac_test.panicky" || !errors.Is(fs[0].Err, almanac.ErrNotFitted) {
		t.Errorf("failures %+v", fs)
	}
}
