package arima

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

var _ almanac.Simulator = (*Fitted)(nil)

// Simulate draws n future sample paths of h steps (paths[i][step]) from
// the fitted model with Gaussian innovations of variance σ², starting
// from the filtered state at the end of the series drawn from its
// distribution, so that the paths carry the same uncertainty as the
// forecast intervals. The same src state gives the same paths: each path
// takes r + d + sD normal draws for its starting state, then one per
// step.
//
// Special cases: a model fitted with regressors gives an error wrapping
// ErrNeedRegressors (use SimulateWith); h < 1 wraps almanac.ErrHorizon;
// n < 1 or a nil src wraps almanac.ErrInvalid.
func (f *Fitted) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if user := f.lay.regNames[:len(f.lay.regNames)-f.numTimed()]; len(user) > 0 {
		return nil, fmt.Errorf("arima: %w: %s was fitted with regressors %s; call SimulateWith with their future values", ErrNeedRegressors, f, quoteJoin(user))
	}
	return f.SimulateWith(h, n, nil, src)
}

// SimulateWith is Simulate for models with regressors: future[j] holds
// the h future values of regressor j, as in ForecastWith.
func (f *Fitted) SimulateWith(h, n int, future [][]float64, src rand.Source) ([][]float64, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("arima: %w", err)
	}
	if n < 1 || src == nil {
		return nil, fmt.Errorf("arima: %w: need n ≥ 1 paths and a random source, have n = %d", almanac.ErrInvalid, n)
	}
	// The deterministic part (mean, drift, regressors) comes from the
	// forecast code path, which also checks future.
	fc, err := f.ForecastWith(h, future)
	if err != nil {
		return nil, err
	}
	k := f.kal.clone()
	stateMean := make([]float64, h)
	stateVar := make([]float64, h)
	k.clone().forecast(stateMean, stateVar)
	offset := make([]float64, h) // regression part of the forecast mean
	for i := range offset {
		offset[i] = fc.Mean[i] - stateMean[i]
	}
	// Square root of the filtered covariance (eigen-decomposition, tiny
	// negative eigenvalues from rounding set to zero).
	rd := k.rd
	sym := mat.NewSymDense(rd, nil)
	for i := 0; i < rd; i++ {
		for j := 0; j <= i; j++ {
			sym.SetSym(i, j, 0.5*(k.pm[i+rd*j]+k.pm[j+rd*i]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(sym, true) {
		return nil, fmt.Errorf("arima: %w: state covariance could not be factorised", almanac.ErrNotFitted)
	}
	var vec mat.Dense
	eig.VectorsTo(&vec)
	vals := eig.Values(nil)
	root := mat.NewDense(rd, rd, nil)
	for j, v := range vals {
		s := math.Sqrt(math.Max(v, 0))
		for i := 0; i < rd; i++ {
			root.Set(i, j, vec.At(i, j)*s)
		}
	}
	sigma := f.sigma // the covariance is in units of σ²
	a0 := append([]float64(nil), k.a...)
	rng := rand.New(src)
	paths := make([][]float64, n)
	x := make([]float64, rd)
	z := make([]float64, rd)
	for p := range paths {
		for i := range z {
			z[i] = rng.NormFloat64()
		}
		for i := 0; i < rd; i++ {
			v := 0.0
			for j := 0; j < rd; j++ {
				v += root.At(i, j) * z[j]
			}
			x[i] = a0[i] + sigma*v
		}
		path := make([]float64, h)
		for step := range path {
			copy(k.a, x)
			e := rng.NormFloat64() * sigma
			k.transition(x, e)
			y := x[0]
			for _, i := range k.deltaIdx {
				y += k.delta[i] * x[k.r+i]
			}
			path[step] = y + offset[step]
		}
		paths[p] = path
	}
	return paths, nil
}

// transition sets x = T a + R e (a is k.a).
func (k *kalman) transition(x []float64, e float64) {
	for i := 0; i < k.rd; i++ {
		s := 0.0
		for j := k.tOff[i]; j < k.tOff[i+1]; j++ {
			s += k.tVal[j] * k.a[k.tIdx[j]]
		}
		if i < k.r {
			s += k.rv[i] * e
		}
		x[i] = s
	}
}
