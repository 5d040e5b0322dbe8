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
	files, err := filepath.Glob("testdata/reference/*_estimated.json")
	if err != nil || len(files) == 0 {
		t.Fatalf("no ets_estimated fixtures: %v", err)
	}
	for _, file := range files {
		f, err := reftest.Load(file)
		if err != nil {
			t.Fatal(err)
		}
		s := fixtureSpec(t, f)
		y := fixtureSeries(t, f)
		fm, err := s.resolve(y)
		if err != nil {
			t.Fatal(err)
		}
		scale := 0.0
		for _, v := range y.Values {
			scale += math.Abs(v)
		}
		scale /= float64(y.Len())
		ys := y.Slice()
		for i := range ys {
			ys[i] /= scale
		}
		p := s.newProblem(fm, ys, scale)
		x := p.bestAlphaStart(p.start())
		names = append(names, strings.TrimSuffix(filepath.Base(file), ".json"))
		probs = append(probs, p)
		starts = append(starts, x)
		llfs = append(llfs, f.Float(t, "expect.llf"))
	}
	return names, probs, starts, llfs
}

// TestSimplexFallback: the gradient-free fallback (optimize.NelderMead,
// restarted) run alone from the start values reaches the optimum of the
// BFGS search on every ets_estimated fixture problem, so a fit whose
// BFGS search stalls still ends at the maximum.
func TestSimplexFallback(t *testing.T) {
	names, probs, starts, _ := estimatedProblems(t)
	for i, p := range probs {
		t.Run(names[i], func(t *testing.T) {
			_, fb, conv, err := p.optimise(context.Background(), starts[i])
			if err != nil || !conv {
				t.Fatalf("BFGS: converged %v, error %v", conv, err)
			}
			x := slices.Clone(starts[i])
			fs, _, err := simplexRestarts(context.Background(), p.objective, x, p.objective(x), p.steps(x), 1e-8, 2000*len(x), 1e-7, 0)
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("objective: BFGS %.10g, simplex %.10g (difference %.3g)", fb, fs, fs-fb)
			if fs > fb+1e-6*(1+math.Abs(fb)) {
				t.Errorf("simplex search ends at %.10g, above the BFGS optimum %.10g", fs, fb)
			}
		})
	}
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
