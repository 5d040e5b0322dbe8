package reconcile

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// Covariance chooses how MinT estimates the covariance W of the one-step
// base forecast errors from in-sample residuals.
type Covariance int

const (
	// CovarianceAuto is the default: Shrinkage.
	CovarianceAuto Covariance = iota
	// Shrinkage is the Schäfer–Strimmer shrinkage of the sample
	// covariance towards its diagonal, W = λ diag(W1) + (1 − λ) W1, with
	// the intensity λ estimated from the residuals. Always positive
	// definite when every residual variance is positive.
	Shrinkage
	// SampleCovariance is W1 = E'E / T, the (uncentred) sample
	// covariance of the residuals. It is singular when T < n, and
	// whenever the residuals themselves add up (as they do, for example,
	// for naive forecasts).
	SampleCovariance
	// DiagonalVariance keeps only the diagonal of W1 (the variance
	// scaling of WLS).
	DiagonalVariance
)

var covNames = [...]string{"auto", "shrinkage", "sample", "diagonal"}

// String returns "auto", "shrinkage", "sample" or "diagonal", or
// "Covariance(n)" for other values.
func (k Covariance) String() string {
	if k >= 0 && int(k) < len(covNames) {
		return covNames[k]
	}
	return fmt.Sprintf("Covariance(%d)", int(k))
}

// CovarianceEstimate is an estimate of the n × n covariance of the
// one-step base forecast errors.
type CovarianceEstimate struct {
	W *mat.SymDense
	// Lambda is the shrinkage intensity λ in [0, 1] (Shrinkage); 0 for
	// SampleCovariance and 1 for DiagonalVariance.
	Lambda float64
	// Rows is the number of complete residual rows used.
	Rows int
}

// EstimateCovariance estimates the covariance of the base forecast errors
// from in-sample one-step residuals (T × n, one column per node in the
// structure's order). Rows holding a NaN are dropped (complete cases).
//
// The sample covariance is W1 = E'E / T, not centred (residuals of a
// sensible model have mean near zero, and this is the published
// definition). The shrinkage intensity follows Schäfer & Strimmer (2005)
// applied to the correlations of W1: with z_ti = e_ti / √W1_ii and
// w_tij = z_ti z_tj,
//
//	λ = Σ_{i≠j} Var(r_ij) / Σ_{i≠j} r_ij²,  Var(r_ij) = Σ_t (w_tij − w̄_ij)² / (T(T−1)),
//
// clipped to [0, 1] (λ = 1 when every r_ij is zero).
//
// Errors wrap almanac.ErrLength with ErrDimension (wrong number of
// columns), almanac.ErrNonFinite (±Inf), almanac.ErrEmpty /
// almanac.ErrAllMissing (no complete row), almanac.ErrTooShort (fewer
// than n complete rows for SampleCovariance, fewer than 2 for Shrinkage),
// ErrSingular (a node whose residuals are all zero) or almanac.ErrInvalid
// (unknown kind).
func EstimateCovariance(st Structure, residuals mat.Matrix, kind Covariance) (CovarianceEstimate, error) {
	c, err := coreOf(st)
	if err != nil {
		return CovarianceEstimate{}, err
	}
	est, err := estimateCov(c, residuals, kind)
	if err != nil {
		return CovarianceEstimate{}, err
	}
	// Back to the residuals' own unit: W·2^(2e).
	w := est.W
	for i := 0; i < c.n(); i++ {
		for j := i; j < c.n(); j++ {
			v := math.Ldexp(w.At(i, j), 2*est.exp)
			if math.IsInf(v, 0) {
				return CovarianceEstimate{}, fmt.Errorf("reconcile: %w: the covariance of the residuals of %q and %q is beyond the float64 range (residuals near ±1.3e154 or more square to more than 1.8e308)", almanac.ErrNonFinite, c.names[i], c.names[j])
			}
			w.SetSym(i, j, v)
		}
	}
	return est.CovarianceEstimate, nil
}

// covEst is a covariance estimate in a unit of its own: W and the
// complete residual rows are those of the residuals divided by 2^exp
// (scale.go), so that squares of residuals near the float64 limit do not
// overflow. The reconciliation does not depend on the unit of W.
type covEst struct {
	CovarianceEstimate
	rows [][]float64 // complete residual rows, divided by 2^exp
	exp  int
}

func estimateCov(c *core, residuals mat.Matrix, kind Covariance) (covEst, error) {
	if kind == CovarianceAuto {
		kind = Shrinkage
	}
	if kind < Shrinkage || kind > DiagonalVariance {
		return covEst{}, fmt.Errorf("reconcile: %w: unknown covariance estimator %v", almanac.ErrInvalid, kind)
	}
	rows, err := completeRows(c, residuals, "residuals")
	if err != nil {
		return covEst{}, err
	}
	n, T := c.n(), len(rows)
	switch {
	case kind == SampleCovariance && T < n:
		return covEst{}, fmt.Errorf("reconcile: %w: the sample covariance of %d nodes needs at least %d complete residual rows, have %d (use the shrinkage estimator)", almanac.ErrTooShort, n, n, T)
	case kind == Shrinkage && T < 2:
		return covEst{}, fmt.Errorf("reconcile: %w: the shrinkage estimator needs at least 2 complete residual rows, have %d", almanac.ErrTooShort, T)
	}
	exp := scaleRows(rows)
	e := mat.NewDense(T, n, nil)
	for t, r := range rows {
		e.SetRow(t, r)
	}
	w1 := mat.NewSymDense(n, nil)
	w1.SymOuterK(1/float64(T), e.T())
	for i := 0; i < n; i++ {
		if !(w1.At(i, i) > 0) {
			for _, r := range rows {
				if r[i] != 0 {
					return covEst{}, fmt.Errorf("reconcile: %w: the residuals of node %q are too small next to the largest residual of another node (a ratio beyond about 1e160) for their variance to be represented", ErrSingular, c.names[i])
				}
			}
			return covEst{}, fmt.Errorf("reconcile: %w: the residuals of node %q are all zero, so its variance is zero", ErrSingular, c.names[i])
		}
	}
	out := covEst{rows: rows, exp: exp}
	out.Rows = T
	switch kind {
	case SampleCovariance:
		out.W = w1
		return out, nil
	case DiagonalVariance:
		w := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			w.SetSym(i, i, w1.At(i, i))
		}
		out.W, out.Lambda = w, 1
		return out, nil
	}
	lambda := shrinkIntensity(e, w1)
	w := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		w.SetSym(i, i, w1.At(i, i))
		for j := i + 1; j < n; j++ {
			w.SetSym(i, j, (1-lambda)*w1.At(i, j))
		}
	}
	out.W, out.Lambda = w, lambda
	return out, nil
}

// shrinkIntensity returns the Schäfer–Strimmer intensity for shrinking
// the correlations of w1 (from the T × n residuals e) towards zero.
func shrinkIntensity(e *mat.Dense, w1 *mat.SymDense) float64 {
	T, n := e.Dims()
	// Standardised residuals, stored column by column.
	z := make([][]float64, n)
	for i := range z {
		z[i] = make([]float64, T)
		s := math.Sqrt(w1.At(i, i))
		for t := range z[i] {
			z[i][t] = e.At(t, i) / s
		}
	}
	var num, den float64
	ft := float64(T)
	for i := 0; i < n; i++ {
		zi := z[i]
		for j := i + 1; j < n; j++ {
			zj := z[j]
			var mean float64
			for t := range zi {
				mean += zi[t] * zj[t]
			}
			mean /= ft
			var ss float64
			for t := range zi {
				d := zi[t]*zj[t] - mean
				ss += d * d
			}
			r := w1.At(i, j) / math.Sqrt(w1.At(i, i)*w1.At(j, j))
			num += ss / (ft * (ft - 1))
			den += r * r
		}
	}
	if den == 0 {
		return 1
	}
	return max(0, min(1, num/den))
}
