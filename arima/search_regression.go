package arima

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// regressionResiduals returns the residuals of the least-squares
// regression of y on a constant and the regressors, over the observed
// values of y (NaN where y is missing).
func regressionResiduals(y []float64, regs []Regressor) ([]float64, error) {
	n := len(y)
	for _, r := range regs {
		if len(r.Values) != n {
			return nil, fmt.Errorf("arima: search: %w: regressor %q has %d values, the series %d", almanac.ErrLength, r.Name, len(r.Values), n)
		}
		for i, v := range r.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("arima: search: %w: regressor %q at index %d is %v", almanac.ErrNonFinite, r.Name, i, v)
			}
		}
	}
	var rows []int
	for t, v := range y {
		if !math.IsNaN(v) {
			rows = append(rows, t)
		}
	}
	k := len(regs) + 1
	if len(rows) <= k {
		return nil, fmt.Errorf("arima: search: %w: %d observed values for a constant and %d regressors", almanac.ErrTooShort, len(rows), len(regs))
	}
	// Columns divided by a power of two near their largest |value|
	// (exact; the residuals do not change), so that the conditioning test
	// below judges collinearity, not units.
	sc := make([]float64, len(regs))
	for j, r := range regs {
		sc[j] = columnScale(r.Values)
	}
	x := mat.NewDense(len(rows), k, nil)
	yv := mat.NewVecDense(len(rows), nil)
	for i, t := range rows {
		x.Set(i, 0, 1)
		for j, r := range regs {
			x.Set(i, j+1, r.Values[t]/sc[j])
		}
		yv.SetVec(i, y[t])
	}
	var qr mat.QR
	qr.Factorize(x)
	var b mat.VecDense
	if err := qr.SolveVecTo(&b, false, yv); err != nil {
		return nil, fmt.Errorf("arima: search: %w: the regressors and the constant are linearly dependent: %v", ErrCollinear, err)
	}
	var cond mat.SVD
	if cond.Factorize(x, mat.SVDNone) {
		if v := cond.Values(nil); v[len(v)-1] <= 1e-10*v[0] {
			return nil, fmt.Errorf("arima: search: %w: the regressors and the constant are (nearly) linearly dependent", ErrCollinear)
		}
	}
	out := make([]float64, n)
	for t := range out {
		out[t] = math.NaN()
	}
	for i, t := range rows {
		out[t] = y[t] - mat.Dot(x.RowView(i), &b)
	}
	return out, nil
}
