package accuracy_test

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"
)

// keyTrouble is a test-only model that behaves like the drift method
// except on the series keyed key, where it fails to fit (or, with panics
// set, panics) once the training window holds at least from
// observations.
type keyTrouble struct {
	key    string
	from   int
	panics bool
}

func (m keyTrouble) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if y.Key == m.key && y.Len() >= m.from {
		if m.panics {
			panic(fmt.Sprintf("test model: cannot handle %d observations", y.Len()))
		}
		return nil, fmt.Errorf("test model: %w: refusing series %q", almanac.ErrNotFitted, y.Key)
	}
	return almanac.Drift{}.Fit(ctx, y)
}

// batchInputs returns three series for the batch tests: AirPassengers
// (Box, Jenkins & Reinsel, Series G; R datasets), its last 120 months and
// its last 108 months, keyed "full", "from 1951" and "from 1952".
func batchInputs(t *testing.T) []almanac.Series {
	a := airPassengers(t)
	a.Key = "full"
	b := a.Window(24, 144)
	b.Key = "from 1951"
	c := a.Window(36, 144)
	c.Key = "from 1952"
	return []almanac.Series{a, b, c}
}

// summaries are the BatchComparison fields that average over series.
type summaries struct {
	Names     []string
	Baseline  string
	Mean      []accuracy.Scores
	Relative  []accuracy.Ratios
	AvgRelMAE []float64
	Counts    []accuracy.SeriesCounts
	Total     []accuracy.TotalScores
}

func summaryOf(b *accuracy.BatchComparison) summaries {
	return summaries{b.Names, b.Baseline, b.Mean, b.Relative, b.AvgRelMAE, b.Counts, b.Total}
}

// failureStrings renders Failed with the errors as text, for comparing
// two runs.
func failureStrings(fs []accuracy.SeriesFailure) []string {
	var out []string
	for _, f := range fs {
		out = append(out, fmt.Sprintf("%d|%s|%v", f.Index, f.Key, f.Err))
	}
	return out
}

// TestBatchLeavesOutFailingSeries: a series that cannot hold the origins,
// or on which a candidate completes no origin, is left out of the
// summaries with the error Run gives for it alone; its comparison is kept
// when it could be laid out; the others keep exactly their single-series
// results, and the summaries equal a batch of the compared series alone —
// with 1 and 4 workers alike.
func TestBatchLeavesOutFailingSeries(t *testing.T) {
	base := accuracy.Backtest{Horizon: 6, Origins: 4, Step: 3, Levels: []float64{80}}
	drift := accuracy.Candidate{Name: "drift", Model: almanac.Drift{}}
	// A series shifted down by 200 keeps AirPassengers' seasonal pattern
	// (autocorrelations do not change with a shift) but has negative
	// values, which Naive2's multiplicative adjustment cannot take.
	shifted := func(ys []almanac.Series) []almanac.Series {
		y := ys[1].Clone()
		for i := range y.Values {
			y.Values[i] -= 200
		}
		ys[1] = y
		return ys
	}
	withNaive2 := base
	withNaive2.Benchmarks = []accuracy.Candidate{
		{Name: accuracy.NaiveName, Model: almanac.Naive{}},
		{Name: accuracy.Naive2Name, Model: accuracy.Naive2{}},
	}
	tests := []struct {
		name     string
		bt       accuracy.Backtest
		prepare  func([]almanac.Series) []almanac.Series
		models   []accuracy.Candidate
		bad      int
		sentinel error // the failure's own sentinel
		layout   bool  // the series cannot hold the origins (else a model fails, wrapping ErrBacktest too)
	}{
		{"model fails everywhere on one key", base, nil,
			[]accuracy.Candidate{drift, {Name: "picky", Model: keyTrouble{key: "from 1951", from: 1}}}, 1, almanac.ErrNotFitted, false},
		{"model panics everywhere on one key", base, nil,
			[]accuracy.Candidate{drift, {Name: "fragile", Model: keyTrouble{key: "from 1952", from: 1, panics: true}}}, 2, almanac.ErrNotFitted, false},
		{"benchmark cannot take negative values", withNaive2, shifted, []accuracy.Candidate{drift}, 1, almanac.ErrNonPositive, false},
		{"series too short for the origins", base, func(ys []almanac.Series) []almanac.Series {
			ys[0] = ys[0].Head(12)
			return ys
		}, []accuracy.Candidate{drift}, 0, almanac.ErrTooShort, true},
		// 17 observations hold the origins 2, 5, 8 and 11, but the
		// seasonal naive method needs more than 12 observations to fit.
		{"series too short for one candidate", base, func(ys []almanac.Series) []almanac.Series {
			ys[2] = ys[2].Head(17)
			return ys
		}, []accuracy.Candidate{drift}, 2, almanac.ErrTooShort, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ys := batchInputs(t)
			if tt.prepare != nil {
				ys = tt.prepare(ys)
			}
			var ref *accuracy.BatchComparison
			for _, w := range []int{1, 4} {
				bt := tt.bt
				bt.Workers = w
				got, err := bt.RunBatch(context.Background(), ys, tt.models...)
				if err != nil {
					t.Fatalf("workers %d: %v", w, err)
				}
				if ref == nil {
					ref = got
					continue
				}
				if d := cmp.Diff(ref, got, equateNaN); d != "" {
					t.Errorf("results differ, workers 1 vs %d (-1 +%d):\n%s", w, w, d)
				}
			}
			if len(ref.Failed) != 1 || ref.Failed[0].Index != tt.bad || ref.Failed[0].Key != ys[tt.bad].Key {
				t.Fatalf("failed %v, want series %d only", failureStrings(ref.Failed), tt.bad)
			}
			if (ref.Series[tt.bad] == nil) != tt.layout || len(ref.Series) != 3 || ref.Scored() != 2 {
				t.Errorf("series %d kept %t, %d entries, %d scored", tt.bad, ref.Series[tt.bad] != nil, len(ref.Series), ref.Scored())
			}
			ferr := ref.Failed[0].Err
			if !errors.Is(ferr, tt.sentinel) {
				t.Errorf("failure %v does not wrap %v", ferr, tt.sentinel)
			}
			if errors.Is(ferr, accuracy.ErrBacktest) == tt.layout {
				t.Errorf("failure %v: wraps ErrBacktest %t, want %t", ferr, !tt.layout, tt.layout)
			}
			// Every fit failure is listed, and only on the bad series.
			if tt.layout != (len(ref.FitFailures) == 0) {
				t.Errorf("fit failures %v", len(ref.FitFailures))
			}
			for _, f := range ref.FitFailures {
				if f.Series != tt.bad || !errors.Is(f.Err, tt.sentinel) {
					t.Errorf("fit failure %+v", f)
				}
			}
			// The recorded error is the one Run gives for the series alone.
			c, err := tt.bt.Run(context.Background(), ys[tt.bad], tt.models...)
			if err == nil || (c != nil) == tt.layout {
				t.Errorf("Run alone: %v, %v; want an error, with the comparison unless the layout failed", c != nil, err)
			} else if err.Error() != ferr.Error() {
				t.Errorf("recorded %q, Run alone gives %q", ferr, err)
			}
			if c != nil {
				if d := cmp.Diff(c, ref.Series[tt.bad], equateNaN, cmpopts.IgnoreFields(accuracy.FitFailure{}, "Series")); d != "" {
					t.Errorf("the left-out series' comparison differs from Run alone:\n%s", d)
				}
			}
			// Summaries over the compared series only.
			var good []almanac.Series
			var goodIdx []int
			for i, y := range ys {
				if i != tt.bad {
					good, goodIdx = append(good, y), append(goodIdx, i)
				}
			}
			alone, err := tt.bt.RunBatch(context.Background(), good, tt.models...)
			if err != nil {
				t.Fatal(err)
			}
			if len(alone.Failed) != 0 {
				t.Fatalf("compared series fail alone: %v", failureStrings(alone.Failed))
			}
			if d := cmp.Diff(summaryOf(alone), summaryOf(ref), equateNaN); d != "" {
				t.Errorf("summaries differ from a batch of the compared series (-alone +with failure):\n%s", d)
			}
			for k, i := range goodIdx {
				if d := cmp.Diff(alone.Series[k], ref.Series[i], equateNaN); d != "" {
					t.Errorf("series %d differs:\n%s", i, d)
				}
			}
			if slicesIndex(ref.Names, accuracy.Naive2Name) >= 0 {
				ov, err1 := ref.OWA("drift", accuracy.Naive2Name)
				ow, err2 := alone.OWA("drift", accuracy.Naive2Name)
				if err1 != nil || err2 != nil || ov != ow {
					t.Errorf("OWA %v (%v), over the compared series alone %v (%v)", ov, err1, ow, err2)
				}
			}
		})
	}
}

// TestBatchIsolatesCandidateFailures (issue 11): a candidate that fails at
// some origins of a series is scored there over the origins it completed;
// its failures are listed, the series stays in the summaries, and the
// other candidates keep every origin.
func TestBatchIsolatesCandidateFailures(t *testing.T) {
	bt := accuracy.Backtest{Horizon: 6, Origins: 4, Step: 3, Levels: []float64{80}}
	drift := accuracy.Candidate{Name: "drift", Model: almanac.Drift{}}
	tests := []struct {
		name     string
		model    keyTrouble
		bad      int // the series it fails on
		done     []bool
		sentinel error
	}{
		// "from 1951" has 120 observations: origins 105, 108, 111, 114.
		{"fails from 110 observations", keyTrouble{key: "from 1951", from: 110}, 1, []bool{true, true, false, false}, almanac.ErrNotFitted},
		// "from 1952" has 108 observations: origins 93, 96, 99, 102.
		{"panics from 100 observations", keyTrouble{key: "from 1952", from: 100, panics: true}, 2, []bool{true, true, true, false}, almanac.ErrNotFitted},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ys := batchInputs(t)
			var ref *accuracy.BatchComparison
			for _, w := range []int{1, 4} {
				b := bt
				b.Workers = w
				got, err := b.RunBatch(context.Background(), ys, drift, accuracy.Candidate{Name: "picky", Model: tt.model})
				if err != nil {
					t.Fatal(err)
				}
				if ref == nil {
					ref = got
					continue
				}
				if d := cmp.Diff(ref, got, equateNaN); d != "" {
					t.Errorf("workers 1 vs %d differ:\n%s", w, d)
				}
			}
			if len(ref.Failed) != 0 || ref.Scored() != 3 {
				t.Fatalf("left out %v, want none", failureStrings(ref.Failed))
			}
			nfail := 0
			for _, d := range tt.done {
				if !d {
					nfail++
				}
			}
			if len(ref.FitFailures) != nfail {
				t.Fatalf("%d fit failures, want %d", len(ref.FitFailures), nfail)
			}
			for _, f := range ref.FitFailures {
				if f.Series != tt.bad || f.Candidate != "picky" || tt.done[f.Origin] || !errors.Is(f.Err, tt.sentinel) || !errors.Is(f.Err, accuracy.ErrBacktest) {
					t.Errorf("fit failure %+v", f)
				}
			}
			c := ref.Series[tt.bad]
			picky, _ := c.Run("picky")
			if !slices.Equal(picky.Done, tt.done) {
				t.Errorf("done %v, want %v", picky.Done, tt.done)
			}
			// The candidate is the drift method where it works: its scores
			// are drift's over the origins it completed.
			k := slices.Index(tt.done, false)
			part, err := accuracy.Backtest{Horizon: 6, First: c.Origins[0].Index, Origins: k, Step: 3, Levels: []float64{80}}.Run(context.Background(), ys[tt.bad], drift)
			if err != nil {
				t.Fatal(err)
			}
			d, _ := part.Run("drift")
			if diff := cmp.Diff(d.Overall, picky.Overall, equateNaN); diff != "" {
				t.Errorf("scores over the completed origins:\n%s", diff)
			}
			// Drift itself keeps every origin.
			if dr, _ := c.Run("drift"); dr.Overall.N != 24 || len(dr.Failures) != 0 {
				t.Errorf("drift scored %d cells with %d failures", dr.Overall.N, len(dr.Failures))
			}
		})
	}
}

// TestBatchAllFail: when no series can be compared RunBatch fails, wrapping
// ErrBacktest and the first series' own error, and returns what it did.
func TestBatchAllFail(t *testing.T) {
	ys := batchInputs(t)
	tests := []struct {
		name   string
		ys     []almanac.Series
		models []accuracy.Candidate
		want   []error
	}{
		{"every series too short", []almanac.Series{ys[0].Head(10), ys[1].Head(8)}, nil,
			[]error{accuracy.ErrBacktest, almanac.ErrTooShort}},
		{"model fails everywhere", ys, []accuracy.Candidate{{Name: "picky", Model: windowRecorder{mu: &sync.Mutex{}, seen: map[time.Time]int{}, failAt: 1}}},
			[]error{accuracy.ErrBacktest, almanac.ErrNotFitted}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			bt := accuracy.Backtest{Horizon: 6, Origins: 4, Workers: 2}
			got, err := bt.RunBatch(context.Background(), tt.ys, tt.models...)
			if got == nil || got.Scored() != 0 || len(got.Failed) != len(tt.ys) {
				t.Errorf("result %v: want one with every series listed in Failed", got)
			}
			for _, s := range tt.want {
				if !errors.Is(err, s) {
					t.Errorf("error %v does not wrap %v", err, s)
				}
			}
			if err != nil && !strings.Contains(err.Error(), fmt.Sprintf("%q", tt.ys[0].Key)) {
				t.Errorf("error %q does not name the first series", err)
			}
		})
	}
}

// TestBatchSpecErrors: a bad specification, an empty batch and a
// cancelled context still stop the whole batch, whatever the series (the
// cancelled batch returns what it did: nothing).
func TestBatchSpecErrors(t *testing.T) {
	ys := batchInputs(t)
	ys = append(ys, ys[0].Head(5)) // one series that would be left out
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	ctx := context.Background()
	tests := []struct {
		name   string
		bt     accuracy.Backtest
		ctx    context.Context
		ys     []almanac.Series
		models []accuracy.Candidate
		want   error
	}{
		{"no series", accuracy.Backtest{}, ctx, nil, nil, almanac.ErrEmpty},
		{"negative step", accuracy.Backtest{Step: -1}, ctx, ys, nil, almanac.ErrInvalid},
		{"bad level", accuracy.Backtest{Levels: []float64{0}}, ctx, ys, nil, almanac.ErrLevel},
		{"unknown baseline", accuracy.Backtest{Horizon: 6, Baseline: "oracle"}, ctx, ys, nil, almanac.ErrInvalid},
		{"duplicate name", accuracy.Backtest{Horizon: 6}, ctx, ys, []accuracy.Candidate{{Name: "naive", Model: almanac.Naive{}}}, almanac.ErrInvalid},
		{"sliding longer than first", accuracy.Backtest{First: 20, Window: accuracy.Sliding, Length: 30}, ctx, ys, nil, almanac.ErrInvalid},
		{"cancelled", accuracy.Backtest{Horizon: 6}, cancelled, ys, nil, context.Canceled},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := tt.bt.RunBatch(tt.ctx, tt.ys, tt.models...)
			if !errors.Is(err, tt.want) {
				t.Fatalf("error %v, want %v", err, tt.want)
			}
			if errors.Is(err, accuracy.ErrBacktest) {
				t.Errorf("error %v wraps ErrBacktest; a specification error is not a series failure", err)
			}
			if cancelled := errors.Is(err, context.Canceled); (got != nil) != cancelled {
				t.Errorf("result %t alongside the error, want %t", got != nil, cancelled)
			} else if cancelled && (!got.Partial || got.Scored() != 0) {
				t.Errorf("cancelled before any fit: partial %t, %d compared", got.Partial, got.Scored())
			}
		})
	}
}

// TestBatchCancelledMidway: cancelling during a batch stops it with the
// context's error and the partial result: what was done is scored, the
// series not reached are listed with the context's error.
func TestBatchCancelledMidway(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	calls := 0
	m := cancelling{cancel: cancel, calls: &calls, mu: &sync.Mutex{}}
	ys := batchInputs(t)
	var prog []int
	bt := accuracy.Backtest{Horizon: 1, Origins: 20, Workers: 2, NoBenchmarks: true, Progress: func(done, total int) {
		if total != 3*20 {
			t.Errorf("progress total %d, want 60", total)
		}
		prog = append(prog, done)
	}}
	got, err := bt.RunBatch(ctx, ys, accuracy.Candidate{Name: "c", Model: m})
	if !errors.Is(err, context.Canceled) || got == nil {
		t.Fatalf("error %v, result %v; want context.Canceled and the partial result", err, got != nil)
	}
	if calls >= 3*20 {
		t.Errorf("%d fits after cancellation at the third, want the pool to stop early", calls)
	}
	// The first series got two origins done before the cancellation;
	// the others were not reached.
	first := got.Series[0]
	if !got.Partial || first == nil || !first.Partial || first.Runs[0].Overall.N != 2 || len(got.FitFailures) != 0 {
		t.Fatalf("partial %t, first series %+v, fit failures %d", got.Partial, first, len(got.FitFailures))
	}
	if got.Scored() != 1 || len(got.Failed) != 2 {
		t.Fatalf("%d compared, left out %v", got.Scored(), failureStrings(got.Failed))
	}
	for _, f := range got.Failed {
		if !errors.Is(f.Err, context.Canceled) {
			t.Errorf("series %d left out with %v, want the cancellation", f.Index, f.Err)
		}
	}
	if got.Mean[0].N != 2 {
		t.Errorf("summaries over %d cells, want the 2 done", got.Mean[0].N)
	}
	// Progress counts every fit, done or skipped, once and in order.
	if len(prog) != 60 || prog[59] != 60 || !slices.IsSorted(prog) {
		t.Errorf("progress calls %v", prog)
	}
}

// TestBatchRenderLeftOut: the text and CSV renderings say which series
// were left out and how many series the averages cover.
func TestBatchRenderLeftOut(t *testing.T) {
	ys := batchInputs(t)
	ys[2].Key = ""
	bt := accuracy.Backtest{Horizon: 6, Origins: 3, Workers: 2}
	b, err := bt.RunBatch(context.Background(), ys,
		accuracy.Candidate{Name: "drift", Model: almanac.Drift{}},
		accuracy.Candidate{Name: "picky", Model: keyTrouble{key: "from 1951", from: 1}},
		accuracy.Candidate{Name: "picky2", Model: keyTrouble{key: "", from: 1}})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := b.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	for _, want := range []string{"backtest of 3 series, 1 compared", "2 of 3 series left out of the averages", "  from 1951: accuracy: backtest failed", "  (series 2): accuracy: backtest failed", "6 fits failed (picky 3, picky2 3)", "  from 1951, picky, origin 1960-05-01, fit: test model: "} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q:\n%s", want, text)
		}
	}
	buf.Reset()
	if err := b.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	csv := buf.String()
	for _, want := range []string{"from 1951,,,left_out,", "(series 2),,,left_out,", accuracy.BatchMeanKey + ",drift,all,series,1\n", "full,drift,all,mase,"} {
		if !strings.Contains(csv, want) {
			t.Errorf("CSV lacks %q:\n%s", want, csv)
		}
	}
	// The left-out series keeps the scores of the candidates that worked.
	if !strings.Contains(csv, "from 1951,drift,all,mase,") {
		t.Error("CSV lacks the scores of drift on a left-out series")
	}
}
