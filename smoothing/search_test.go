package smoothing

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"strings"
	"sync/atomic"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/optimize"
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
// Known gap, not solved: on the five problems in fallbackGaps (of 390)
// the completed fit ends in a worse local optimum. They are listed so the
// gap stays visible: the test fails if any other problem falls short, and
// also if a listed one starts reaching the optimum (then remove it from
// the list). Since the searches start from the estimated curvature
// (problem.curvature) the uninterrupted search reaches a slightly higher
// maximum than before on four of them (by 1e-4 to 0.06 in the objective;
// the fallback ends at the former maximum) and the fallback ends 0.53
// short on sm18_n1402_madm; the three gaps listed before
// (sm18_n1096_aadn, sm18_n1096_madn, sm18_n1686_aadn) are closed.
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
	"sm18_n1171_madm": true, "sm18_n1402_madm": true, "sm18_n2396_anm": true,
	"sm18_n2680_anm": true, "sm18_n2680_mna": true,
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

// TestLineSearchMatchesMinimize: lineSearch drives gonum's line-search
// method in the calling goroutine; given optimize.BFGS's directions it
// must end where optimize.Minimize ends with optimize.BFGS and the same
// settings (bit for bit: same evaluations in the same order), on every
// eighth ets_estimated fixture problem from every parameter start. With
// its own BFGS directions (bfgsDirection, the same update with another
// order of rounding) it must end at the same objective within 1e-9
// relative.
func TestLineSearchMatchesMinimize(t *testing.T) {
	names, probs, starts, _ := estimatedProblems(t)
	for i, p := range probs {
		if i%8 != 0 {
			continue
		}
		t.Run(names[i], func(t *testing.T) {
			for _, st := range startSet {
				x := slices.Clone(starts[i])
				p.setParams(x, st)
				d := len(x)
				g := make([]float64, d)
				fx := p.objectiveGrad(x, g)
				if fx >= penalty {
					continue
				}
				prob := optimize.Problem{
					Func: p.objective,
					Grad: func(grad, x []float64) { p.objectiveGrad(x, grad) },
				}
				settings := &optimize.Settings{
					InitValues:      &optimize.Location{F: fx, Gradient: slices.Clone(g)},
					Converger:       &optimize.FunctionConverge{Relative: 1e-10, Absolute: 1e-20, Iterations: 2},
					MajorIterations: 200 * d,
				}
				gradStop := 1e-10 * (1 + math.Abs(fx))
				res, errM := optimize.Minimize(prob, x, settings, &optimize.BFGS{GradStopThreshold: gradStop})
				if res == nil {
					t.Fatal(errM)
				}
				ls := newLineSearch(d)
				ls.next = &optimize.BFGS{}
				copy(ls.g, g)
				xe, fe, status, err := ls.run(context.Background(), p, x, fx, 200*d, gradStop)
				if fe != res.F || !slices.Equal(xe, res.X) || status != res.Status || (err == nil) != (errM == nil) {
					t.Errorf("start %v: lineSearch ends at f %v (%v, %v), Minimize at %v (%v, %v)", st, fe, status, err, res.F, res.Status, errM)
				}
				own := newLineSearch(d)
				copy(own.g, g)
				_, fo, _, _ := own.run(context.Background(), p, x, fx, 200*d, gradStop)
				if math.Abs(fo-res.F) > 1e-9*(1+math.Abs(res.F)) {
					t.Errorf("start %v: with bfgsDirection lineSearch ends at f %.12g, with optimize.BFGS at %.12g", st, fo, res.F)
				}
			}
		})
	}
}

// TestBFGSDirection: bfgsDirection gives optimize.BFGS's directions (the
// same update, rounded in another order) along a sequence of locations
// on a convex quadratic with gradient A·x + c, in 2 to 17 dimensions.
func TestBFGSDirection(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, d := range []int{2, 5, 17} {
		t.Run(fmt.Sprintf("d=%d", d), func(t *testing.T) {
			// A = MᵀM + I, symmetric positive definite.
			m := make([]float64, d*d)
			for i := range m {
				m[i] = rng.NormFloat64()
			}
			a := make([]float64, d*d)
			for i := 0; i < d; i++ {
				for j := 0; j < d; j++ {
					for k := 0; k < d; k++ {
						a[i*d+j] += m[k*d+i] * m[k*d+j]
					}
				}
				a[i*d+i]++
			}
			c := make([]float64, d)
			for i := range c {
				c[i] = rng.NormFloat64()
			}
			loc := func(x []float64) *optimize.Location {
				g := make([]float64, d)
				for i := 0; i < d; i++ {
					g[i] = c[i]
					for j := 0; j < d; j++ {
						g[i] += a[i*d+j] * x[j]
					}
				}
				return &optimize.Location{X: x, Gradient: g}
			}
			x := make([]float64, d)
			for i := range x {
				x[i] = rng.NormFloat64()
			}
			var own bfgsDirection
			ref := &optimize.BFGS{}
			d1, d2 := make([]float64, d), make([]float64, d)
			l := loc(x)
			s1, s2 := own.InitDirection(l, d1), ref.InitDirection(l, d2)
			for k := 0; k < 3*d; k++ {
				numtest.Scalar(t, "step", s1, s2, 0, 1e-12)
				numtest.Slice(t, "direction", d1, d2, 1e-10*floats.Norm(d2, 2), 1e-8)
				// Move a fraction of the way along the direction.
				xn := slices.Clone(l.X)
				floats.AddScaled(xn, 0.5*s2, d2)
				l = loc(xn)
				s1, s2 = own.NextDirection(l, d1), ref.NextDirection(l, d2)
			}
		})
	}
}
