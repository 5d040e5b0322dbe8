package arima

import (
	"context"
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

func (s Spec) fit(ctx context.Context, y almanac.Series) (*Fitted, error) {
	return s.fitWith(ctx, y, fullOpt)
}

// fitWith is fit with the given stopping rules of the minimiser.
func (s Spec) fitWith(ctx context.Context, y almanac.Series, o optSettings) (*Fitted, error) {
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("arima: %w", err)
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("arima: %w", err)
	}
	given := s
	var tm *timed
	if len(s.Calendar.Effects) > 0 {
		var err error
		if s.Regressors, s.Fixed, tm, err = expandCalendar(s.Calendar, s.Regressors, s.Fixed, y); err != nil {
			return nil, err
		}
	}
	lay, err := s.resolve(y)
	if err != nil {
		return nil, err
	}
	if y.IsConstant() {
		return nil, fmt.Errorf("arima: %w: series %q is constant, the innovation variance would be zero", almanac.ErrConstant, y.Key)
	}
	n := y.Len()
	x := make([][]float64, 0, lay.nreg())
	if lay.mean {
		col := make([]float64, n)
		for i := range col {
			col[i] = 1
		}
		x = append(x, col)
	}
	if lay.drift {
		col := make([]float64, n)
		for i := range col {
			col[i] = float64(i + 1)
		}
		x = append(x, col)
	}
	// Each regressor column is divided by a power of two near its largest
	// |value| (exact), so that the regression part of the problem does not
	// depend on the columns' units: with a mean and a regressor of
	// magnitude 1e10 the least-squares start and the rotated parameters
	// were so ill-conditioned that the optimiser stopped at a visibly
	// lower likelihood. colScale holds the divisor of each regression
	// coefficient's column (1 for mean and drift); fitted coefficients are
	// divided by it at the end. f.x keeps the columns as given.
	xGiven := append([][]float64(nil), x...)
	colScale := make([]float64, lay.nreg())
	for j := range colScale {
		colScale[j] = 1
	}
	for _, r := range s.Regressors {
		col := append([]float64(nil), r.Values...)
		// A copy: Spec promises not to keep the caller's slices.
		xGiven = append(xGiven, append([]float64(nil), r.Values...))
		sj := columnScale(col)
		for i := range col {
			col[i] /= sj
		}
		colScale[len(x)] = sj
		x = append(x, col)
	}
	// Work on y/c with c a power of two near the largest |y| (exact in
	// floating point), so that neither tiny nor huge data overflow the
	// sums of squares; results are scaled back at the end. Regression
	// coefficients (and their fixed values) scale with y.
	yv := y.Slice()
	c := dataScale(yv)
	if math.IsInf(c, 1) {
		// Within a factor 2 of the largest float64 the differencing and
		// forecast recursions (sums of several values) overflow.
		return nil, fmt.Errorf("arima: %w: series %q has a value of magnitude 2^1023 (about 9e307) or more; the differencing and forecast arithmetic would overflow (rescale the series)", almanac.ErrNonFinite, y.Key)
	}
	for i := range yv {
		yv[i] /= c
	}
	fixed := make(map[string]float64, len(s.Fixed))
	for name, v := range s.Fixed {
		if i := lay.index(name); i >= lay.narma() {
			v = v / c * colScale[i-lay.narma()]
		}
		fixed[name] = v
	}
	pr := newProblem(lay, yv, x, fixed, s.Prior)
	k := len(pr.free)
	nd := lay.d + lay.s*lay.sd
	if pr.nUsed < k+2 {
		return nil, fmt.Errorf("arima: %w: %s with %d estimated coefficients needs at least %d observed values after %d lost to differencing, have %d", almanac.ErrTooShort, lay.orders(), k, k+2, nd, max(pr.nUsed, 0))
	}
	missing := y.Missing() > 0
	method := s.Method
	if method == CSS {
		if err := y.CheckComplete(); err != nil {
			return nil, fmt.Errorf("arima: method CSS: %w", err)
		}
	}
	if method != ML && !missing && n-pr.ncond < k+1 {
		if method == CSS {
			return nil, fmt.Errorf("arima: %w: CSS for %s conditions on %d values and estimates %d coefficients, have %d observations", almanac.ErrTooShort, lay.orders(), pr.ncond, k, n)
		}
		method = ML
	}
	if method == CSSThenML && missing {
		method = ML
	}

	// Starting values: zero ARMA coefficients, least squares for the
	// regression part (on the differenced data), with the parameter scale
	// 10 standard errors of that fit.
	na := lay.narma()
	start := append([]float64(nil), pr.base...)
	if len(x) > 0 {
		// Rotate the regression coordinates (SVD basis) when there are two
		// or more regression columns and none is fixed.
		rotate := len(x) >= 2
		for _, name := range lay.names[na:] {
			if _, ok := s.Fixed[name]; ok {
				rotate = false
			}
		}
		beta, se, rot, err := regressionStart(lay, yv, x, rotate)
		if err != nil {
			return nil, err
		}
		if rot != nil {
			pr.rot = rot
			pr.tmp = make([]float64, len(x))
		}
		for i, idx := range pr.free {
			if idx >= na {
				start[idx] = beta[idx-na]
				if sc := 10 * se[idx-na]; sc > 0 && !math.IsInf(sc, 0) {
					pr.scale[i] = sc
				}
			}
		}
		for name, v := range fixed {
			for i, nm := range lay.names {
				if nm == name {
					start[i] = v
				}
			}
		}
	}

	yGiven := y.Slice()
	// build returns the fitted model at the coefficients coef (as
	// estimated, before invertBlocks for ML), with the covariance of the
	// estimates computed on first use from covFn.
	build := func(coef []float64, covFn func() *mat.SymDense, converged bool) (*Fitted, error) {
		f := &Fitted{spec: given, timed: tm, lay: lay, key: y.Key, start: y.Start, freq: y.Freq, n: n, method: method, nUsed: pr.nUsed, y: yGiven, x: xGiven}
		if err := pr.finishFit(f, coef, covFn, converged, c, colScale); err != nil {
			return nil, err
		}
		return f, nil
	}
	// checkpoint builds the fitted model where the first stage of staged
	// stopping rules (optSettings.then) stops, and asks o.decide whether
	// to go on; loose keeps that model for when it does not.
	var loose *Fitted
	checkpointFor := func(toCoef func(xs []float64) (coef []float64, covFn func() *mat.SymDense)) func([]float64, bool) bool {
		if o.decide == nil {
			return nil
		}
		return func(xs []float64, conv bool) bool {
			loose = nil
			cf, cov := toCoef(append([]float64(nil), xs...))
			f, err := build(cf, cov, conv)
			if err != nil {
				return false // the error is found again at the end
			}
			if o.decide(f) {
				return true
			}
			loose = f
			return false
		}
	}
	coef := start
	var covFn func() *mat.SymDense // the Hessian is computed on first use
	converged := true
	if method == CSS || method == CSSThenML {
		if k > 0 {
			x0, _ := pr.paramsFrom(coef, false)
			obj := func(v []float64) float64 { return pr.cssObjective(v) }
			cssCoef := func(xs []float64) ([]float64, func() *mat.SymDense) {
				return append([]float64(nil), pr.coefFrom(xs, false)...), func() *mat.SymDense { return pr.covariance(obj, xs) }
			}
			var xs []float64
			var conv bool
			err := fmt.Errorf("conditional sum of squares not finite at the starting values")
			// The CSS start of CSS-then-ML always gets the full stopping
			// rules (it is cheap), so that an ML run with looser rules
			// (searchOpt) follows the same path as the full one, only
			// stopping earlier.
			cssOpt := fullOpt
			var check func([]float64, bool) bool
			if method == CSS {
				cssOpt = o
				check = checkpointFor(cssCoef)
			}
			if obj(x0) < badObjective {
				xs, _, conv, err = minimize(ctx, obj, x0, cssOpt, check)
			}
			switch {
			case err != nil && ctx.Err() != nil:
				return nil, fmt.Errorf("arima: %w", ctx.Err())
			case err != nil && method == CSS:
				return nil, fmt.Errorf("arima: %w: %s by CSS: %v", almanac.ErrNotFitted, lay.orders(), err)
			case err != nil:
				// CSS failed: ML starts from the default values instead.
			case loose != nil:
				return loose, nil
			default:
				converged = conv
				coef = append([]float64(nil), pr.coefFrom(xs, false)...)
				if method == CSS {
					_, covFn = cssCoef(xs)
				}
			}
		}
	}
	if method == CSSThenML {
		// The CSS optimum starts ML unless its AR part is not stationary
		// (then the ARMA part starts from zero) and with invertible MA.
		l := lay
		ok := arStationary(coef[l.arOff():l.arOff()+l.p]) && arStationary(coef[l.sarOff():l.sarOff()+l.sp])
		if !ok {
			for i := 0; i < na; i++ {
				if _, fixed := s.Fixed[l.names[i]]; !fixed {
					coef[i] = 0
				}
			}
		}
		invertBlocks(pr, coef)
	}
	if method == ML || method == CSSThenML {
		l := lay
		if !arStationary(coef[l.arOff():l.arOff()+l.p]) || !arStationary(coef[l.sarOff():l.sarOff()+l.sp]) {
			// Only fixed AR coefficients can be non-zero here.
			return nil, fmt.Errorf("arima: %w: %s: the fixed AR coefficients are not stationary", ErrNonStationary, lay.orders())
		}
		if k > 0 {
			obj := func(v []float64) float64 { return pr.mlObjective(v, true) }
			// start returns the parameters of coef and the objective there
			// (evaluated once: a likelihood is the costly step of a fit).
			start := func() ([]float64, float64, bool) {
				x0, ok := pr.paramsFrom(coef, true)
				if !ok {
					return nil, badObjective, false
				}
				return x0, obj(x0), true
			}
			x0, f0, ok := start()
			if (!ok || f0 >= badObjective) && method == CSSThenML {
				// The CSS estimate is no usable start: estimated ARMA
				// coefficients start from zero instead.
				for _, i := range pr.free {
					if i < na {
						coef[i] = 0
					}
				}
				x0, f0, ok = start()
			}
			if !ok {
				return nil, fmt.Errorf("arima: %w: %s: starting values not stationary", almanac.ErrNotFitted, lay.orders())
			}
			if f0 >= badObjective {
				return nil, fmt.Errorf("arima: %w: %s: likelihood not finite at the starting values", almanac.ErrNotFitted, lay.orders())
			}
			mlCoef := func(xs []float64) ([]float64, func() *mat.SymDense) {
				coef := append([]float64(nil), pr.coefFrom(xs, true)...)
				invertBlocks(pr, coef)
				xr, _ := pr.paramsFrom(coef, false)
				raw := func(v []float64) float64 { return pr.mlObjective(v, false) }
				return coef, func() *mat.SymDense { return pr.covariance(raw, xr) }
			}
			xs, _, conv, err := minimize(ctx, obj, x0, o, checkpointFor(mlCoef))
			if err != nil {
				if ctx.Err() != nil {
					return nil, err
				}
				return nil, fmt.Errorf("arima: %w: %s by ML: %v", almanac.ErrNotFitted, lay.orders(), err)
			}
			if loose != nil {
				return loose, nil
			}
			converged = conv
			coef, covFn = mlCoef(xs)
		}
	}
	return build(coef, covFn, converged)
}

// finishFit completes f at the estimate
// coef: residuals, σ², log-likelihood and the filter state, scaled back
// by the data scale c and the regression columns' colScale.
func (pr *problem) finishFit(f *Fitted, coef []float64, covFn func() *mat.SymDense, converged bool, c float64, colScale []float64) error {
	lay, n, method := pr.lay, f.n, f.method
	na := lay.narma()
	nd := lay.d + lay.s*lay.sd
	f.coef = coef
	f.free = pr.free
	f.covFn = covFn
	f.converged = converged
	f.resid = make([]float64, n)
	res, ok := pr.likelihood(coef, f.resid)
	if !ok && method != CSS {
		return fmt.Errorf("arima: %w: %s: the AR part at the estimate is not stationary (fixed AR coefficients?)", ErrNonStationary, lay.orders())
	}
	if method == CSS {
		ssq, nu := pr.cssAt(coef)
		if nu == 0 {
			return fmt.Errorf("arima: %w: no conditional residuals", almanac.ErrNotFitted)
		}
		f.sigma2 = ssq / float64(nu)
		f.loglik = -0.5 * float64(pr.nUsed) * (math.Log(2*math.Pi) + 1 + math.Log(f.sigma2))
		copy(f.resid, pr.css.resid)
		if !ok {
			// No stationary state-space form: forecasts are not available.
			f.kal = nil
		}
	} else {
		if res.nu == 0 {
			return fmt.Errorf("arima: %w: no observation entered the likelihood", almanac.ErrNotFitted)
		}
		nu, nobs := float64(res.nu), float64(pr.nUsed)
		f.sigma2 = res.ssq / nobs
		f.loglik = -0.5 * (nobs*math.Log(res.ssq/nu) + (nobs/nu)*res.sumlog + nobs + nobs*math.Log(2*math.Pi))
	}
	if ok && pr.kal.exact && pr.kal.diffuseLeft() {
		return fmt.Errorf("arima: %w: %s: too few observed values to fix the %d differencing states", almanac.ErrTooShort, lay.orders(), nd)
	}
	if ok {
		f.kal = pr.kal.clone()
	}
	f.ncond = 0
	if method == CSS {
		f.ncond = pr.ncond
	}
	f.sums, f.scale, f.nfit = res, c, n
	f.rescale(c, na, colScale)
	return nil
}

// columnScale returns the power of two 2^(e−1) with the largest |v| in
// [2^(e−1), 2^e), so that v divided by it has its largest |value| in
// [1, 2) (1 for an all-zero column, and for one whose largest |value|
// is in [1, 2) already, such as an indicator).
func columnScale(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	if m == 0 || math.IsInf(m, 0) || math.IsNaN(m) {
		return 1
	}
	_, e := math.Frexp(m)
	return math.Ldexp(1, e-1)
}

// dataScale returns a power of two close to the largest |v| (1 when all
// are zero or missing): 2^e with |v| < 2^e, +Inf when the largest |v| is
// 2^1023 or more (fitWith rejects such data).
func dataScale(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		if a := math.Abs(x); a > m {
			m = a
		}
	}
	if m == 0 || math.IsNaN(m) || math.IsInf(m, 0) {
		return 1
	}
	_, e := math.Frexp(m)
	return math.Ldexp(1, e)
}

// rescale turns a fit of y/c on regression columns divided by colScale
// into the fit of y on the columns as given: regression coefficients (and
// their standard errors) scale with c/colScale, residuals and the
// filtered state with c, σ² with c², and the log-likelihood gains
// −n log c (the density of y is that of y/c divided by c per
// observation).
func (f *Fitted) rescale(c float64, na int, colScale []float64) {
	f.covScale = make([]float64, len(f.free))
	for a, i := range f.free {
		f.covScale[a] = 1
		if i >= na {
			f.covScale[a] = c / colScale[i-na]
		}
	}
	for i := na; i < len(f.coef); i++ {
		f.coef[i] = f.coef[i] / colScale[i-na] * c
	}
	f.sigma = math.Sqrt(f.sigma2) * c
	if c == 1 {
		return
	}
	for i := range f.resid {
		f.resid[i] *= c
	}
	f.sigma2 *= c * c
	f.loglik -= float64(f.nUsed) * math.Log(c)
	if f.kal != nil {
		for i := range f.kal.a {
			f.kal.a[i] *= c
		}
	}
}

// invertBlocks replaces non-invertible MA and seasonal MA blocks of coef
// (when every coefficient of the block is estimated) by their invertible
// equivalents.
func invertBlocks(pr *problem, coef []float64) {
	l := pr.lay
	isFree := make([]bool, l.ncoef())
	for _, i := range pr.free {
		isFree[i] = true
	}
	blockFree := func(off, n int) bool {
		for i := off; i < off+n; i++ {
			if !isFree[i] {
				return false
			}
		}
		return n > 0
	}
	if blockFree(l.maOff(), l.q) {
		copy(coef[l.maOff():l.maOff()+l.q], maInvert(coef[l.maOff():l.maOff()+l.q]))
	}
	if blockFree(l.smaOff(), l.sq) {
		copy(coef[l.smaOff():l.smaOff()+l.sq], maInvert(coef[l.smaOff():l.smaOff()+l.sq]))
	}
}

// clone returns an independent copy of the filter (state and model).
func (k *kalman) clone() *kalman {
	c := &kalman{exact: k.exact}
	c.resize(k.p, len(k.theta), k.delta)
	c.setARMA(k.phi, k.theta)
	copy(c.a, k.a)
	copy(c.pm, k.pm)
	copy(c.pnew, k.pnew)
	return c
}
