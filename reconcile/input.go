package reconcile

import (
	"fmt"
	"math"
	"reflect"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// absent reports whether a matrix argument is missing: a nil interface,
// or a typed nil pointer such as a (*mat.Dense)(nil) held in a
// mat.Matrix, whose methods would dereference nil.
func absent(x any) bool {
	if x == nil {
		return true
	}
	v := reflect.ValueOf(x)
	return v.Kind() == reflect.Pointer && v.IsNil()
}

// baseRows copies the base forecasts (h × n) into row slices after
// checking their shape and values.
func baseRows(c *core, base mat.Matrix) ([][]float64, error) {
	if absent(base) {
		return nil, fmt.Errorf("reconcile: %w: no base forecasts", almanac.ErrEmpty)
	}
	r, k := base.Dims()
	if r == 0 || k == 0 {
		return nil, fmt.Errorf("reconcile: %w: base forecasts are %d × %d", almanac.ErrEmpty, r, k)
	}
	if k != c.n() {
		return nil, fmt.Errorf("reconcile: %w: %w: base forecasts have %d columns, the structure has %d nodes", ErrDimension, almanac.ErrLength, k, c.n())
	}
	rows := make([][]float64, r)
	for t := range rows {
		rows[t] = make([]float64, k)
		for i := range rows[t] {
			v := base.At(t, i)
			if err := finite(c, "base forecast", v, t, i); err != nil {
				return nil, err
			}
			rows[t][i] = v
		}
	}
	return rows, nil
}

func finite(c *core, what string, v float64, t, i int) error {
	switch {
	case math.IsNaN(v):
		return fmt.Errorf("reconcile: %w: %s of node %q is NaN at row %d", almanac.ErrMissing, what, c.names[i], t)
	case math.IsInf(v, 0):
		return fmt.Errorf("reconcile: %w: %s of node %q is %v at row %d", almanac.ErrNonFinite, what, c.names[i], v, t)
	}
	return nil
}

// completeRows returns the rows of a T × n matrix (residuals or history)
// that have no NaN; ±Inf anywhere is an error. what names the matrix in
// messages.
func completeRows(c *core, x mat.Matrix, what string) ([][]float64, error) {
	if absent(x) {
		return nil, fmt.Errorf("reconcile: %w: no %s given (this method needs them)", almanac.ErrEmpty, what)
	}
	r, k := x.Dims()
	if k != c.n() {
		return nil, fmt.Errorf("reconcile: %w: %w: %s have %d columns, the structure has %d nodes", ErrDimension, almanac.ErrLength, what, k, c.n())
	}
	var rows [][]float64
	for t := 0; t < r; t++ {
		row := make([]float64, k)
		ok := true
		for i := range row {
			v := x.At(t, i)
			if math.IsInf(v, 0) {
				return nil, fmt.Errorf("reconcile: %w: %s of node %q is %v at row %d", almanac.ErrNonFinite, what, c.names[i], v, t)
			}
			if math.IsNaN(v) {
				ok = false
			}
			row[i] = v
		}
		if ok {
			rows = append(rows, row)
		}
	}
	if len(rows) == 0 {
		if r == 0 {
			return nil, fmt.Errorf("reconcile: %w: %s have no rows", almanac.ErrEmpty, what)
		}
		return nil, fmt.Errorf("reconcile: %w: every row of the %s has a missing value", almanac.ErrAllMissing, what)
	}
	return rows, nil
}
