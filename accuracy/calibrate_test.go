package accuracy_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

// narrowNaive is the naive method with bands too narrow by the factor
// Shrink (its normal standard deviation is σ̂√h·Shrink): a model whose
// own bands are wrong in a known way, for the calibration to correct.
type narrowNaive struct{ Shrink float64 }

type narrowFit struct {
	almanac.Fitted
	shrink float64
}

func (m narrowNaive) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	f, err := almanac.Naive{}.Fit(ctx, y)
	if err != nil {
		return nil, err
	}
	return narrowFit{f, m.Shrink}, nil
}

func (f narrowFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	fc, err := f.Fitted.Forecast(h)
	if err != nil {
		return fc, err
	}
	d := fc.Dist.(*almanac.Normal)
	sd := make([]float64, h)
	for i := range sd {
		sd[i] = d.SD[i] * f.shrink
	}
	return almanac.NewForecast(fc.Start, fc.Freq, fc.Mean, &almanac.Normal{Mean: fc.Mean, SD: sd}, levels...)
}

// walks simulates k random walks of n + h values with Student-t
// innovations of 4 degrees of freedom (heavy tails: the normal bands of
// the naive method are wrong in the tails too), split into n training
// values and h held out.
func walks(seed uint64, k, n, h int) (train []almanac.Series, test [][]float64) {
	rng := rand.New(rand.NewPCG(seed, 7))
	student := func() float64 {
		chi := 0.0
		for range 4 {
			z := rng.NormFloat64()
			chi += z * z
		}
		return rng.NormFloat64() / math.Sqrt(chi/4)
	}
	for i := range k {
		v := make([]float64, n+h)
		x := 100.0
		for t := range v {
			x += student()
			v[t] = x
		}
		train = append(train, almanac.Series{Key: fmt.Sprint("walk ", i), Start: time.Date(1900, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: v[:n]})
		test = append(test, v[n:])
	}
	return train, test
}

// coverage fits spec to every training series (pooling the errors), then
// returns, per level, the share of held-out values inside the band, and
// the share of held-out totals inside the band of the total from the
// forecast's sample paths (NaN without paths).
func coverage(t *testing.T, spec almanac.Model, train []almanac.Series, test [][]float64, levels ...float64) (step, total []float64) {
	t.Helper()
	res, err := almanac.BatchFit(context.Background(), spec, train, almanac.BatchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if res, err = accuracy.PoolCalibration(res, accuracy.PoolOptions{}); err != nil {
		t.Fatal(err)
	}
	in, tin := make([]int, len(levels)), make([]int, len(levels))
	cells, withPaths := 0, 0
	for i, r := range res {
		if r.Err != nil {
			t.Fatal(r.Err)
		}
		fc, err := r.Fitted.Forecast(len(test[i]), levels...)
		if err != nil {
			t.Fatal(err)
		}
		act := 0.0
		for s, a := range test[i] {
			cells++
			act += a
			for k, iv := range fc.Intervals {
				if a >= iv.Lower[s] && a <= iv.Upper[s] {
					in[k]++
				}
			}
		}
		paths := fc.SamplePaths()
		if paths == nil {
			continue // the model's own bands: no totals
		}
		withPaths++
		tots := make([]float64, len(paths))
		for j, p := range paths {
			for _, v := range p {
				tots[j] += v
			}
		}
		tf := almanac.Forecast{Mean: []float64{0}, Dist: &almanac.Sample{Paths: columns(tots)}}
		for k, l := range levels {
			lo, hi, err := tf.Bounds(l)
			if err != nil {
				t.Fatal(err)
			}
			if act >= lo[0] && act <= hi[0] {
				tin[k]++
			}
		}
	}
	for k := range levels {
		step = append(step, float64(in[k])/float64(cells))
		total = append(total, float64(tin[k])/float64(withPaths))
	}
	return step, total
}

// columns turns values into one-step paths.
func columns(v []float64) [][]float64 {
	out := make([][]float64, len(v))
	for i, x := range v {
		out[i] = []float64{x}
	}
	return out
}

// TestCalibrationConverges: a model whose bands are half as wide as they
// should be, on random walks with heavy-tailed innovations. Its own 80%
// bands hold about 50% of the outcomes; calibrated with errors pooled over
// 400 series the per-step and total bands hold the nominal share within
// sampling error (the data are simulated, the expectation is the
// definition of coverage); with a pool of 8 series the result is further
// off on average over replications.
func TestCalibrationConverges(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation of 400 series")
	}
	const h, n = 6, 40
	model := narrowNaive{Shrink: 0.5}
	// 500 paths per forecast, drawn from the 2800 pooled trajectories.
	spec := accuracy.Calibrated{Model: model, Horizon: h, Paths: 500}
	train, test := walks(1, 400, n, h)
	raw, _ := coverage(t, accuracy.Calibrated{Model: model, Horizon: h, Pooling: accuracy.PoolNever, MinErrors: 1000}, train, test, 80)
	if raw[0] > 0.62 {
		t.Fatalf("the narrow model's own bands hold %.3f; the test needs them far too narrow", raw[0])
	}
	levels := []float64{80, 95}
	step, total := coverage(t, spec, train, test, levels...)
	for k, level := range levels {
		p := level / 100
		// 400 series: the binomial standard error of a share of the
		// totals is √(p(1−p)/400); the steps of one series are
		// correlated, so the same bound is used for them.
		se := math.Sqrt(p * (1 - p) / 400)
		if math.Abs(step[k]-p) > 3*se || math.Abs(total[k]-p) > 3*se {
			t.Errorf("%v%%: steps %.3f, totals %.3f, want %.2f ± %.3f", level, step[k], total[k], p, 3*se)
		}
	}
	// Small pools: the mean absolute miss over replications is larger.
	var small float64
	for r := range 8 {
		tr, te := walks(uint64(100+r), 8, n, h)
		st, _ := coverage(t, accuracy.Calibrated{Model: model, Horizon: h, MinErrors: 1}, tr, te, 80)
		small += math.Abs(st[0]-0.8) / 8
	}
	if !(math.Abs(step[0]-0.8) < small) {
		t.Errorf("400-series pool misses by %.3f, 8-series pools by %.3f on average", math.Abs(step[0]-0.8), small)
	}
}

// TestCalibrationByHand: with the naive scale, the trajectories are the
// errors of the naive method at each origin divided by the training
// window's naive scale, worked out directly; and the paths are the final
// forecast plus the final scale times each trajectory.
func TestCalibrationByHand(t *testing.T) {
	y := lhSeries(t) // 48 values
	spec := accuracy.Calibrated{Model: almanac.Naive{}, Horizon: 3, Origins: 5, Scale: accuracy.ScaleByNaive, MinErrors: 5}
	fit, err := spec.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	cf := fit.(*accuracy.CalibratedFit)
	st := cf.Status()
	if st.Origins != 5 || st.Own != 5 || st.Failed != 0 || st.Horizon != 3 || st.Source != accuracy.BandsFromOwnErrors || st.Scale != accuracy.ScaleByNaive {
		t.Fatalf("status %+v", st)
	}
	z := cf.Trajectories()
	for k, o := range []int{41, 42, 43, 44, 45} {
		sc, _, err := accuracy.NaiveScale(y.Values[:o], 1)
		if err != nil {
			t.Fatal(err)
		}
		for s := range 3 {
			want := (y.Values[o+s] - y.Values[o-1]) / sc
			if math.Abs(z[k][s]-want) > 1e-12 {
				t.Errorf("origin %d step %d: %v, want %v", o, s+1, z[k][s], want)
			}
		}
	}
	fc, err := fit.Forecast(4, 80)
	if err != nil {
		t.Fatal(err)
	}
	sc, _, _ := accuracy.NaiveScale(y.Values, 1)
	last := y.Values[47]
	paths := fc.SamplePaths()
	if len(paths) != 5 {
		t.Fatalf("%d paths, want one per trajectory", len(paths))
	}
	for k, p := range paths {
		for s := range 4 {
			want := last + sc*z[k][min(s, 2)] // step 4 reuses step 3
			if math.Abs(p[s]-want) > 1e-12 {
				t.Errorf("path %d step %d: %v, want %v", k, s+1, p[s], want)
			}
		}
		if fc.Mean[0] != last {
			t.Errorf("point forecast %v, want the naive %v", fc.Mean[0], last)
		}
	}
	if cf.String() != "calibrated(Naive)" {
		t.Errorf("String %q", cf)
	}
}

// TestCalibrationSpreadScale: with the model's spread, each error is
// divided by the half-width of the model's 80% band at that origin and
// step, Φ⁻¹(0.9)·σ̂√h for the naive method (common value of the normal
// quantile).
func TestCalibrationSpreadScale(t *testing.T) {
	y := lhSeries(t)
	fit, err := accuracy.Calibrated{Model: almanac.Naive{}, Horizon: 2, Origins: 3, MinErrors: 3}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	z := fit.(*accuracy.CalibratedFit).Trajectories()
	for k, o := range []int{44, 45, 46} {
		nf, _ := almanac.Naive{}.Fit(context.Background(), y.Head(o))
		fc, _ := nf.Forecast(2)
		sd := fc.Dist.(*almanac.Normal).SD
		for s := range 2 {
			want := (y.Values[o+s] - y.Values[o-1]) / (1.2815515655446004 * sd[s])
			if math.Abs(z[k][s]-want) > 1e-9 {
				t.Errorf("origin %d step %d: %v, want %v", o, s+1, z[k][s], want)
			}
		}
	}
}

// TestCalibrationRollForward: exponential smoothing is estimated once at
// the first origin and updated through the others (smoothing.Fitted.Update),
// ARIMA held at its coefficients, and RefitEach re-estimates everywhere.
func TestCalibrationRollForward(t *testing.T) {
	y := airPassengers(t)
	ets := smoothing.Spec{Error: smoothing.AdditiveError, Trend: smoothing.DampedTrend, Season: smoothing.NoSeason}
	ar := arima.Spec{P: 1, D: 1}
	for _, tc := range []struct {
		name   string
		spec   accuracy.Calibrated
		rolled int
	}{
		{"ets rolled", accuracy.Calibrated{Model: ets, Horizon: 6, Origins: 10}, 9},
		{"arima rolled", accuracy.Calibrated{Model: ar, Horizon: 6, Origins: 10}, 9},
		{"arima search rolled", accuracy.Calibrated{Model: arima.Search{}, Horizon: 6, Origins: 4}, 3},
		{"combination rolled", accuracy.Calibrated{Model: almanac.Combination{Members: []almanac.Model{ets, ar, almanac.Naive{}}}, Horizon: 6, Origins: 4}, 3},
		{"refit each", accuracy.Calibrated{Model: ets, Horizon: 6, Origins: 10, Refit: accuracy.RefitEach}, 0},
		{"benchmark refitted", accuracy.Calibrated{Model: almanac.Drift{}, Horizon: 6, Origins: 10}, 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			fit, err := tc.spec.Fit(context.Background(), y)
			if err != nil {
				t.Fatal(err)
			}
			st := fit.(*accuracy.CalibratedFit).Status()
			if st.Rolled != tc.rolled || st.Failed != 0 || st.Own != st.Origins {
				t.Errorf("status %+v, want %d rolled", st, tc.rolled)
			}
		})
	}
	// The rolled ETS errors are those of the model estimated at the first
	// origin and updated, by hand.
	first, err := ets.Fit(context.Background(), y.Head(144-6-2))
	if err != nil {
		t.Fatal(err)
	}
	fit, err := accuracy.Calibrated{Model: ets, Horizon: 6, Origins: 3, Scale: accuracy.ScaleByNaive, MinErrors: 1}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	z := fit.(*accuracy.CalibratedFit).Trajectories()
	u, err := first.(*smoothing.Fitted).Update(y.Values[136:138])
	if err != nil {
		t.Fatal(err)
	}
	fc, _ := u.Forecast(6)
	sc, _, _ := accuracy.NaiveScale(y.Values[:138], 12)
	for s := range 6 {
		if want := (y.Values[138+s] - fc.Mean[s]) / sc; math.Abs(z[2][s]-want) > 1e-9 {
			t.Errorf("step %d: %v, want %v", s+1, z[2][s], want)
		}
	}
}

func TestPoolCalibration(t *testing.T) {
	ctx := context.Background()
	train, _ := walks(3, 6, 30, 4)
	short := train[0].Head(12) // one origin (8 + 4 observations): too few of its own
	short.Key = "short"
	ys := append(slices.Clone(train), short)
	spec := accuracy.Calibrated{Model: almanac.Naive{}, Horizon: 4, Origins: 10, MinTrain: 8, MinErrors: 10, Pooling: accuracy.PoolWhenFew}
	res, err := almanac.BatchFit(ctx, spec, ys, almanac.BatchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// A failed result and one from another model pass through.
	res = append(res, almanac.BatchResult{Key: "failed", Err: almanac.ErrTooShort})
	other, _ := almanac.Naive{}.Fit(ctx, train[0])
	res = append(res, almanac.BatchResult{Key: "plain", Fitted: other})
	for i := range 6 {
		if st := res[i].Fitted.(*accuracy.CalibratedFit).Status(); st.Own != 10 || st.Source != accuracy.BandsFromOwnErrors {
			t.Fatalf("series %d before pooling: %+v", i, st)
		}
	}
	if st := res[6].Fitted.(*accuracy.CalibratedFit).Status(); st.Own != 1 || st.Horizon != 4 || st.Source != accuracy.BandsFromModel {
		t.Fatalf("short series before pooling: %+v", st)
	}
	pooled, err := accuracy.PoolCalibration(res, accuracy.PoolOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i := range 7 {
		st := pooled[i].Fitted.(*accuracy.CalibratedFit).Status()
		want := accuracy.BandsFromOwnErrors // 10 of its own: enough
		if i == 6 {
			want = accuracy.BandsFromPooledErrors
		}
		if st.Pooled != 61 || st.Source != want {
			t.Errorf("series %d: %+v, want a pool of 61 and %v", i, st, want)
		}
	}
	if pooled[7].Err == nil || pooled[8].Fitted != other {
		t.Error("results that are not calibrated fits were changed")
	}
	// The inputs are unchanged (fitted models are read-only).
	if st := res[6].Fitted.(*accuracy.CalibratedFit).Status(); st.Pooled != 0 {
		t.Error("PoolCalibration changed its input")
	}
	// The short series' paths are the pool's trajectories on its own
	// point and scale: as many paths as trajectories.
	fc, err := pooled[6].Fitted.Forecast(4, 80)
	if err != nil {
		t.Fatal(err)
	}
	if len(fc.SamplePaths()) != 61 {
		t.Errorf("%d paths, want 61", len(fc.SamplePaths()))
	}
	// Groups keep pools apart.
	groups := []string{"a", "a", "a", "b", "b", "b", "a", "a", "a"}
	byGroup, err := accuracy.PoolCalibration(res, accuracy.PoolOptions{Groups: groups})
	if err != nil {
		t.Fatal(err)
	}
	if a, b := byGroup[0].Fitted.(*accuracy.CalibratedFit).Status().Pooled, byGroup[3].Fitted.(*accuracy.CalibratedFit).Status().Pooled; a != 31 || b != 30 {
		t.Errorf("pools of %d and %d, want 31 and 30", a, b)
	}
	if _, err := accuracy.PoolCalibration(res, accuracy.PoolOptions{Groups: groups[:2]}); !errors.Is(err, almanac.ErrLength) {
		t.Errorf("mismatched groups: %v", err)
	}
	// Pooling rules.
	for _, tc := range []struct {
		rule accuracy.PoolRule
		want accuracy.BandSource
	}{{accuracy.PoolAlways, accuracy.BandsFromPooledErrors}, {accuracy.PoolNever, accuracy.BandsFromOwnErrors}} {
		s := spec
		s.Pooling = tc.rule
		f, err := s.Fit(ctx, train[1])
		if err != nil {
			t.Fatal(err)
		}
		p, _ := accuracy.PoolCalibration([]almanac.BatchResult{{Fitted: f}, res[0]}, accuracy.PoolOptions{})
		if got := p[0].Fitted.(*accuracy.CalibratedFit).Status().Source; got != tc.want {
			t.Errorf("%v: bands from %v, want %v", tc.rule, got, tc.want)
		}
	}
}

func TestCalibrationFallbackAndStrict(t *testing.T) {
	ctx := context.Background()
	y := lhSeries(t).Head(12)
	spec := accuracy.Calibrated{Model: almanac.Naive{}, Horizon: 3}
	fit, err := spec.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	cf := fit.(*accuracy.CalibratedFit)
	if st := cf.Status(); st.Source != accuracy.BandsFromModel || st.Own != 1 {
		t.Fatalf("status %+v: want model bands, with 1 own trajectory (origin 9 = ⌈0.7·12⌉)", st)
	}
	got, err := fit.Forecast(3, 80)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := cf.Inner().Forecast(3, 80)
	if !slices.Equal(got.Intervals[0].Upper, want.Intervals[0].Upper) {
		t.Error("the fallback is not the model's own bands")
	}
	spec.Strict = true
	strict, err := spec.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := strict.Forecast(3, 80); !errors.Is(err, accuracy.ErrUncalibrated) {
		t.Errorf("strict forecast: %v", err)
	}
	if _, err := strict.(almanac.Simulator).Simulate(3, 10, rand.NewPCG(1, 1)); !errors.Is(err, accuracy.ErrUncalibrated) {
		t.Errorf("strict simulate: %v", err)
	}
	// A series too short for any origin still fits.
	tiny, err := spec.Fit(ctx, y.Head(5))
	if err != nil {
		t.Fatal(err)
	}
	if st := tiny.(*accuracy.CalibratedFit).Status(); st.Origins != 0 || st.Own != 0 {
		t.Errorf("tiny series: %+v", st)
	}
}

func TestCalibrationBadInput(t *testing.T) {
	ctx := context.Background()
	y := lhSeries(t)
	cases := []struct {
		name string
		spec accuracy.Calibrated
		y    almanac.Series
		want error
	}{
		{"no model", accuracy.Calibrated{}, y, almanac.ErrInvalid},
		{"negative horizon", accuracy.Calibrated{Model: almanac.Naive{}, Horizon: -1}, y, almanac.ErrInvalid},
		{"negative origins", accuracy.Calibrated{Model: almanac.Naive{}, Origins: -1}, y, almanac.ErrInvalid},
		{"negative training", accuracy.Calibrated{Model: almanac.Naive{}, MinTrain: -1}, y, almanac.ErrInvalid},
		{"negative minimum", accuracy.Calibrated{Model: almanac.Naive{}, MinErrors: -1}, y, almanac.ErrInvalid},
		{"negative paths", accuracy.Calibrated{Model: almanac.Naive{}, Paths: -1}, y, almanac.ErrInvalid},
		{"unknown refit", accuracy.Calibrated{Model: almanac.Naive{}, Refit: 9}, y, almanac.ErrInvalid},
		{"unknown scale", accuracy.Calibrated{Model: almanac.Naive{}, Scale: 9}, y, almanac.ErrInvalid},
		{"unknown pooling", accuracy.Calibrated{Model: almanac.Naive{}, Pooling: 9}, y, almanac.ErrInvalid},
		{"empty", accuracy.Calibrated{Model: almanac.Naive{}}, almanac.Series{Freq: calendar.Yearly}, almanac.ErrEmpty},
		{"infinite", accuracy.Calibrated{Model: almanac.Naive{}}, almanac.Series{Freq: calendar.Yearly, Values: []float64{1, math.Inf(1)}}, almanac.ErrNonFinite},
		{"model fails", accuracy.Calibrated{Model: almanac.Drift{}}, almanac.Series{Freq: calendar.Yearly, Values: []float64{1, 2}}, almanac.ErrTooShort},
		{"model panics", accuracy.Calibrated{Model: keyTrouble{key: "lh", from: 1, panics: true}}, y, almanac.ErrNotFitted},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if f, err := tc.spec.Fit(ctx, tc.y); !errors.Is(err, tc.want) || f != nil {
				t.Errorf("got %v, %v; want an error wrapping %v", f, err, tc.want)
			}
		})
	}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := (accuracy.Calibrated{Model: windowRecorderless{}}).Fit(cancelled, y); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
	fit, err := accuracy.Calibrated{Model: almanac.Naive{}, MinErrors: 5}.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		h      int
		levels []float64
		want   error
	}{{0, nil, almanac.ErrHorizon}, {3, []float64{0}, almanac.ErrLevel}} {
		if _, err := fit.Forecast(tc.h, tc.levels...); !errors.Is(err, tc.want) {
			t.Errorf("Forecast(%d, %v): %v, want %v", tc.h, tc.levels, err, tc.want)
		}
	}
	sim := fit.(almanac.Simulator)
	if _, err := sim.Simulate(3, 0, rand.NewPCG(1, 1)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("0 paths: %v", err)
	}
	if _, err := sim.Simulate(3, 5, nil); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("nil source: %v", err)
	}
}

// windowRecorderless is the naive method that honours a cancelled
// context.
type windowRecorderless struct{}

func (windowRecorderless) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return almanac.Naive{}.Fit(ctx, y)
}

func TestCalibrationDeterministic(t *testing.T) {
	train, _ := walks(5, 12, 40, 6)
	spec := accuracy.Calibrated{Model: narrowNaive{Shrink: 0.7}, Horizon: 6, Pooling: accuracy.PoolAlways, Paths: 50, Seed: 3}
	var ref []almanac.Forecast
	for _, w := range []int{1, 2, 4} {
		res, err := almanac.BatchFit(context.Background(), spec, train, almanac.BatchOptions{Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if res, err = accuracy.PoolCalibration(res, accuracy.PoolOptions{}); err != nil {
			t.Fatal(err)
		}
		var got []almanac.Forecast
		for _, r := range res {
			fc, err := r.Fitted.Forecast(8, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			got = append(got, fc)
		}
		if ref == nil {
			ref = got
			continue
		}
		for i := range got {
			if !slices.EqualFunc(got[i].SamplePaths(), ref[i].SamplePaths(), slices.Equal) || !slices.Equal(got[i].Intervals[1].Lower, ref[i].Intervals[1].Lower) {
				t.Errorf("workers %d, series %d: forecasts differ", w, i)
			}
		}
	}
	// 12 series × up to 20 origins > 50 paths: a seeded subsample.
	if n := len(ref[0].SamplePaths()); n != 50 {
		t.Errorf("%d paths, want 50", n)
	}
	f1, _ := spec.Fit(context.Background(), train[0])
	f2, _ := spec.Fit(context.Background(), train[0])
	a, _ := f1.(almanac.Simulator).Simulate(6, 30, rand.NewPCG(9, 9))
	b, _ := f2.(almanac.Simulator).Simulate(6, 30, rand.NewPCG(9, 9))
	if !slices.EqualFunc(a, b, slices.Equal) {
		t.Error("Simulate is not deterministic")
	}
}

func TestCalibrationNonNegative(t *testing.T) {
	// Invented weekly counts of a slow-moving spare part, often zero.
	v := []float64{0, 2, 0, 0, 1, 0, 3, 0, 0, 0, 1, 0, 0, 2, 0, 0, 0, 1, 0, 0, 4, 0, 0, 1, 0, 0, 0, 2, 0, 1, 0, 0, 0, 0, 2, 0, 1, 0, 0, 3}
	y := almanac.Series{Key: "part", Start: time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Weekly, Values: v}
	spec := accuracy.Calibrated{Model: almanac.Mean{}, Horizon: 4, MinErrors: 5, NonNegative: true}
	fit, err := spec.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := fit.Forecast(6, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	plain, _ := accuracy.Calibrated{Model: almanac.Mean{}, Horizon: 4, MinErrors: 5}.Fit(context.Background(), y)
	pfc, _ := plain.Forecast(6, 95)
	if !slices.ContainsFunc(pfc.Intervals[0].Lower, func(v float64) bool { return v < 0 }) {
		t.Fatal("the test needs bands below zero without the option")
	}
	for _, iv := range fc.Intervals {
		for s := range iv.Lower {
			if iv.Lower[s] < 0 || fc.Mean[s] < 0 {
				t.Errorf("step %d: %v%% lower %v, mean %v", s+1, iv.Level, iv.Lower[s], fc.Mean[s])
			}
		}
	}
	// The upper limits are those of the uncensored distribution.
	if !slices.Equal(fc.Intervals[1].Upper, pfc.Intervals[0].Upper) {
		t.Error("censoring moved the upper limits")
	}
	paths, _ := fit.(almanac.Simulator).Simulate(6, 100, rand.NewPCG(1, 2))
	for _, p := range paths {
		for _, x := range p {
			if x < 0 {
				t.Fatalf("simulated value %v below zero", x)
			}
		}
	}
	// The fallback to the model's own bands is censored too.
	spec.MinErrors = 1000
	fb, err := spec.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	ffc, err := fb.Forecast(6, 95)
	if err != nil {
		t.Fatal(err)
	}
	if fb.(*accuracy.CalibratedFit).Status().Source != accuracy.BandsFromModel || slices.ContainsFunc(ffc.Intervals[0].Lower, func(v float64) bool { return v < 0 }) {
		t.Errorf("fallback bands %v", ffc.Intervals[0].Lower)
	}
}
