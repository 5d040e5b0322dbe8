package arima

import (
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
)

var _ almanac.Refresher = (*Fitted)(nil)

// Update returns the model with newY appended to the series: the Kalman
// filter runs on from the state after the last observation with the
// coefficients unchanged (nothing is estimated again), and σ², the
// log-likelihood and the criteria are those of the whole series at these
// coefficients. So the result equals a fit of the whole series with
// every coefficient fixed at its estimate (to rounding). A NaN in newY is
// a missing observation: the filter's prediction becomes the state, the
// residual is NaN and the observation is left out of the likelihood.
//
// A model with regressors of its own (Spec.Regressors) needs their
// values at the new observations: use UpdateWith. Calendar regressors
// (Spec.Calendar) are built by the model itself.
//
// Special cases: a model with regressors gives an error wrapping
// ErrNeedRegressors; a value ±Inf one wrapping almanac.ErrNonFinite; a
// fit by Method CSS (conditional sum of squares, not the likelihood the
// filter continues) one wrapping almanac.ErrNotRefreshable, and so does
// a fit without a state-space form (ErrNonStationary also); a model not
// returned by Fit one wrapping almanac.ErrNotFitted.
func (f *Fitted) Update(newY []float64) (*Fitted, error) {
	if f != nil && f.lay != nil {
		if user := len(f.lay.regNames) - f.numTimed(); user > 0 {
			return nil, fmt.Errorf("arima: %w: %s has %d regressors of its own; call UpdateWith with their values at the new observations", ErrNeedRegressors, f, user)
		}
	}
	return f.UpdateWith(newY, nil)
}

// Refresh implements almanac.Refresher: it is Update.
func (f *Fitted) Refresh(newValues []float64) (almanac.Fitted, error) {
	g, err := f.Update(newValues)
	if err != nil {
		return nil, err
	}
	return g, nil
}

// UpdateWith is Update for models with regressors: newX[j] holds the
// values of regressor j (in Spec.Regressors order) at the new
// observations, one per value of newY, all finite.
//
// Special cases: as Update; newX with the wrong number of columns, a
// column of the wrong length or a non-finite value gives an error
// wrapping ErrNeedRegressors.
func (f *Fitted) UpdateWith(newY []float64, newX [][]float64) (*Fitted, error) {
	if f == nil || f.lay == nil || f.n == 0 {
		return nil, fmt.Errorf("arima: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	if f.method == CSS {
		return nil, fmt.Errorf("arima: %w: %s was fitted by conditional sum of squares; refit it (or fit by ML or CSS-ML to refresh)", almanac.ErrNotRefreshable, f)
	}
	if f.kal == nil {
		return nil, fmt.Errorf("arima: %w: %w: %s has a non-stationary AR part", almanac.ErrNotRefreshable, ErrNonStationary, f.lay.orders())
	}
	k := len(newY)
	for i, v := range newY {
		if math.IsInf(v, 0) {
			return nil, &almanac.SeriesError{Key: f.key, Index: f.n + i, Err: almanac.ErrNonFinite}
		}
	}
	nreg := len(f.lay.regNames) - f.numTimed()
	if len(newX) != nreg {
		return nil, fmt.Errorf("arima: %w: %d regressor columns given, the model has %d", ErrNeedRegressors, len(newX), nreg)
	}
	for j, col := range newX {
		if len(col) != k {
			return nil, fmt.Errorf("arima: %w: regressor %q has %d new values for %d observations", ErrNeedRegressors, f.lay.regNames[j], len(col), k)
		}
		for i, v := range col {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("arima: %w: new value %d of regressor %q is %v", ErrNeedRegressors, i, f.lay.regNames[j], v)
			}
		}
	}
	if k == 0 {
		return f.clone(), nil
	}
	cols, err := f.withTimed(k, newX)
	if err != nil {
		return nil, err
	}
	// The regression part at the new observations, as ForecastWith
	// computes it.
	reg := make([]float64, k)
	j := f.lay.narma()
	if f.lay.mean {
		for i := range reg {
			reg[i] += f.coef[j]
		}
		j++
	}
	if f.lay.drift {
		for i := range reg {
			reg[i] += f.coef[j] * float64(f.n+i+1)
		}
		j++
	}
	for c, col := range cols {
		b := f.coef[j+c]
		for i := range reg {
			reg[i] += b * col[i]
		}
	}
	w := make([]float64, k)
	for i, v := range newY {
		w[i] = v - reg[i] // NaN stays NaN
	}
	g := f.clone()
	resid := make([]float64, k)
	g.kal.advance(w, resid, f.scale, &g.sums)
	g.n += k
	g.y = append(g.y, newY...)
	g.resid = append(g.resid, resid...)
	for _, v := range newY {
		if !math.IsNaN(v) {
			g.nUsed++
		}
	}
	// The regression columns: mean, drift, then the regressors (the
	// caller's and the calendar's) at the new observations.
	x := make([][]float64, len(f.x))
	for c := range f.x {
		x[c] = slices.Clone(f.x[c])
	}
	c := 0
	if f.lay.mean {
		for range k {
			x[c] = append(x[c], 1)
		}
		c++
	}
	if f.lay.drift {
		for i := range k {
			x[c] = append(x[c], float64(f.n+i+1))
		}
		c++
	}
	for _, col := range cols {
		x[c] = append(x[c], col...)
		c++
	}
	g.x = x
	if len(g.spec.Regressors) > 0 {
		regs := make([]Regressor, len(g.spec.Regressors))
		for r, rg := range g.spec.Regressors {
			regs[r] = Regressor{Name: rg.Name, Values: append(slices.Clone(rg.Values), newX[r]...)}
		}
		g.spec.Regressors = regs
	}
	if g.sums.nu == 0 || g.nUsed == 0 {
		return nil, fmt.Errorf("arima: %w: no observation entered the likelihood", almanac.ErrNotFitted)
	}
	g.setLikelihood()
	if math.IsNaN(g.sigma2) || math.IsInf(g.sigma2, 0) || math.IsNaN(g.loglik) {
		return nil, fmt.Errorf("arima: %w: the innovation variance after the new observations is %v", almanac.ErrNonFinite, g.sigma2)
	}
	return g, nil
}

// setLikelihood sets σ², σ and the log-likelihood from the filter's sums,
// as fitWith and rescale do at the end of a fit by ML.
func (f *Fitted) setLikelihood() {
	c := f.scale
	nu, nobs := float64(f.sums.nu), float64(f.nUsed)
	s2 := f.sums.ssq / nobs
	f.loglik = -0.5 * (nobs*math.Log(f.sums.ssq/nu) + (nobs/nu)*f.sums.sumlog + nobs + nobs*math.Log(2*math.Pi))
	f.sigma = math.Sqrt(s2) * c
	f.sigma2 = s2
	if c != 1 {
		f.sigma2 *= c * c
		f.loglik -= nobs * math.Log(c)
	}
}

// clone returns a copy of f that shares nothing mutable with it (the
// coefficient covariance, read-only once computed, is shared).
func (f *Fitted) clone() *Fitted {
	cov := f.covariance()
	g := &Fitted{
		spec: f.spec, lay: f.lay, key: f.key, start: f.start, freq: f.freq, n: f.n, method: f.method,
		nUsed: f.nUsed, ncond: f.ncond, y: slices.Clone(f.y), x: f.x, coef: slices.Clone(f.coef),
		free: slices.Clone(f.free), cov: cov, kal: f.kal.clone(), timed: f.timed, resid: slices.Clone(f.resid),
		sigma2: f.sigma2, loglik: f.loglik, sigma: f.sigma, covScale: slices.Clone(f.covScale),
		converged: f.converged, search: f.search, sums: f.sums, scale: f.scale, nfit: f.nfit,
	}
	g.covOnce.Do(func() {}) // cov is set
	return g
}

// advance runs the Kalman filter over w (the data minus the regression
// part; NaN = missing) from the filtered state after the last
// observation, as filterFull does from the second observation on:
// predict, then update. resid receives the standardised innovations v/√F
// (NaN at missing values); res accumulates the sums of the likelihood on
// the data divided by scale, as the fit's filter did.
func (k *kalman) advance(w, resid []float64, scale float64, res *filterResult) {
	rd := k.rd
	for l, y := range w {
		k.predict()
		anew, Pnew := k.anew, k.pnew
		if math.IsNaN(y) {
			copy(k.a, anew)
			copy(k.pm, Pnew)
			resid[l] = math.NaN()
			continue
		}
		v, gain := k.innovation(y)
		M := k.m
		if gain < fLimit {
			vs := v / scale
			res.nu++
			res.ssq += vs * vs / gain
			res.sumlog += math.Log(gain)
		}
		resid[l] = v / math.Sqrt(gain)
		f := v / gain
		for i := 0; i < rd; i++ {
			k.a[i] = anew[i] + M[i]*f
		}
		P := k.pm
		for j := 0; j < rd; j++ {
			mj := M[j] / gain
			col := P[rd*j : rd*j+rd]
			ncol := Pnew[rd*j : rd*j+rd]
			for i := j; i < rd; i++ {
				v := ncol[i] - M[i]*mj
				col[i] = v
				P[j+rd*i] = v
			}
		}
	}
}
