package accuracy_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/smoothing"
	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"
)

// airPassengers returns the 144 monthly AirPassengers values (Box, Jenkins
// & Reinsel, Series G; R datasets), read from the dataset block of the
// Box.test fixture so the numbers are not retyped.
func airPassengers(t testing.TB) almanac.Series {
	t.Helper()
	f, err := reftest.Load("testdata/reference/boxtest_airpassengers_log_airline_resid.json")
	if err != nil {
		t.Fatal(err)
	}
	v := f.Floats(t, "dataset.values")
	if len(v) != 144 {
		t.Fatalf("AirPassengers: %d values", len(v))
	}
	return almanac.Series{Key: "AirPassengers", Start: time.Date(1949, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// lhSeries returns R's lh series (48 values, no seasonality) from the acf
// fixture, as a yearly series.
func lhSeries(t testing.TB) almanac.Series {
	t.Helper()
	f, err := reftest.Load("testdata/reference/acf_lh.json")
	if err != nil {
		t.Fatal(err)
	}
	return almanac.Series{Key: "lh", Start: time.Date(1, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: f.Floats(t, "input")}
}

var equateNaN = cmp.Options{cmpopts.EquateNaNs(), cmp.AllowUnexported(), cmp.Comparer(sameError)}

// sameError compares errors by their text (wrapped errors have
// unexported fields cmp cannot read).
func sameError(a, b error) bool {
	if a == nil || b == nil {
		return a == nil && b == nil
	}
	return a.Error() == b.Error()
}

// TestInSampleMASEIsOne: the in-sample MASE of the naive method's own
// one-step fitted values is exactly 1, and that of the seasonal naive
// method with the seasonal scale likewise (Hyndman & Koehler 2006: the
// scale is the in-sample MAE of that very method).
func TestInSampleMASEIsOne(t *testing.T) {
	y := airPassengers(t)
	for _, c := range []struct {
		name  string
		model almanac.Model
		m     int
	}{
		{"naive", almanac.Naive{}, 1},
		{"seasonal naive", almanac.SeasonalNaive{}, 12},
	} {
		t.Run(c.name, func(t *testing.T) {
			fit, err := c.model.Fit(context.Background(), y)
			if err != nil {
				t.Fatal(err)
			}
			got, err := accuracy.MASE(y.Values, fit.FittedValues(), y.Values, c.m)
			if err != nil {
				t.Fatal(err)
			}
			if got != 1 {
				t.Errorf("in-sample MASE = %.17g, want exactly 1", got)
			}
			got, err = accuracy.RMSSE(y.Values, fit.FittedValues(), y.Values, c.m)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Scalar(t, "in-sample RMSSE", got, 1, 0, 1e-15)
		})
	}
}

// TestBacktestByHand lays out a small backtest and recomputes its errors
// and scores with the stand-alone measures.
func TestBacktestByHand(t *testing.T) {
	y := lhSeries(t)
	bt := accuracy.Backtest{Horizon: 3, First: 40, Step: 2, Levels: []float64{80}, Workers: 3}
	c, err := bt.Run(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	// Origins 40, 42, 44 (44 + 3 ≤ 48; 46 + 3 > 48).
	if got := len(c.Origins); got != 3 {
		t.Fatalf("%d origins, want 3", got)
	}
	for k, o := range c.Origins {
		if o.Index != 40+2*k || o.TrainStart != 0 {
			t.Errorf("origin %d = %+v", k, o)
		}
		if !o.Time.Equal(y.Time(o.Index)) {
			t.Errorf("origin %d time %v, want %v", k, o.Time, y.Time(o.Index))
		}
	}
	// Yearly data: period 1, so the only benchmark is the naive method and
	// it is the baseline.
	if len(c.Runs) != 1 || c.Runs[0].Name != accuracy.NaiveName || c.Baseline != accuracy.NaiveName {
		t.Fatalf("runs %v baseline %q", len(c.Runs), c.Baseline)
	}
	r := c.Runs[0]
	var act, fc, scaled []float64
	for k, o := range c.Origins {
		last := y.Values[o.Index-1] // the naive forecast
		scale, _, err := accuracy.NaiveScale(y.Values[:o.Index], 1)
		if err != nil {
			t.Fatal(err)
		}
		for s := range 3 {
			a := y.Values[o.Index+s]
			if r.Forecasts[k].Mean[s] != last {
				t.Errorf("origin %d step %d forecast %v, want %v", k, s, r.Forecasts[k].Mean[s], last)
			}
			if r.Errors[k][s] != a-last {
				t.Errorf("origin %d step %d error %v, want %v", k, s, r.Errors[k][s], a-last)
			}
			act = append(act, a)
			fc = append(fc, last)
			scaled = append(scaled, math.Abs(a-last)/scale)
		}
		if r.Fits[k] != "Naive" {
			t.Errorf("fit %q", r.Fits[k])
		}
	}
	want := map[string]func() (float64, error){
		"MAE":   func() (float64, error) { return accuracy.MAE(act, fc) },
		"RMSE":  func() (float64, error) { return accuracy.RMSE(act, fc) },
		"ME":    func() (float64, error) { return accuracy.ME(act, fc) },
		"MdAE":  func() (float64, error) { return accuracy.MdAE(act, fc) },
		"sMAPE": func() (float64, error) { return accuracy.SMAPE(act, fc) },
		"MAPE":  func() (float64, error) { return accuracy.MAPE(act, fc) },
		"MASE":  func() (float64, error) { return accuracy.MAE(scaled, make([]float64, len(scaled))) },
	}
	got := map[string]float64{
		"MAE": r.Overall.MAE, "RMSE": r.Overall.RMSE, "ME": r.Overall.ME, "MdAE": r.Overall.MdAE,
		"sMAPE": r.Overall.SMAPE, "MAPE": r.Overall.MAPE, "MASE": r.Overall.MASE,
	}
	for name, fn := range want {
		w, err := fn()
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, name, got[name], w, 0, 1e-14)
	}
	if r.Overall.N != 9 {
		t.Errorf("N = %d, want 9", r.Overall.N)
	}
	// Step 2 alone: the three second-step cells.
	w, _ := accuracy.MAE([]float64{act[1], act[4], act[7]}, []float64{fc[1], fc[4], fc[7]})
	numtest.Scalar(t, "step 2 MAE", r.ByStep[1].MAE, w, 0, 1e-15)
	// The baseline's ratios are 1 (or NaN for an undefined measure).
	numtest.Scalar(t, "relative MAE", r.Relative.MAE, 1, 0, 0)
	// Interval scores against the stand-alone functions on the forecasts'
	// own 80% bounds.
	var lo, hi []float64
	for k := range c.Origins {
		lo = append(lo, r.Forecasts[k].Intervals[0].Lower...)
		hi = append(hi, r.Forecasts[k].Intervals[0].Upper...)
	}
	cov, _ := accuracy.Coverage(act, lo, hi)
	is, _ := accuracy.IntervalScore(act, lo, hi, 80)
	iv, ok := r.Overall.Interval(80)
	if !ok {
		t.Fatal("no 80% interval scores")
	}
	numtest.Scalar(t, "coverage", iv.Coverage, cov, 0, 0)
	numtest.Scalar(t, "interval score", iv.Score, is, 0, 1e-14)
	// CRPS from the normal distributions.
	var mu, sd []float64
	for k := range c.Origins {
		d := r.Forecasts[k].Dist.(*almanac.Normal)
		mu = append(mu, d.Mean...)
		sd = append(sd, d.SD...)
	}
	crps, _ := accuracy.CRPSNormal(act, mu, sd)
	numtest.Scalar(t, "CRPS", r.Overall.CRPS, crps, 0, 1e-14)
}

// TestBacktestWorkersIdentical: results are bit-identical whatever the
// number of workers (DESIGN.md, "Numbers").
func TestBacktestWorkersIdentical(t *testing.T) {
	y := airPassengers(t)
	bt := accuracy.Backtest{Horizon: 12, Origins: 12, Levels: []float64{80, 95}}
	models := []accuracy.Candidate{{Name: "drift", Model: almanac.Drift{}}, {Name: "mean", Model: almanac.Mean{}}}
	var ref *accuracy.Comparison
	for _, w := range []int{1, 2, 5, 64} {
		bt.Workers = w
		c, err := bt.Run(context.Background(), y, models...)
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = c
			continue
		}
		if d := cmp.Diff(ref, c, equateNaN); d != "" {
			t.Errorf("workers %d differ from workers 1 (-1 +%d):\n%s", w, w, d)
		}
	}
	if got := []string{ref.Runs[0].Name, ref.Runs[1].Name, ref.Runs[2].Name, ref.Runs[3].Name}; !cmp.Equal(got, []string{"drift", "mean", "naive", "seasonal naive"}) {
		t.Errorf("runs %v", got)
	}
	if ref.Baseline != accuracy.SeasonalNaiveName {
		t.Errorf("baseline %q", ref.Baseline)
	}
}

// TestBatchMatchesSingle: a batch backtest gives each series exactly what
// a single-series backtest gives, and Mean averages them.
func TestBatchMatchesSingle(t *testing.T) {
	a := airPassengers(t)
	b := a.Window(24, 144)
	b.Key = "AirPassengers from 1951"
	bt := accuracy.Backtest{Horizon: 6, Origins: 5, Step: 3, Levels: []float64{90}, Workers: 2}
	m := []accuracy.Candidate{{Name: "drift", Model: almanac.Drift{}}}
	batch, err := bt.RunBatch(context.Background(), []almanac.Series{a, b}, m...)
	if err != nil {
		t.Fatal(err)
	}
	for i, y := range []almanac.Series{a, b} {
		single, err := bt.Run(context.Background(), y, m...)
		if err != nil {
			t.Fatal(err)
		}
		if d := cmp.Diff(single, batch.Series[i], equateNaN); d != "" {
			t.Errorf("series %d: batch differs from single (-single +batch):\n%s", i, d)
		}
	}
	for c, name := range batch.Names {
		x, y := batch.Series[0].Runs[c].Overall, batch.Series[1].Runs[c].Overall
		numtest.Scalar(t, name+" mean MASE", batch.Mean[c].MASE, (x.MASE+y.MASE)/2, 0, 1e-15)
		numtest.Scalar(t, name+" mean coverage", batch.Mean[c].Intervals[0].Coverage, (x.Intervals[0].Coverage+y.Intervals[0].Coverage)/2, 0, 1e-15)
		if batch.Mean[c].N != x.N+y.N {
			t.Errorf("%s: N %d, want %d", name, batch.Mean[c].N, x.N+y.N)
		}
	}
	base := slicesIndex(batch.Names, batch.Baseline)
	numtest.Scalar(t, "baseline relative MASE", batch.Relative[base].MASE, 1, 0, 0)
}

func slicesIndex(xs []string, s string) int {
	for i, x := range xs {
		if x == s {
			return i
		}
	}
	return -1
}

// windowRecorder is a test-only model that records the training windows
// it is given and forecasts the last value with a unit normal.
type windowRecorder struct {
	mu   *sync.Mutex
	seen map[time.Time]int // start of the training window → its length
	// failAt makes Fit fail on the window ending there (0: never).
	failAt int
}

type lastValue struct{ v float64 }

func (w windowRecorder) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	w.mu.Lock()
	defer w.mu.Unlock()
	w.seen[y.Start] = y.Len()
	if w.failAt != 0 && y.Len() >= w.failAt {
		return nil, fmt.Errorf("test model: %w: refusing %d observations", almanac.ErrNotFitted, y.Len())
	}
	return lastValue{y.Values[y.Len()-1]}, nil
}

func (f lastValue) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	mean := make([]float64, h)
	sd := make([]float64, h)
	for i := range mean {
		mean[i], sd[i] = f.v, 1
	}
	return almanac.NewForecast(time.Time{}, calendar.Monthly, mean, &almanac.Normal{Mean: mean, SD: sd}, levels...)
}
func (f lastValue) FittedValues() []float64 { return nil }
func (f lastValue) Residuals() []float64    { return nil }
func (f lastValue) String() string          { return "LastValue" }

func TestBacktestSlidingWindow(t *testing.T) {
	y := airPassengers(t)
	rec := windowRecorder{mu: &sync.Mutex{}, seen: map[time.Time]int{}}
	bt := accuracy.Backtest{Horizon: 4, First: 100, Step: 10, Window: accuracy.Sliding, Length: 36, NoBenchmarks: true}
	c, err := bt.Run(context.Background(), y, accuracy.Candidate{Name: "rec", Model: rec})
	if err != nil {
		t.Fatal(err)
	}
	// Origins 100, 110, ..., 140 (140 + 4 ≤ 144).
	if len(c.Origins) != 5 {
		t.Fatalf("%d origins", len(c.Origins))
	}
	for k, o := range c.Origins {
		if o.Index != 100+10*k || o.TrainStart != o.Index-36 {
			t.Errorf("origin %d: %+v", k, o)
		}
	}
	if len(rec.seen) != 5 {
		t.Errorf("%d fits, want 5", len(rec.seen))
	}
	for _, n := range rec.seen {
		if n != 36 {
			t.Errorf("window of %d observations, want 36", n)
		}
	}
	if c.Baseline != "rec" {
		t.Errorf("baseline %q, want the only model", c.Baseline)
	}
}

func TestBacktestErrors(t *testing.T) {
	y := airPassengers(t)
	ctx := context.Background()
	failing := windowRecorder{mu: &sync.Mutex{}, seen: map[time.Time]int{}, failAt: 1}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	tests := []struct {
		name    string
		bt      accuracy.Backtest
		ctx     context.Context
		y       almanac.Series
		models  []accuracy.Candidate
		wantErr error
		// withResult: the error comes with the comparison of what was
		// done (a cancellation, a candidate that completed no origin).
		withResult bool
	}{
		{"too many origins", accuracy.Backtest{Horizon: 12, Origins: 200}, ctx, y, nil, almanac.ErrTooShort, false},
		{"first too late", accuracy.Backtest{Horizon: 12, First: 140}, ctx, y, nil, almanac.ErrTooShort, false},
		// Options so large that a sum or product of them overflows int
		// once panicked (makeslice) or laid out no origin at all.
		{"huge horizon", accuracy.Backtest{Horizon: math.MaxInt}, ctx, y, nil, almanac.ErrTooShort, false},
		{"huge horizon, first given", accuracy.Backtest{Horizon: math.MaxInt - 10, First: 20}, ctx, y, nil, almanac.ErrTooShort, false},
		{"huge period", accuracy.Backtest{Period: math.MaxInt}, ctx, y, nil, almanac.ErrTooShort, false},
		{"huge first", accuracy.Backtest{First: math.MaxInt}, ctx, y, nil, almanac.ErrTooShort, false},
		{"huge origin count", accuracy.Backtest{Origins: math.MaxInt}, ctx, y, nil, almanac.ErrTooShort, false},
		{"huge step", accuracy.Backtest{Origins: 3, Step: math.MaxInt/2 + 1}, ctx, y, nil, almanac.ErrTooShort, false},
		{"one origin too many at step 5", accuracy.Backtest{Horizon: 12, Step: 5, Origins: 28}, ctx, y, nil, almanac.ErrTooShort, false},
		{"negative step", accuracy.Backtest{Step: -1}, ctx, y, nil, almanac.ErrInvalid, false},
		{"bad level", accuracy.Backtest{Levels: []float64{150}}, ctx, y, nil, almanac.ErrLevel, false},
		{"unknown baseline", accuracy.Backtest{Baseline: "oracle"}, ctx, y, nil, almanac.ErrInvalid, false},
		{"duplicate name", accuracy.Backtest{}, ctx, y, []accuracy.Candidate{{Name: "naive", Model: almanac.Naive{}}}, almanac.ErrInvalid, false},
		{"nil model", accuracy.Backtest{}, ctx, y, []accuracy.Candidate{{Name: "x"}}, almanac.ErrInvalid, false},
		{"nothing to run", accuracy.Backtest{NoBenchmarks: true}, ctx, y, nil, almanac.ErrInvalid, false},
		{"sliding too long", accuracy.Backtest{First: 50, Window: accuracy.Sliding, Length: 60}, ctx, y, nil, almanac.ErrInvalid, false},
		{"bad window kind", accuracy.Backtest{Window: 7}, ctx, y, nil, almanac.ErrInvalid, false},
		{"empty series", accuracy.Backtest{}, ctx, almanac.Series{Freq: calendar.Monthly}, nil, almanac.ErrEmpty, false},
		{"negative path count", accuracy.Backtest{Paths: -1}, ctx, y, nil, almanac.ErrInvalid, false},
		{"model fails at every origin", accuracy.Backtest{Horizon: 6, First: 120, Workers: 4}, ctx, y, []accuracy.Candidate{{Name: "flaky", Model: failing}}, accuracy.ErrBacktest, true},
		{"model fails at every origin, inner sentinel", accuracy.Backtest{Horizon: 6, First: 120, Workers: 4}, ctx, y, []accuracy.Candidate{{Name: "flaky", Model: failing}}, almanac.ErrNotFitted, true},
		{"cancelled", accuracy.Backtest{}, cancelled, y, nil, context.Canceled, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			c, err := tt.bt.Run(tt.ctx, tt.y, tt.models...)
			if !errors.Is(err, tt.wantErr) {
				t.Fatalf("error %v, want %v", err, tt.wantErr)
			}
			if (c != nil) != tt.withResult {
				t.Errorf("result %t alongside the error, want %t", c != nil, tt.withResult)
			}
		})
	}
}

// TestBacktestLatestOrigins: with Origins and no First the origins end
// at the last one that leaves Horizon observations, and the most origins
// that fit are laid out (144 months, 12 steps, every 5: the last origin
// is 132 and 27 origins start at 132 − 26·5 = 2, worked by hand).
func TestBacktestLatestOrigins(t *testing.T) {
	c, err := accuracy.Backtest{Horizon: 12, Step: 5, Origins: 27, NoBenchmarks: true}.Run(context.Background(), airPassengers(t), accuracy.Candidate{Name: "naive", Model: almanac.Naive{}})
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Origins) != 27 || c.Origins[0].Index != 2 || c.Origins[26].Index != 132 {
		t.Fatalf("%d origins from %d to %d, want 27 from 2 to 132", len(c.Origins), c.Origins[0].Index, c.Origins[len(c.Origins)-1].Index)
	}
}

// TestBacktestFailureDeterministic: the reported failure is the earliest
// failing origin, whatever the number of workers.
func TestBacktestFailureDeterministic(t *testing.T) {
	y := airPassengers(t)
	var ref *accuracy.Comparison
	for _, w := range []int{1, 3, 8} {
		failing := windowRecorder{mu: &sync.Mutex{}, seen: map[time.Time]int{}, failAt: 125}
		bt := accuracy.Backtest{Horizon: 3, First: 110, Workers: w, Levels: []float64{80}}
		c, err := bt.Run(context.Background(), y, accuracy.Candidate{Name: "flaky", Model: failing})
		if err != nil {
			t.Fatalf("workers %d: %v", w, err)
		}
		if ref == nil {
			ref = c
			continue
		}
		if d := cmp.Diff(failureTexts(ref.Failures()), failureTexts(c.Failures())); d != "" {
			t.Errorf("workers %d: failures differ (-1 +%d):\n%s", w, w, d)
		}
		if d := cmp.Diff(ref, c, equateNaN, cmpopts.IgnoreFields(accuracy.FitFailure{}, "Err")); d != "" {
			t.Errorf("workers %d: results differ:\n%s", w, d)
		}
	}
	// Origins 110..141; the model refuses windows of 125 or more.
	r, _ := ref.Run("flaky")
	if len(r.Failures) != 17 || r.Failures[0].Origin != 15 || ref.Origins[r.Failures[0].Origin].Index != 125 {
		t.Fatalf("%d failures from origin %+v, want 17 from the origin at 125", len(r.Failures), r.Failures[0])
	}
	for o, done := range r.Done {
		if done != (ref.Origins[o].Index < 125) {
			t.Errorf("origin %d (index %d): done %t", o, ref.Origins[o].Index, done)
		}
	}
	if r.Overall.N != 15*3 || r.Fits[20] != "" || !math.IsNaN(r.Errors[20][0]) {
		t.Errorf("scored %d cells (want 45 of the origins completed); fit %q at a failed origin", r.Overall.N, r.Fits[20])
	}
	// Scored over the origins completed: the same as a backtest of those
	// origins alone.
	alone, err := accuracy.Backtest{Horizon: 3, First: 110, Origins: 15, Levels: []float64{80}}.Run(context.Background(), y,
		accuracy.Candidate{Name: "flaky", Model: windowRecorder{mu: &sync.Mutex{}, seen: map[time.Time]int{}}})
	if err != nil {
		t.Fatal(err)
	}
	a, _ := alone.Run("flaky")
	if d := cmp.Diff(a.Overall, r.Overall, equateNaN); d != "" {
		t.Errorf("scores over the completed origins differ from a backtest of those alone:\n%s", d)
	}
	// The benchmarks failed nowhere and keep every origin; the relative
	// scores compare the candidate with the baseline on the same origins.
	sn, _ := ref.Run(accuracy.SeasonalNaiveName)
	if sn.Overall.N != 32*3 || len(sn.Failures) != 0 {
		t.Errorf("seasonal naive scored %d cells with %d failures", sn.Overall.N, len(sn.Failures))
	}
	b, _ := alone.Run(accuracy.SeasonalNaiveName)
	if math.Abs(r.Relative.MAE-a.Overall.MAE/b.Overall.MAE) > 1e-12 {
		t.Errorf("relative MAE %v, want %v over the common origins", r.Relative.MAE, a.Overall.MAE/b.Overall.MAE)
	}
	for _, f := range r.Failures {
		if !errors.Is(f.Err, accuracy.ErrBacktest) || !errors.Is(f.Err, almanac.ErrNotFitted) || f.Candidate != "flaky" {
			t.Errorf("failure %+v", f)
		}
	}
}

func failureTexts(fs []accuracy.FitFailure) []string {
	var out []string
	for _, f := range fs {
		out = append(out, fmt.Sprintf("%d|%s|%s|%d|%v", f.Series, f.Key, f.Candidate, f.Origin, f.Err))
	}
	return out
}

// cancelling is a test-only model that cancels the backtest's context
// from inside its third fit, then behaves like the naive method.
type cancelling struct {
	cancel context.CancelFunc
	calls  *int
	mu     *sync.Mutex
}

func (c cancelling) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	c.mu.Lock()
	*c.calls++
	if *c.calls == 3 {
		c.cancel()
	}
	c.mu.Unlock()
	return almanac.Naive{}.Fit(ctx, y)
}

func TestBacktestCancelledMidway(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	calls := 0
	m := cancelling{cancel: cancel, calls: &calls, mu: &sync.Mutex{}}
	bt := accuracy.Backtest{Horizon: 1, Origins: 50, Workers: 2, NoBenchmarks: true}
	c, err := bt.Run(ctx, airPassengers(t), accuracy.Candidate{Name: "c", Model: m})
	if !errors.Is(err, context.Canceled) || c == nil {
		t.Fatalf("error %v, result %v; want context.Canceled and the partial result", err, c != nil)
	}
	if calls >= 50 {
		t.Errorf("%d fits after cancellation at the third, want the pool to stop early", calls)
	}
	// The first two fits were done and are scored; the third cancels the
	// context and its naive fit then returns the cancellation, as does any
	// later one: not reached, and not failures.
	r := c.Runs[0]
	done := 0
	for _, d := range r.Done {
		if d {
			done++
		}
	}
	if !c.Partial || done != 2 || r.Overall.N != 2 || len(r.Failures) != 0 {
		t.Errorf("partial %t, %d origins done, %d scored, %d failures; want partial, 2, 2, 0", c.Partial, done, r.Overall.N, len(r.Failures))
	}
}

// pathModel is a test-only model forecasting the last value with a
// fixed set of sample paths (last + offsets), or, when mapped is set, a
// mapped distribution (for which no exact CRPS exists).
type pathModel struct {
	offsets []float64
	mapped  bool
}

type pathFit struct {
	last    float64
	offsets []float64
	mapped  bool
}

func (m pathModel) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	return pathFit{y.Values[y.Len()-1], m.offsets, m.mapped}, nil
}

func (f pathFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	mean := make([]float64, h)
	paths := make([][]float64, len(f.offsets))
	for i, o := range f.offsets {
		paths[i] = make([]float64, h)
		for s := range h {
			paths[i][s] = f.last + o*float64(s+1)
			mean[s] = f.last
		}
	}
	var d almanac.Distribution = &almanac.Sample{Paths: paths}
	if f.mapped {
		d = &almanac.Mapped{Base: d, Map: func(x float64) float64 { return x }}
	}
	return almanac.NewForecast(time.Time{}, calendar.Monthly, mean, d, levels...)
}
func (f pathFit) FittedValues() []float64 { return nil }
func (f pathFit) Residuals() []float64    { return nil }
func (f pathFit) String() string          { return "Paths" }

func TestBacktestSampleCRPS(t *testing.T) {
	y := airPassengers(t)
	off := []float64{-9, -4, -1, 0, 2, 5, 11}
	bt := accuracy.Backtest{Horizon: 4, Origins: 5, Step: 2, NoBenchmarks: true, Levels: []float64{50}}
	c, err := bt.Run(context.Background(), y,
		accuracy.Candidate{Name: "paths", Model: pathModel{offsets: off}},
		accuracy.Candidate{Name: "mapped", Model: pathModel{offsets: off, mapped: true}})
	if err != nil {
		t.Fatal(err)
	}
	// Every origin scores 4 steps, so the overall CRPS is the mean of the
	// per-origin CRPSSample values.
	sum := 0.0
	for k, o := range c.Origins {
		v, err := accuracy.CRPSSample(y.Values[o.Index:o.Index+4], c.Runs[0].Forecasts[k].SamplePaths())
		if err != nil {
			t.Fatal(err)
		}
		sum += v
	}
	numtest.Scalar(t, "CRPS", c.Runs[0].Overall.CRPS, sum/5, 0, 1e-14)
	if !math.IsNaN(c.Runs[1].Overall.CRPS) {
		t.Errorf("mapped distribution: CRPS %v, want NaN (no exact form)", c.Runs[1].Overall.CRPS)
	}
	if c.Runs[1].Overall.MAE != c.Runs[0].Overall.MAE {
		t.Error("the other measures must not depend on the distribution type")
	}
	iv0, _ := c.Runs[0].Overall.Interval(50)
	iv1, _ := c.Runs[1].Overall.Interval(50)
	if iv0 != iv1 || math.IsNaN(iv0.Coverage) {
		t.Errorf("interval scores %+v vs %+v", iv0, iv1)
	}
}

func TestBatchAvgRelMAE(t *testing.T) {
	a := airPassengers(t)
	b := a.Window(12, 144)
	bt := accuracy.Backtest{Horizon: 6, Origins: 3}
	batch, err := bt.RunBatch(context.Background(), []almanac.Series{a, b}, accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil {
		t.Fatal(err)
	}
	base := slicesIndex(batch.Names, batch.Baseline)
	// Equal cell counts (18 per series): the plain geometric mean of the
	// two ratios.
	r0 := batch.Series[0].Runs[0].Overall.MAE / batch.Series[0].Runs[base].Overall.MAE
	r1 := batch.Series[1].Runs[0].Overall.MAE / batch.Series[1].Runs[base].Overall.MAE
	numtest.Scalar(t, "AvgRelMAE", batch.AvgRelMAE[0], math.Sqrt(r0*r1), 0, 1e-14)
	numtest.Scalar(t, "baseline AvgRelMAE", batch.AvgRelMAE[base], 1, 0, 0)
}

// TestBacktestMissingActual: a missing actual value is left out of every
// cell that forecasts it, and nothing else changes.
func TestBacktestMissingActual(t *testing.T) {
	y := airPassengers(t).Clone()
	y.Values[140] = math.NaN()
	bt := accuracy.Backtest{Horizon: 3, Origins: 5, NoBenchmarks: true}
	c, err := bt.Run(context.Background(), y, accuracy.Candidate{Name: "snaive", Model: almanac.SeasonalNaive{}})
	if err != nil {
		t.Fatal(err)
	}
	// Origins 137..141; index 140 is step 3 at 138, step 2 at 139 and
	// step 1 at 140: 15 − 3 = 12 cells scored.
	if c.Origins[0].Index != 137 || c.Runs[0].Overall.N != 12 {
		t.Errorf("first origin %d, N = %d; want 137 and 12", c.Origins[0].Index, c.Runs[0].Overall.N)
	}
	for h, want := range []int{4, 4, 4} {
		if got := c.Runs[0].ByStep[h].N; got != want {
			t.Errorf("step %d: N = %d, want %d", h+1, got, want)
		}
	}
	if !math.IsNaN(c.Runs[0].Errors[1][2]) {
		t.Errorf("error at the missing actual = %v, want NaN", c.Runs[0].Errors[1][2])
	}
}

// TestScaleFreeMeasures: MAPE, sMAPE, MASE, RMSSE, coverage and the
// relative scores do not change when the data are multiplied by a
// positive constant; MAE and RMSE scale with it (DESIGN.md, "Numbers").
func TestScaleFreeMeasures(t *testing.T) {
	y := airPassengers(t)
	z := y.Clone()
	const c = 37.5
	for i := range z.Values {
		z.Values[i] *= c
	}
	bt := accuracy.Backtest{Horizon: 12, Origins: 6, Levels: []float64{90}}
	m := accuracy.Candidate{Name: "drift", Model: almanac.Drift{}}
	a, err := bt.Run(context.Background(), y, m)
	if err != nil {
		t.Fatal(err)
	}
	b, err := bt.Run(context.Background(), z, m)
	if err != nil {
		t.Fatal(err)
	}
	for i := range a.Runs {
		sa, sb := a.Runs[i].Overall, b.Runs[i].Overall
		name := a.Runs[i].Name
		numtest.Scalar(t, name+" MAPE", sb.MAPE, sa.MAPE, 0, 1e-12)
		numtest.Scalar(t, name+" sMAPE", sb.SMAPE, sa.SMAPE, 0, 1e-12)
		numtest.Scalar(t, name+" MASE", sb.MASE, sa.MASE, 0, 1e-12)
		numtest.Scalar(t, name+" RMSSE", sb.RMSSE, sa.RMSSE, 0, 1e-12)
		numtest.Scalar(t, name+" MSIS", sb.Intervals[0].MSIS, sa.Intervals[0].MSIS, 0, 1e-12)
		numtest.Scalar(t, name+" coverage", sb.Intervals[0].Coverage, sa.Intervals[0].Coverage, 0, 0)
		numtest.Scalar(t, name+" relative MASE", b.Runs[i].Relative.MASE, a.Runs[i].Relative.MASE, 0, 1e-12)
		numtest.Scalar(t, name+" MAE", sb.MAE, c*sa.MAE, 0, 1e-12)
		numtest.Scalar(t, name+" RMSE", sb.RMSE, c*sa.RMSE, 0, 1e-12)
		numtest.Scalar(t, name+" CRPS", sb.CRPS, c*sa.CRPS, 0, 1e-12)
	}
}

// TestBacktestAutomaticETS runs the backtest on a model from another
// package (smoothing.Select) and records the selected model per origin.
func TestBacktestAutomaticETS(t *testing.T) {
	if testing.Short() {
		t.Skip("fits automatic ETS at several origins")
	}
	y := airPassengers(t)
	bt := accuracy.Backtest{Horizon: 12, Origins: 2, Step: 12, Levels: []float64{80}}
	c, err := bt.Run(context.Background(), y, accuracy.Candidate{Name: "ets", Model: smoothing.Select{}})
	if err != nil {
		t.Fatal(err)
	}
	r, _ := c.Run("ets")
	for k, s := range r.Fits {
		if !strings.HasPrefix(s, "ETS(") {
			t.Errorf("origin %d: fitted %q, want ETS notation", k, s)
		}
	}
	t.Logf("selected: %v", r.Fits)
	if math.IsNaN(r.Overall.MASE) {
		t.Errorf("MASE missing: %+v", r.Overall)
	}
	exact := true // CRPS is exact (so defined) for normal and sample distributions
	for _, f := range r.Forecasts {
		switch f.Dist.(type) {
		case *almanac.Normal, *almanac.Sample:
		default:
			exact = false
		}
	}
	if exact == math.IsNaN(r.Overall.CRPS) {
		t.Errorf("CRPS %v with exact-form distributions %v", r.Overall.CRPS, exact)
	}
	if len(c.Runs) != 3 || c.Baseline != accuracy.SeasonalNaiveName {
		t.Errorf("runs %d, baseline %q", len(c.Runs), c.Baseline)
	}
}
