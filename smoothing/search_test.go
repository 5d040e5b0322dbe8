package smoothing

import (
	"context"
	"errors"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"sync/atomic"
	"testing"

	"github.com/almanac-go/almanac/internal/reftest"
)

// estimatedProblems returns, for every ets_estimated reference fixture,
// the likelihood problem as Spec.fit sets it up and its start vector.
func estimatedProblems(t *testing.T) (names []string, probs []*problem, starts [][]float64, llfs []float64) {
	t.Helper()
	files, err := filepath.Glob("testdata/reference/*.json")
	if err != nil || len(files) == 0 {
		t.Fatalf("no ets_estimated fixtures: %v", err)
	}
	for _, file := range files {
		f, err := reftest.Load(file)
		if err != nil {
			t.Fatal(err)
		}
		if f.Kind != "ets_estimated" {
			continue
		}
		s := fixtureSpec(t, f)
		y := fixtureSeries(t, f)
		fm, err := s.resolve(y)
		if err != nil {
			t.Fatal(err)
		}
		tf := newScaling(y.Values, !s.multiplicativeParts())
		ys := y.Slice()
		for i := range ys {
			ys[i] = tf.toZ(ys[i])
		}
		p := s.newProblem(fm, ys, tf)
		x := p.start()
		names = append(names, strings.TrimSuffix(filepath.Base(file), ".json"))
		probs = append(probs, p)
		starts = append(starts, x)
		llfs = append(llfs, f.Float(t, "expect.llf"))
	}
	return names, probs, starts, llfs
}

// TestSimplexFallback: the fallback (optimize.NelderMead, restarted, then
// one more BFGS run from its end point) is what optimise runs when BFGS
// stops without converging, starting from where BFGS stopped. Here every
// BFGS search of the multi-start is cut off after d iterations (d
// coordinates), as if it had stalled, and the fit that the fallbacks
// complete must reach the optimum of the uninterrupted multi-start search
// (1e-6 relative) on every ets_estimated fixture problem. (The simplex
// search alone does not reliably reach it in 10 to 17 dimensions: run
// alone from the start values it stops 6.4 short in the objective on
// airpassengers_log_aaa; hence the BFGS run after it.)
//
// Known gap, not solved: on the three problems in fallbackGaps (of 390)
// the completed fit ends in a worse local optimum. They are listed so the gap stays visible: the test fails
// if any other problem falls short, and also if a listed one starts
// reaching the optimum (then remove it from the list).
func TestSimplexFallback(t *testing.T) {
	names, probs, starts, _ := estimatedProblems(t)
	for i, p := range probs {
		if raceEnabled && i%8 != 0 && !fallbackGaps[names[i]] {
			// One problem in eight under the race detector (the search
			// runs in one goroutine; race instrumentation only slows
			// it): every problem is checked by a plain go test.
			continue
		}
		t.Run(names[i], func(t *testing.T) {
			_, fb, _, err := p.multiStart(context.Background(), starts[i])
			if err != nil {
				t.Fatal(err)
			}
			fs := math.Inf(1)
			for _, st := range startSet {
				x := slices.Clone(starts[i])
				p.setParams(x, st)
				p.stall = len(x)
				_, f, _, err := p.optimise(context.Background(), x)
				if err != nil {
					t.Fatal(err)
				}
				fs = math.Min(fs, f)
			}
			t.Logf("objective: multi-start BFGS %.10g, with every BFGS cut off and completed by the fallback %.10g (difference %.3g)", fb, fs, fs-fb)
			short := fs > fb+1e-6*(1+math.Abs(fb))
			switch {
			case short && !fallbackGaps[names[i]]:
				t.Errorf("fallback ends at %.10g, above BFGS's %.10g", fs, fb)
			case short:
				t.Logf("known gap: fallback ends %.3g above the optimum", fs-fb)
			case fallbackGaps[names[i]]:
				t.Errorf("listed as a known gap but now reaches the optimum: remove it from fallbackGaps")
			}
		})
	}
}

var fallbackGaps = map[string]bool{
	"sm18_n1096_aadn": true, "sm18_n1096_madn": true, "sm18_n1686_aadn": true,
}

// countdownCtx reports cancellation once Err has been called more than
// a given number of times, to cancel a fit in the middle of its search.
type countdownCtx struct {
	context.Context
	left atomic.Int64
}

func (c *countdownCtx) Err() error {
	if c.left.Add(-1) < 0 {
		return context.Canceled
	}
	return nil
}

// TestCancelDuringSearch: a context cancelled while the gonum searches
// run (BFGS for ETS, the simplex for HoltWinters) stops the fit with an
// error wrapping context.Canceled.
func TestCancelDuringSearch(t *testing.T) {
	y := airPassengers(t)
	for _, tc := range []struct {
		name string
		fit  func(context.Context) error
	}{
		{"ETS(M,Ad,M)", func(ctx context.Context) error {
			_, err := Spec{Error: MultiplicativeError, Trend: DampedTrend, Season: MultiplicativeSeason}.Fit(ctx, y)
			return err
		}},
		{"HoltWinters", func(ctx context.Context) error {
			_, err := HoltWinters{Estimate: true}.Fit(ctx, y)
			return err
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ctx := &countdownCtx{Context: context.Background()}
			ctx.left.Store(20)
			if err := tc.fit(ctx); !errors.Is(err, context.Canceled) {
				t.Errorf("error %v, want context.Canceled", err)
			}
			if ctx.left.Load() >= 0 {
				t.Error("the context was not consulted during the search")
			}
		})
	}
}
