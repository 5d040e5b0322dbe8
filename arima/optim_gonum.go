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
//
// With checkpoint not nil (and o.then set) the stopping rules are staged
// (stagedConverge): where those of o stop, checkpoint is called with the
// point and whether the test was met, and a true result lets the run go
// on under o.then.
func gonumMinimize(ctx context.Context, f func([]float64) float64, x0 []float64, o optSettings, checkpoint func(x []float64, converged bool) bool) ([]float64, float64, bool, error) {
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
	if checkpoint != nil {
		xc := make([]float64, n)
		settings.MajorIterations = 0 // counted by the converger
		settings.Converger = &stagedConverge{
			first:  optimize.FunctionConverge{Relative: o.relTol, Absolute: o.relTol * o.relTol, Iterations: 1},
			second: optimize.FunctionConverge{Relative: o.then.relTol, Absolute: o.then.relTol * o.then.relTol, Iterations: 1},
			max1:   o.maxIter, max2: o.then.maxIter,
			at: func(z []float64, st optimize.Status) bool {
				for i := range z {
					xc[i] = x0[i] + sigma*z[i]
				}
				return checkpoint(xc, st == optimize.FunctionConvergence)
			},
		}
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

// stagedConverge is the convergence test of a minimisation in two
// stages: the relative function test and iteration limit of the first
// stage, then, if at allows it, those of the second. Both tests see every
// major iteration, so the second stops where it would have stopped on
// its own; the iteration limits are applied here, after the function
// test, in the order of optimize.Minimize's own check (which is switched
// off by a zero Settings.MajorIterations). The minimiser's path does not
// depend on the test, so a run that continues into the second stage is
// the run the second stage's rules alone give.
type stagedConverge struct {
	first, second optimize.FunctionConverge
	max1, max2    int
	at            func(z []float64, st optimize.Status) bool

	iter     int
	promoted bool
}

func (s *stagedConverge) Init(dim int) {
	s.first.Init(dim)
	s.second.Init(dim)
	s.iter, s.promoted = 0, false
}

func (s *stagedConverge) Converged(l *optimize.Location) optimize.Status {
	s.iter++
	st1 := s.first.Converged(l)
	st2 := s.second.Converged(l)
	if !s.promoted {
		if st1 == optimize.NotTerminated && s.max1 > 0 && s.iter >= s.max1 {
			st1 = optimize.IterationLimit
		}
		if st1 == optimize.NotTerminated {
			return st1
		}
		if !s.at(l.X, st1) {
			return st1
		}
		s.promoted = true
	}
	if st2 == optimize.NotTerminated && s.max2 > 0 && s.iter >= s.max2 {
		st2 = optimize.IterationLimit
	}
	return st2
}
