package smoothing

import (
	"context"
	"math"
	"slices"

	"gonum.org/v1/gonum/optimize"
)

// The estimation searches run on gonum.org/v1/gonum/optimize. Settings
// leave Concurrent at 0 (one evaluation at a time) and set no Runtime
// limit, so a search is a deterministic function of its start point; the
// context is checked before every evaluation through Problem.Status.

// optimise minimises p.objective from x0: optimize.BFGS on the exact
// adjoint gradient (adjoint.go), restarted once from its end point with a
// fresh inverse Hessian when it stops without converging, and then, if it
// still has not converged (e.g. stalled along the edge of the model's
// domain), the fallback: the restarted Nelder–Mead simplex search of
// simplexRestarts from the BFGS end point followed by one more BFGS run
// from the simplex's end point. It returns the best point and value and
// whether the last search converged.
func (p *problem) optimise(ctx context.Context, x0 []float64) ([]float64, float64, bool, error) {
	d := len(x0)
	x := slices.Clone(x0)
	if d == 0 {
		return x, p.objective(x), true, nil
	}
	fx, converged, err := p.bfgs(ctx, x, 2)
	if p.stall > 0 {
		converged = false // test hook: the first BFGS runs were cut off
	}
	if err != nil || converged {
		return x, fx, converged, err
	}
	fx, converged, err = p.fallback(ctx, x, fx)
	return x, fx, converged, err
}

// fallback is the search run when BFGS stops without converging: the
// restarted simplex from x (value fx), then BFGS from the simplex's end
// point. x is overwritten with the best point.
func (p *problem) fallback(ctx context.Context, x []float64, fx float64) (float64, bool, error) {
	d := len(x)
	f, conv, err := simplexRestarts(ctx, p.objective, x, fx, p.steps(x), 1e-8, 2000*d, 1e-7, 0)
	if err != nil {
		return 0, false, err
	}
	xs := slices.Clone(x)
	fb, convB, err := p.bfgs(ctx, xs, 1)
	if err != nil {
		return 0, false, err
	}
	if fb < f {
		copy(x, xs)
		return fb, convB, nil
	}
	return f, conv, nil
}

// bfgs runs optimize.BFGS from x (overwritten with the end point) up to
// runs times, restarting with a fresh inverse Hessian while it stops
// without converging, and returns the value and whether it converged.
func (p *problem) bfgs(ctx context.Context, x []float64, runs int) (float64, bool, error) {
	d := len(x)
	// The adjoint pass yields the value and the gradient together, and
	// gonum asks for the gradient at the point whose value it has just
	// requested: Func evaluates both and keeps the gradient for Grad.
	cx := make([]float64, d)
	cg := make([]float64, d)
	fg := func(x []float64) float64 {
		copy(cx, x)
		return p.objectiveGrad(x, cg)
	}
	prob := optimize.Problem{
		Func: fg,
		Grad: func(g, x []float64) {
			if !slices.Equal(x, cx) {
				p.objectiveGrad(x, g)
				return
			}
			copy(g, cg)
		},
		Status: ctxStatus(ctx),
	}
	fx := fg(x)
	converged := false
	for run := 0; run < runs && !converged && fx < penalty; run++ {
		settings := &optimize.Settings{
			// The value and gradient at x are known (cx, cg).
			InitValues: &optimize.Location{F: fx, Gradient: slices.Clone(cg)},
			// Converged when two successive iterations improve the
			// objective by less than 1e-10 relative.
			Converger:       &optimize.FunctionConverge{Relative: 1e-10, Absolute: 1e-20, Iterations: 2},
			MajorIterations: 200 * d,
		}
		if p.maxIter > 0 {
			settings.MajorIterations = p.maxIter
		}
		if p.stall > 0 {
			settings.MajorIterations = p.stall
			p.stall = 0
			runs = 1
		}
		bfgs := &optimize.BFGS{GradStopThreshold: 1e-10 * (1 + math.Abs(fx))}
		res, err := optimize.Minimize(prob, x, settings, bfgs)
		if cerr := ctx.Err(); cerr != nil {
			return 0, false, cerr
		}
		if res == nil || !(res.F <= fx) {
			break
		}
		copy(x, res.X)
		fx = res.F
		converged = err == nil && convergedStatus(res.Status)
		if !converged {
			fx = fg(x) // refresh the cached gradient for the restart
		}
	}
	return fx, converged, nil
}

// ctxStatus returns a Problem.Status function that ends the search with
// the context's error once it is cancelled.
func ctxStatus(ctx context.Context) func() (optimize.Status, error) {
	return func() (optimize.Status, error) {
		if err := ctx.Err(); err != nil {
			return optimize.Failure, err
		}
		return optimize.NotTerminated, nil
	}
}

// convergedStatus reports whether a gonum status means a convergence
// criterion was met (rather than a limit or a failure).
func convergedStatus(s optimize.Status) bool {
	switch s {
	case optimize.FunctionConvergence, optimize.GradientThreshold, optimize.MethodConverge, optimize.StepConvergence, optimize.FunctionThreshold:
		return true
	}
	return false
}

// simplexRestarts minimises fn from x (overwritten with the best point,
// value fx) with optimize.NelderMead — the dimension-dependent
// coefficients of Gao & Han (2012) — from the simplex with edges steps
// along the axes. Each search stops when its best value has not improved
// by more than ftol·(1 + |f|) for 10·d iterations, or after maxEval
// evaluations. The search is restarted from its best point with a simplex
// of half the size while a restart improves the value by more than
// absGain + relGain·|f|, at most six times. It returns the best value and
// whether the last search converged.
func simplexRestarts(ctx context.Context, fn func([]float64) float64, x []float64, fx float64, steps []float64, ftol float64, maxEval int, absGain, relGain float64) (float64, bool, error) {
	d := len(x)
	verts := make([][]float64, d+1)
	vals := make([]float64, d+1)
	prob := optimize.Problem{Func: fn, Status: ctxStatus(ctx)}
	converged := false
	for restart := 0; restart < 6; restart++ {
		verts[0] = append(verts[0][:0], x...)
		vals[0] = fx
		for i := range d {
			verts[i+1] = append(verts[i+1][:0], x...)
			verts[i+1][i] += steps[i]
			vals[i+1] = fn(verts[i+1])
		}
		settings := &optimize.Settings{
			Converger:       &optimize.FunctionConverge{Relative: ftol, Absolute: ftol, Iterations: 10 * d},
			FuncEvaluations: maxEval,
		}
		nm := &optimize.NelderMead{InitialVertices: verts, InitialValues: vals}
		res, err := optimize.Minimize(prob, x, settings, nm)
		if cerr := ctx.Err(); cerr != nil {
			return 0, false, cerr
		}
		if res == nil || !(res.F <= fx) {
			break
		}
		converged = err == nil && convergedStatus(res.Status)
		gain := fx - res.F
		copy(x, res.X)
		fx = res.F
		if !(gain > absGain+relGain*math.Abs(fx)) {
			break
		}
		for i := range steps {
			steps[i] *= 0.5
		}
	}
	return fx, converged, nil
}

// steps returns the initial simplex edge per coordinate.
func (p *problem) steps(x []float64) []float64 {
	st := make([]float64, len(x))
	_, i := p.params(x)
	for k := 0; k < i; k++ {
		st[k] = 1
	}
	if p.estL {
		st[i] = 0.05*math.Abs(x[i]) + 0.01
		i++
	}
	if p.estT {
		st[i] = 0.1*math.Abs(x[i]) + 0.01
		if p.f.trend.multiplicative() {
			st[i] = 0.01
		}
		i++
	}
	for ; i < len(x); i++ {
		st[i] = 0.05
	}
	return st
}
