package arima

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// badObjective is returned by an objective where the likelihood does not
// exist (a non-stationary AR part with untransformed parameters); it is
// far above any attainable value.
const badObjective = 1e10

// problem holds one fit's data and the workspace of its objectives. The
// objectives (mlObjective, cssObjective) do not allocate.
type problem struct {
	lay   *layout
	y     []float64   // the series, NaN = missing
	x     [][]float64 // regression columns, in coefficient order
	n     int
	nUsed int // non-missing observations minus d + s·D
	ncond int // CSS conditioning: d + s·D + p + s·P

	base  []float64 // coefficient vector with fixed values filled in
	coef  []float64 // scratch coefficient vector
	free  []int     // indices of estimated coefficients
	scale []float64 // parameter scale of each free coefficient
	// rot, when not nil, is the orthogonal matrix V (nr×nr, row-major) of
	// the singular value decomposition of the regression columns: the
	// last nr free parameters are then coordinates in that basis,
	// β = V (x ∘ scale), which decorrelates them (as R's arima does).
	rot []float64
	tmp []float64
	// whether the AR / seasonal AR block is estimated through the PACF
	// transform (only when every coefficient of the block is free)
	transAR, transSAR bool

	phi, theta, w, work []float64
	kal                 kalman
	css                 cssWork
}

func newProblem(lay *layout, y []float64, x [][]float64, fixed map[string]float64, prior Prior) *problem {
	pr := &problem{lay: lay, y: y, x: x, n: len(y)}
	nobs := 0
	for _, v := range y {
		if !math.IsNaN(v) {
			nobs++
		}
	}
	nd := lay.d + lay.s*lay.sd
	pr.nUsed = nobs - nd
	pf, qf := lay.fullLengths()
	pr.ncond = nd + pf
	k := lay.ncoef()
	pr.base = make([]float64, k)
	pr.coef = make([]float64, k)
	for i, name := range lay.names {
		if v, ok := fixed[name]; ok {
			pr.base[i] = v
		} else {
			pr.free = append(pr.free, i)
		}
	}
	pr.scale = make([]float64, len(pr.free))
	for i := range pr.scale {
		pr.scale[i] = 1
	}
	blockFree := func(off, n int) bool {
		if n == 0 {
			return false
		}
		for i := off; i < off+n; i++ {
			if _, ok := fixed[lay.names[i]]; ok {
				return false
			}
		}
		return true
	}
	pr.transAR = blockFree(lay.arOff(), lay.p)
	pr.transSAR = blockFree(lay.sarOff(), lay.sp)
	pr.phi = make([]float64, pf)
	pr.theta = make([]float64, qf)
	pr.w = make([]float64, pr.n)
	pr.work = make([]float64, max(lay.p, lay.sp))
	pr.kal.exact = prior == DiffusePrior
	pr.kal.resize(pf, qf, lay.delta())
	pr.css.resize(pr.n, pf, qf)
	return pr
}

// coefFrom writes the full coefficient vector for the free parameters x
// into pr.coef (through the PACF transform of the AR blocks when trans).
func (pr *problem) coefFrom(x []float64, trans bool) []float64 {
	c := pr.coef
	copy(c, pr.base)
	for i, idx := range pr.free {
		c[idx] = x[i] * pr.scale[i]
	}
	if pr.rot != nil {
		nr := len(pr.tmp)
		r0 := len(pr.free) - nr
		na := pr.lay.narma()
		for i := 0; i < nr; i++ {
			s := 0.0
			for j := 0; j < nr; j++ {
				s += pr.rot[i*nr+j] * x[r0+j] * pr.scale[r0+j]
			}
			pr.tmp[i] = s
		}
		copy(c[na:na+nr], pr.tmp)
	}
	if trans {
		l := pr.lay
		if pr.transAR {
			b := c[l.arOff() : l.arOff()+l.p]
			pacfToAR(b, b, pr.work)
		}
		if pr.transSAR {
			b := c[l.sarOff() : l.sarOff()+l.sp]
			pacfToAR(b, b, pr.work)
		}
	}
	return c
}

// paramsFrom is the inverse of coefFrom. It returns false when trans is
// set and an AR block is not stationary.
func (pr *problem) paramsFrom(coef []float64, trans bool) ([]float64, bool) {
	c := append([]float64(nil), coef...)
	if trans {
		l := pr.lay
		if pr.transAR {
			b := c[l.arOff() : l.arOff()+l.p]
			if !arToPACF(b, append([]float64(nil), b...)) {
				return nil, false
			}
		}
		if pr.transSAR {
			b := c[l.sarOff() : l.sarOff()+l.sp]
			if !arToPACF(b, append([]float64(nil), b...)) {
				return nil, false
			}
		}
	}
	x := make([]float64, len(pr.free))
	for i, idx := range pr.free {
		x[i] = c[idx] / pr.scale[i]
	}
	if pr.rot != nil {
		nr := len(pr.tmp)
		r0 := len(pr.free) - nr
		na := pr.lay.narma()
		for j := 0; j < nr; j++ {
			s := 0.0
			for i := 0; i < nr; i++ {
				s += pr.rot[i*nr+j] * c[na+i]
			}
			x[r0+j] = s / pr.scale[r0+j]
		}
	}
	return x, true
}

// adjust writes y − X β into pr.w.
func (pr *problem) adjust(c []float64) {
	copy(pr.w, pr.y)
	na := pr.lay.narma()
	for j, col := range pr.x {
		b := c[na+j]
		if b == 0 {
			continue
		}
		for t, v := range col {
			pr.w[t] -= b * v
		}
	}
}

// likelihood runs the Kalman filter at coefficients c (resid may be nil).
// ok is false when the AR part is not stationary.
func (pr *problem) likelihood(c []float64, resid []float64) (filterResult, bool) {
	pr.lay.expand(c, pr.phi, pr.theta)
	pr.kal.setARMA(pr.phi, pr.theta)
	pr.adjust(c)
	if !pr.kal.initFor(pr.kal.chandrasekhar(pr.w, resid)) {
		return filterResult{}, false
	}
	return pr.kal.filter(pr.w, resid), true
}

// mlObjective is ½(log(ssq/ν) + Σ log F_t/ν), the exact negative
// log-likelihood per observation with σ² concentrated out, minus
// constants (the objective R's arima minimises).
func (pr *problem) mlObjective(x []float64, trans bool) float64 {
	c := pr.coefFrom(x, trans)
	res, ok := pr.likelihood(c, nil)
	if !ok || res.nu == 0 {
		return badObjective
	}
	v := 0.5 * (math.Log(res.ssq/float64(res.nu)) + res.sumlog/float64(res.nu))
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return badObjective
	}
	return v
}

// cssObjective is ½ log(ssq/ν) of the conditional residuals.
func (pr *problem) cssObjective(x []float64) float64 {
	c := pr.coefFrom(x, false)
	ssq, nu := pr.cssAt(c)
	v := 0.5 * math.Log(ssq/float64(nu))
	if nu == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return badObjective
	}
	return v
}

func (pr *problem) cssAt(c []float64) (float64, int) {
	l := pr.lay
	l.expand(c, pr.phi, pr.theta)
	pr.adjust(c)
	return pr.css.cssResiduals(pr.w, pr.phi, pr.theta, l.d, l.sd, l.s, pr.ncond)
}

// optSettings are the stopping rules of one minimisation.
type optSettings struct {
	relTol  float64 // stop when a step improves f by ≤ relTol·(|f|+relTol)
	maxIter int     // gradient evaluations allowed

	// then, when not nil, are the rules of a second stage: where the
	// rules above stop the maximum-likelihood run, fitWith builds the
	// fitted model there and hands it to decide; if decide returns true
	// the same run goes on under *then. The path is the one a run under
	// *then from the start follows (the stopping rules do not steer the
	// minimiser), so the final fit is the one fitWith gives with *then,
	// bit for bit, without repeating the first stage's evaluations.
	then   *optSettings
	decide func(*Fitted) bool
}

// staged returns o with a second stage (see optSettings.then).
func (o optSettings) staged(then optSettings, decide func(*Fitted) bool) optSettings {
	o.then, o.decide = &then, decide
	return o
}

var (
	// fullOpt is used by Spec.Fit and for the model a Search returns.
	fullOpt = optSettings{relTol: 1e-10, maxIter: 200}
	// searchOpt ranks the candidates of a Search: the ML iterations stop
	// once one improves the objective by less than 1e-6 of its value. The
	// ML run follows the path of the full one (same start, same method)
	// and stops earlier, so its criterion value is never below the full
	// one's; on the test datasets it is at most 1.3 above it (on ridges of
	// over-parameterised models). Every candidate that comes within
	// confirmMargin (2) of the best is refitted with fullOpt before it is
	// compared (see Search; TestSearchStoppingRules checks that the choice
	// is the one made with fullOpt throughout).
	searchOpt = optSettings{relTol: 1e-6, maxIter: 100}
)

// minimize runs the quasi-Newton minimiser on f from x0. With o.then
// set and checkpoint not nil, checkpoint is called with the minimiser
// and convergence flag where the rules of o stop; when it returns true
// the minimisation continues under *o.then (see optSettings.then).
// checkpoint is not called when the run ends before that point (a
// failed line search, an error): the result is then that of both
// stages.
func minimize(ctx context.Context, f func([]float64) float64, x0 []float64, o optSettings, checkpoint func(x []float64, converged bool) bool) (x []float64, fmin float64, converged bool, err error) {
	if o.then == nil {
		checkpoint = nil
	}
	if useGonum {
		x, fmin, converged, err = gonumMinimize(ctx, f, x0, o, checkpoint)
	} else {
		q := newQuasiNewton(len(x0))
		q.relTol, q.maxIter = o.relTol, o.maxIter
		x, fmin, converged, err = q.minimize(ctx, f, x0)
		if err == nil && checkpoint != nil && checkpoint(x, converged) {
			// This minimiser cannot resume: the second stage runs again
			// from the start (along the same path).
			q = newQuasiNewton(len(x0))
			q.relTol, q.maxIter = o.then.relTol, o.then.maxIter
			x, fmin, converged, err = q.minimize(ctx, f, x0)
		}
	}
	if ctxErr := ctx.Err(); ctxErr != nil {
		return nil, 0, false, fmt.Errorf("arima: %w", ctxErr)
	}
	if err == nil && (math.IsNaN(fmin) || math.IsInf(fmin, 0)) {
		err = errors.New("no finite optimum")
	}
	return x, fmin, converged, err
}

// hessian returns the central-difference Hessian of f at x with step h.
func hessian(f func([]float64) float64, x []float64, h float64) *mat.SymDense {
	n := len(x)
	H := mat.NewSymDense(n, nil)
	xp := append([]float64(nil), x...)
	f0 := f(xp)
	for i := 0; i < n; i++ {
		xp[i] = x[i] + h
		fp := f(xp)
		xp[i] = x[i] - h
		fm := f(xp)
		xp[i] = x[i]
		H.SetSym(i, i, (fp-2*f0+fm)/(h*h))
		for j := 0; j < i; j++ {
			xp[i], xp[j] = x[i]+h, x[j]+h
			fpp := f(xp)
			xp[j] = x[j] - h
			fpm := f(xp)
			xp[i] = x[i] - h
			fmm := f(xp)
			xp[j] = x[j] + h
			fmp := f(xp)
			xp[i], xp[j] = x[i], x[j]
			H.SetSym(i, j, (fpp-fpm-fmp+fmm)/(4*h*h))
		}
	}
	return H
}

// hessStep is the step of the numerical Hessian used for standard errors,
// in scaled parameter units (the default step of R's optim, 1e-3).
const hessStep = 1e-3

// covariance returns the covariance matrix of the free coefficients,
// inv(H·nUsed) with H the Hessian of objective f in coefficient units, or
// nil when H is not positive definite.
func (pr *problem) covariance(f func([]float64) float64, x []float64) *mat.SymDense {
	k := len(x)
	if k == 0 {
		return nil
	}
	H := hessian(f, x, hessStep)
	H.ScaleSym(float64(pr.nUsed), H)
	var ch mat.Cholesky
	if !ch.Factorize(H) {
		return nil
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return nil
	}
	// Map back to coefficient units: cov = J inv(nH) J' with J the
	// Jacobian of the coefficients in the parameters.
	J := mat.NewDense(k, k, nil)
	for i := 0; i < k; i++ {
		J.Set(i, i, pr.scale[i])
	}
	if pr.rot != nil {
		nr := len(pr.tmp)
		r0 := k - nr
		for i := 0; i < nr; i++ {
			for j := 0; j < nr; j++ {
				J.Set(r0+i, r0+j, pr.rot[i*nr+j]*pr.scale[r0+j])
			}
		}
	}
	var tmp, full mat.Dense
	tmp.Mul(J, &inv)
	full.Mul(&tmp, J.T())
	out := mat.NewSymDense(k, nil)
	for i := 0; i < k; i++ {
		for j := 0; j <= i; j++ {
			out.SetSym(i, j, 0.5*(full.At(i, j)+full.At(j, i)))
		}
	}
	return out
}

// differenced returns v after d ordinary and sd seasonal differences
// (length len(v) − d − s·sd).
func differenced(v []float64, d, sd, s int) []float64 {
	w := append([]float64(nil), v...)
	for range d {
		for i := len(w) - 1; i > 0; i-- {
			w[i] -= w[i-1]
		}
		w = w[1:]
	}
	for range sd {
		for i := len(w) - 1; i >= s; i-- {
			w[i] -= w[i-s]
		}
		w = w[s:]
	}
	return w
}

// regressionStart checks the regression columns for collinearity (after
// the model's differencing) and returns least-squares starting values and
// their standard errors (for the parameter scale). With rotate it also
// returns the right singular vectors V of the (undifferenced, observed
// rows of the) regression columns, and the standard errors are those of
// the coordinates in that basis.
func regressionStart(lay *layout, y []float64, x [][]float64, rotate bool) (beta, se, rot []float64, err error) {
	k := len(x)
	if k == 0 {
		return nil, nil, nil, nil
	}
	if rotate {
		var rows []int
		for t, v := range y {
			if !math.IsNaN(v) {
				rows = append(rows, t)
			}
		}
		if len(rows) >= k {
			X := mat.NewDense(len(rows), k, nil)
			for i, t := range rows {
				for j := range x {
					X.Set(i, j, x[j][t])
				}
			}
			var svd mat.SVD
			if svd.Factorize(X, mat.SVDThin) {
				var v mat.Dense
				svd.VTo(&v)
				rot = make([]float64, k*k)
				for i := 0; i < k; i++ {
					for j := 0; j < k; j++ {
						rot[i*k+j] = v.At(i, j)
					}
				}
			}
		}
	}
	names := lay.names[lay.narma():]
	dy := differenced(y, lay.d, lay.sd, lay.s)
	dx := make([][]float64, k)
	for j := range x {
		dx[j] = differenced(x[j], lay.d, lay.sd, lay.s)
	}
	rows := []int{}
	for t, v := range dy {
		if !math.IsNaN(v) {
			rows = append(rows, t)
		}
	}
	if len(rows) <= k {
		// Too few differenced rows: fall back to the undifferenced data.
		dy, dx, rows = y, x, rows[:0]
		for t, v := range y {
			if !math.IsNaN(v) {
				rows = append(rows, t)
			}
		}
		if len(rows) <= k {
			return nil, nil, nil, fmt.Errorf("arima: %w: %d regression coefficients need more than %d observations", almanac.ErrTooShort, k, len(rows))
		}
	}
	m := len(rows)
	X := mat.NewDense(m, k, nil)
	Y := mat.NewVecDense(m, nil)
	for i, t := range rows {
		Y.SetVec(i, dy[t])
		for j := range dx {
			X.Set(i, j, dx[j][t])
		}
	}
	if err := collinearity(X, names, lay); err != nil {
		return nil, nil, nil, err
	}
	var qr mat.QR
	qr.Factorize(X)
	var b mat.VecDense
	if err := qr.SolveVecTo(&b, false, Y); err != nil {
		return nil, nil, nil, fmt.Errorf("arima: %w: least-squares start failed: %v", ErrCollinear, err)
	}
	var fit mat.VecDense
	fit.MulVec(X, &b)
	ssr := 0.0
	for i := 0; i < m; i++ {
		r := Y.AtVec(i) - fit.AtVec(i)
		ssr += r * r
	}
	s2 := ssr / float64(max(m-k, 1))
	if rot != nil {
		var xr mat.Dense
		xr.Mul(X, mat.NewDense(k, k, rot))
		X = &xr
	}
	var xtx mat.SymDense
	xtx.SymOuterK(1, X.T())
	var ch mat.Cholesky
	se = make([]float64, k)
	beta = make([]float64, k)
	for j := range beta {
		beta[j] = b.AtVec(j)
	}
	if ch.Factorize(&xtx) {
		var inv mat.SymDense
		if ch.InverseTo(&inv) == nil {
			for j := range se {
				se[j] = math.Sqrt(s2 * inv.At(j, j))
			}
		}
	}
	return beta, se, rot, nil
}

// collinearity reports, by name, a column of X that is zero or a linear
// combination of the columns before it (modified Gram–Schmidt with
// re-orthogonalisation, relative tolerance 1e-9).
func collinearity(X *mat.Dense, names []string, lay *layout) error {
	m, k := X.Dims()
	basis := make([][]float64, 0, k)
	var kept []string
	for j := 0; j < k; j++ {
		v := make([]float64, m)
		mat.Col(v, j, X)
		norm0 := mat.Norm(mat.NewVecDense(m, v), 2)
		if norm0 == 0 {
			if lay.d+lay.sd > 0 {
				return fmt.Errorf("arima: %w: regressor %q is constant, and the differencing of %s removes it", ErrCollinear, names[j], lay.orders())
			}
			return fmt.Errorf("arima: %w: regressor %q is zero on every observed time", ErrCollinear, names[j])
		}
		for range 2 {
			for _, b := range basis {
				dot := 0.0
				for i := range v {
					dot += v[i] * b[i]
				}
				for i := range v {
					v[i] -= dot * b[i]
				}
			}
		}
		norm := mat.Norm(mat.NewVecDense(m, v), 2)
		if norm <= 1e-9*norm0 {
			if len(kept) == 0 {
				return fmt.Errorf("arima: %w: regressor %q is degenerate", ErrCollinear, names[j])
			}
			return fmt.Errorf("arima: %w: regressor %q is a linear combination of %s (after the differencing of %s)", ErrCollinear, names[j], quoteJoin(kept), lay.orders())
		}
		for i := range v {
			v[i] /= norm
		}
		basis = append(basis, v)
		kept = append(kept, names[j])
	}
	return nil
}

func quoteJoin(s []string) string {
	q := make([]string, len(s))
	for i, v := range s {
		q[i] = fmt.Sprintf("%q", v)
	}
	return strings.Join(q, ", ")
}
