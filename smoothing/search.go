package smoothing

import (
	"context"
	"math"
	"slices"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/optimize"
)

// The estimation searches run on gonum.org/v1/gonum/optimize: BFGS through
// lineSearch in the calling goroutine, the simplex through Minimize with
// Concurrent 0 (one evaluation at a time) and no Runtime limit. A search
// is a deterministic function of its start point; the context is checked
// after every evaluation (for the simplex through Problem.Status).

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
	if p.ls == nil {
		p.ls = newLineSearch(d)
	}
	ls := p.ls
	// The value pass records what the gradient pass needs: the gradient
	// gonum asks for at the point whose value it has just requested costs
	// only the backward pass.
	fx := p.objectiveGrad(x, ls.g)
	copy(ls.cx, x)
	if p.h0 == nil && fx < penalty {
		p.h0 = p.curvature(x)
		ls.cx[0] = math.NaN() // the tape no longer holds x
	}
	ls.bfgs.diag = p.h0
	converged := false
	for run := 0; run < runs && !converged && fx < penalty; run++ {
		maxIter := 200 * d
		if p.maxIter > 0 {
			maxIter = p.maxIter
		}
		if p.stall > 0 {
			maxIter = p.stall
			p.stall = 0
			runs = 1
		}
		xe, fe, status, err := ls.run(ctx, p, x, fx, maxIter, 1e-10*(1+math.Abs(fx)))
		if cerr := ctx.Err(); cerr != nil {
			return 0, false, cerr
		}
		if !(fe <= fx) {
			break
		}
		copy(x, xe)
		fx = fe
		converged = err == nil && convergedStatus(status)
		if !converged {
			fx = p.objectiveGrad(x, ls.g) // refresh the gradient for the restart
			copy(ls.cx, x)
		}
	}
	return fx, converged, nil
}

// curvature returns the reciprocals of the diagonal of the objective's
// Hessian at x, estimated by forward differences of the adjoint gradient
// (step 1e-6·(1 + |x_k|); d + 1 gradient evaluations), for the diagonal
// of the BFGS searches' initial inverse Hessian. Curvatures are taken in
// absolute value and floored at 1e-6 of the largest (a coordinate whose
// step leaves the model's domain, where the gradient is zero, gets the
// large curvature |∂f/∂x_k|/step); a coordinate without a finite positive
// value gets 1.
//
// The scales of the coordinates differ by orders of magnitude — in
// ETS(M,Ad,M) on AirPassengers the curvatures at the first start range
// from about 10² for γ and φ to 10⁴ for the level and seasonal states and
// 8·10⁵ for the trend — which the identity start of BFGS, rescaled by one
// number after the first step, learns only over many iterations.
// Estimated once per problem, at the first start, this cut that fit's
// likelihood evaluations from 543 to 340 and its gradients from 486 to
// 305 with the estimate's included (the evaluation cost of the 390
// ets_estimated fixture problems fell by 5 to 23% per dimension), and
// moved end points as a different path through a non-convex likelihood
// does: of 25,116 ETS fits to M3 series, 388 reached a higher and 275 a
// lower maximum (1e-6 relative).
func (p *problem) curvature(x []float64) []float64 {
	d := len(x)
	g0 := make([]float64, 3*d)
	g1, out := g0[d:2*d], g0[2*d:]
	g0 = g0[:d]
	p.objectiveGrad(x, g0)
	xp := slices.Clone(x)
	mx := 0.0
	for k := range d {
		h := 1e-6 * (1 + math.Abs(x[k]))
		xp[k] = x[k] + h
		p.objectiveGrad(xp, g1)
		xp[k] = x[k]
		out[k] = math.Abs((g1[k] - g0[k]) / h)
		mx = math.Max(mx, out[k])
	}
	for k, c := range out {
		c = math.Max(c, 1e-6*mx)
		if !(c > 0) || math.IsInf(c, 0) {
			c = 1
		}
		out[k] = 1 / c
	}
	return out
}

// lineSearch drives gonum's optimize.LinesearchMethod with BFGS
// directions (bfgsDirection: optimize.BFGS's update on plain slices) and
// the optimize.Bisection line search in the calling goroutine. It
// performs the same evaluations and applies the same stopping rules, in
// the same order, as optimize.Minimize would for optimize.BFGS with
// Settings{InitValues, Converger: FunctionConverge, MajorIterations} and
// Concurrent 0 (TestLineSearchMatchesMinimize: the same end point bit for
// bit when given optimize.BFGS's directions), but without the three
// goroutines and the channel hand-offs Minimize sets up per call (about a
// third of the cost of the likelihood evaluations on ETS(M,Ad,M), by
// instruction counts). Its buffers are reused from one search to the
// next.
type lineSearch struct {
	bfgs   bfgsDirection
	next   optimize.NextDirectioner // &bfgs unless a test sets it
	bisect optimize.Bisection
	method optimize.LinesearchMethod
	conv   optimize.FunctionConverge
	loc    optimize.Location
	opt    []float64 // the location of the last major iteration
	g      []float64 // gradient at the start point
	cx     []float64 // the point of the last value evaluation (p.aw's tape)
}

func newLineSearch(d int) *lineSearch {
	buf := make([]float64, 5*d)
	next := func() []float64 { s := buf[:d:d]; buf = buf[d:]; return s }
	ls := &lineSearch{}
	ls.loc.X, ls.loc.Gradient, ls.opt, ls.g, ls.cx = next(), next(), next(), next(), next()
	return ls
}

// run minimises p's objective from x0 (value f0, gradient ls.g) with at
// most maxIter major iterations (the start counts as the first, as in
// Minimize) and returns the location and value of the last major
// iteration (owned by ls), the status and the error of the search.
func (ls *lineSearch) run(ctx context.Context, p *problem, x0 []float64, f0 float64, maxIter int, gradStop float64) ([]float64, float64, optimize.Status, error) {
	loc := &ls.loc
	copy(loc.X, x0)
	copy(loc.Gradient, ls.g)
	loc.F = f0
	copy(ls.opt, x0)
	fopt := f0
	if err := ctx.Err(); err != nil {
		return ls.opt, fopt, optimize.Failure, err
	}
	if math.IsInf(f0, 1) || math.IsNaN(f0) {
		return ls.opt, fopt, optimize.Failure, optimize.ErrFunc(f0)
	}
	for i, v := range loc.Gradient {
		if math.IsInf(v, 0) || math.IsNaN(v) {
			return ls.opt, fopt, optimize.Failure, optimize.ErrGrad{Grad: v, Index: i}
		}
	}
	ls.conv = optimize.FunctionConverge{Relative: 1e-10, Absolute: 1e-20, Iterations: 2}
	ls.conv.Init(len(x0))
	// The start is the first major iteration.
	iter := 1
	if st := ls.major(loc, iter, maxIter); st != optimize.NotTerminated {
		return ls.opt, fopt, st, nil
	}
	ls.bisect = optimize.Bisection{}
	if ls.next == nil {
		ls.next = &ls.bfgs
	}
	// Set the fields rather than the struct: Init keeps the method's
	// buffers when they are large enough.
	ls.method.NextDirectioner, ls.method.Linesearcher = ls.next, &ls.bisect
	op, err := ls.method.Init(loc)
	for {
		if err != nil {
			return ls.opt, fopt, optimize.Failure, err
		}
		switch {
		case op == optimize.MajorIteration:
			copy(ls.opt, loc.X)
			fopt = loc.F
			iter++
			if st := ls.major(loc, iter, maxIter); st != optimize.NotTerminated {
				return ls.opt, fopt, st, nil
			}
			if floats.Norm(loc.Gradient, math.Inf(1)) < gradStop {
				return ls.opt, fopt, optimize.GradientThreshold, nil
			}
		case op&(optimize.FuncEvaluation|optimize.GradEvaluation) == op && op != optimize.NoOperation:
			if op&optimize.FuncEvaluation != 0 {
				copy(ls.cx, loc.X)
				loc.F = p.value(loc.X)
			}
			if op&optimize.GradEvaluation != 0 {
				if !slices.Equal(loc.X, ls.cx) {
					copy(ls.cx, loc.X)
					p.value(loc.X)
				}
				p.gradient(loc.X, loc.Gradient)
			}
			if err := ctx.Err(); err != nil {
				return ls.opt, fopt, optimize.Failure, err
			}
		default:
			panic("smoothing: unexpected operation from the line search") // internal invariant
		}
		op, err = ls.method.Iterate(loc)
	}
}

// major applies Minimize's checks at a major iteration: a value of −∞,
// the function-value convergence test and the iteration limit.
func (ls *lineSearch) major(loc *optimize.Location, iter, maxIter int) optimize.Status {
	if math.IsInf(loc.F, -1) {
		return optimize.FunctionNegativeInfinity
	}
	if st := ls.conv.Converged(loc); st != optimize.NotTerminated {
		return st
	}
	if iter >= maxIter {
		return optimize.IterationLimit
	}
	return optimize.NotTerminated
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
