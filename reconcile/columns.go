package reconcile

import (
	"fmt"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// HistoryMatrix stacks the observed series of the nodes (one per node, in
// the structure's order) into a T × n matrix for Spec.History. All series
// must have the same length; their keys are not consulted.
func HistoryMatrix(st Structure, series []almanac.Series) (*mat.Dense, error) {
	cols := make([][]float64, len(series))
	for i, s := range series {
		cols[i] = s.Values
	}
	return columns(st, cols, "series")
}

// ResidualMatrix stacks the in-sample residuals of fitted base models (one
// per node, in the structure's order) into a T × n matrix for
// Spec.Residuals. The residuals are taken on the data's scale
// (almanac.ResponseResiduals: y − fitted even for multiplicative-error or
// transformed models), since reconciliation combines errors of series
// that add up. All models must have been fitted to series of the same
// length; NaN residuals (e.g. the first one of a naive model) are kept and
// their rows are later dropped.
func ResidualMatrix(st Structure, fits []almanac.Fitted) (*mat.Dense, error) {
	cols := make([][]float64, len(fits))
	for i, f := range fits {
		if f == nil {
			return nil, fmt.Errorf("reconcile: %w: fitted model %d is nil", almanac.ErrInvalid, i)
		}
		cols[i] = almanac.ResponseResiduals(f)
	}
	return columns(st, cols, "residual series")
}

func columns(st Structure, cols [][]float64, what string) (*mat.Dense, error) {
	c, err := coreOf(st)
	if err != nil {
		return nil, err
	}
	if len(cols) != c.n() {
		return nil, fmt.Errorf("reconcile: %w: %w: %d %s for %d nodes", ErrDimension, almanac.ErrLength, len(cols), what, c.n())
	}
	T := len(cols[0])
	if T == 0 {
		return nil, fmt.Errorf("reconcile: %w: %s of %q is empty", almanac.ErrEmpty, what, c.names[0])
	}
	out := mat.NewDense(T, len(cols), nil)
	for i, col := range cols {
		if len(col) != T {
			return nil, fmt.Errorf("reconcile: %w: %w: %s of %q has %d values, that of %q has %d", ErrDimension, almanac.ErrLength, what, c.names[i], len(col), c.names[0], T)
		}
		out.SetCol(i, col)
	}
	return out, nil
}
