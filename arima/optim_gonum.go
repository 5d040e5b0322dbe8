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
// (TestReference) and BenchmarkOptimizer compares them.
var useGonum = true

// gonumMinimize minimises f from x0 with optimize.Minimize and
// optimize.BFGS (its default bisection line search), with the same
// forward-difference gradient (step 10⁻⁷) as quasiNewton and a relative
// convergence test on f: stop after an iteration that improves f by no
// more than relTol·|f| (+ relTol²). The settings leave Concurrent at 0 and
// set no Runtime limit, so the result is deterministic; ctx is checked
// through Problem.Status at every evaluation. It returns the minimiser,
// the minimum and whether the convergence test was met.
//
// The variables are z = (x − x0)/σ with σ = |∇f(x0)|. BFGS is invariant
// to this uniform scaling except for its first step, which has unit
// length in z: the first step in x is then −∇f(x0), as in quasiNewton
// (Nash's method), instead of a step of unit length. From a start close
// to the optimum (the CSS estimate) a unit step overshoots, and each
// trial of the line search costs a gradient (n + 1 evaluations); with the
// scaling the ML fit of an ARIMA(1,1,1) with drift on 14 400 values needs
// about as many evaluations as quasiNewton.
func gonumMinimize(ctx context.Context, f func([]float64) float64, x0 []float64, o optSettings) ([]float64, float64, bool, error) {
	n := len(x0)
	const h = 1e-7 // as quasiNewton
	f0 := f(x0)
	if math.IsNaN(f0) || math.IsInf(f0, 0) || f0 >= badObjective {
		return nil, 0, false, fmt.Errorf("objective not finite at the starting values")
	}
	xp := make([]float64, n)
	// gradX writes the forward-difference gradient of f at x (value fx)
	// into g.
	gradX := func(g, x []float64, fx float64) {
		copy(xp, x)
		for i := range x {
			xp[i] = x[i] + h
			g[i] = (f(xp) - fx) / h
			xp[i] = x[i]
		}
	}
	g0 := make([]float64, n)
	gradX(g0, x0, f0)
	sigma := 0.0
	for _, v := range g0 {
		sigma = math.Hypot(sigma, v)
	}
	if !(sigma > 0) || math.IsInf(sigma, 0) {
		sigma = 1
	}
	// x(z) = x0 + σz, in a buffer; the gradient at the point last
	// evaluated reuses its value, so that a gradient costs n evaluations.
	x := make([]float64, n)
	toX := func(z []float64) []float64 {
		for i := range z {
			x[i] = x0[i] + sigma*z[i]
		}
		return x
	}
	lastZ := make([]float64, n)
	lastF := math.NaN()
	fn := func(z []float64) float64 {
		v := f(toX(z))
		if math.IsNaN(v) || math.IsInf(v, 0) {
			v = badObjective
		}
		copy(lastZ, z)
		lastF = v
		return v
	}
	grad := func(g, z []float64) {
		fz := lastF
		same := !math.IsNaN(fz)
		for i := range z {
			if z[i] != lastZ[i] {
				same = false
				break
			}
		}
		if !same {
			fz = fn(z)
		}
		gradX(g, toX(z), fz)
		for i := range g {
			g[i] *= sigma
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
	init := &optimize.Location{F: f0, Gradient: make([]float64, n)}
	for i, v := range g0 {
		init.Gradient[i] = sigma * v
	}
	settings := &optimize.Settings{
		InitValues:      init,
		Converger:       &optimize.FunctionConverge{Relative: o.relTol, Absolute: o.relTol * o.relTol, Iterations: 1},
		MajorIterations: o.maxIter,
	}
	res, err := optimize.Minimize(p, make([]float64, n), settings, &optimize.BFGS{})
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
	return append([]float64(nil), toX(res.X)...), res.F, converged, nil
}
