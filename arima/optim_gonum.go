package arima

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"
)

// useGonum selects gonum's optimize.BFGS (the default) for every
// minimisation, ML and CSS; false selects quasiNewton (optim.go), kept as
// a cross-check: the reference fixtures are run with both
// (TestReferenceQuasiNewton) and BenchmarkOptimizer compares them.
var useGonum = true

// gonumMinimize minimises f from x0 with optimize.Minimize and
// optimize.BFGS (its default bisection line search), with the same
// forward-difference gradient (step q.h) as quasiNewton and a relative
// convergence test on f: stop after an iteration that improves f by no
// more than relTol·|f| (+ relTol²). The settings leave Concurrent at 0 and
// set no Runtime limit, so the result is deterministic; ctx is checked
// through Problem.Status at every evaluation. It returns the minimiser,
// the minimum and whether the convergence test was met.
func gonumMinimize(ctx context.Context, f func([]float64) float64, x0 []float64, o optSettings) ([]float64, float64, bool, error) {
	n := len(x0)
	const h = 1e-7 // as quasiNewton
	// The gradient at the point last evaluated reuses its value, so that a
	// gradient costs n evaluations, as in quasiNewton.
	lastX := make([]float64, n)
	lastF := math.NaN()
	xp := make([]float64, n)
	fn := func(x []float64) float64 {
		v := f(x)
		if math.IsNaN(v) || math.IsInf(v, 0) {
			v = badObjective
		}
		copy(lastX, x)
		lastF = v
		return v
	}
	grad := func(g, x []float64) {
		fx := lastF
		same := !math.IsNaN(fx)
		for i := range x {
			if x[i] != lastX[i] {
				same = false
				break
			}
		}
		if !same {
			fx = fn(x)
		}
		copy(xp, x)
		for i := range x {
			xp[i] = x[i] + h
			g[i] = (f(xp) - fx) / h
			xp[i] = x[i]
		}
	}
	p := optimize.Problem{
		Func: fn,
		Grad: grad,
		Status: func() (optimize.Status, error) {
			if err := ctx.Err(); err != nil {
				return optimize.Failure, err
			}
			return optimize.NotTerminated, nil
		},
	}
	settings := &optimize.Settings{
		Converger:       &optimize.FunctionConverge{Relative: o.relTol, Absolute: o.relTol * o.relTol, Iterations: 1},
		MajorIterations: o.maxIter,
	}
	if v := f(x0); math.IsNaN(v) || math.IsInf(v, 0) || v >= badObjective {
		return nil, 0, false, fmt.Errorf("objective not finite at the starting values")
	}
	res, err := optimize.Minimize(p, x0, settings, &optimize.BFGS{})
	if ctxErr := ctx.Err(); ctxErr != nil {
		return nil, 0, false, ctxErr
	}
	if res == nil {
		return nil, 0, false, err
	}
	// A failed line search near the optimum is the usual way BFGS ends
	// with a numerical gradient; the best point found is still the
	// result, as with quasiNewton.
	converged := res.Status == optimize.FunctionConvergence || res.Status == optimize.GradientThreshold
	if err != nil && res.Status != optimize.Failure {
		return nil, 0, false, err
	}
	return append([]float64(nil), res.X...), res.F, converged, nil
}
