package decompose

import (
	"errors"
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/seasonal"
	"github.com/almanac-go/almanac/internal/stl"
)

// Sentinel errors of package decompose. Each wraps a root sentinel, so
// errors.Is(err, almanac.ErrInvalid) also holds for ErrPeriod and
// ErrWindow. Bad data gives the root sentinels directly: almanac.ErrMissing
// (NaN passed to STL, MSTL or the forecaster: repair the gaps with
// Repair.Fill first), almanac.ErrTooShort (no more than two full
// periods), almanac.ErrNonPositive (multiplicative decomposition of data
// that are not positive), almanac.ErrNonFinite, almanac.ErrEmpty and
// almanac.ErrAllMissing.
var (
	// ErrPeriod: a seasonal period below 2 (or none could be taken from
	// the series frequency).
	ErrPeriod = fmt.Errorf("%w: seasonal period", almanac.ErrInvalid)
	// ErrWindow: a negative window, jump or iteration count, or a loess
	// degree outside the defined set.
	ErrWindow = fmt.Errorf("%w: smoothing parameter", almanac.ErrInvalid)
)

// stlError translates an error of internal/stl into this package's terms.
func stlError(err error) error {
	switch {
	case err == nil:
		return nil
	case errors.Is(err, stl.ErrPeriod):
		return fmt.Errorf("decompose: %w: %v", ErrPeriod, err)
	case errors.Is(err, stl.ErrTooShort):
		return fmt.Errorf("decompose: %w: %v", almanac.ErrTooShort, err)
	case errors.Is(err, stl.ErrNonFinite):
		return fmt.Errorf("decompose: %w: %v (fill gaps with Repair.Fill first)", almanac.ErrMissing, err)
	case errors.Is(err, stl.ErrOverflow):
		return fmt.Errorf("decompose: %w: %v", almanac.ErrNonFinite, err)
	case errors.Is(err, stl.ErrParams):
		return fmt.Errorf("decompose: %w: %v", ErrWindow, err)
	}
	return fmt.Errorf("decompose: %w", err)
}

// seasonalError translates an error of internal/seasonal.
func seasonalError(err error, n, m int) error {
	if errors.Is(err, seasonal.ErrOverflow) {
		return fmt.Errorf("decompose: classical: %w: %v", almanac.ErrNonFinite, err)
	}
	if errors.Is(err, seasonal.ErrShort) {
		if m < 2 {
			return fmt.Errorf("decompose: %w: period %d", ErrPeriod, m)
		}
		return fmt.Errorf("decompose: %w: %d observations, classical decomposition with period %d needs at least %d", almanac.ErrTooShort, n, m, 2*m)
	}
	return fmt.Errorf("decompose: %w", err)
}

// checkComplete validates y and rejects missing values with an error that
// points to the repair function.
func checkComplete(y almanac.Series, what string) error {
	if err := y.Validate(); err != nil {
		return fmt.Errorf("decompose: %w", err)
	}
	if err := y.CheckComplete(); err != nil {
		return fmt.Errorf("decompose: %s needs complete data (fill gaps with Repair.Fill first): %w", what, err)
	}
	return nil
}

// finish checks a decomposition built by this package before it is
// returned: no component may be ±Inf (NaN marks the undefined ends of a
// classical trend), and the seasonally adjusted series must fit in a
// float64, so that Adjusted never gives ±Inf. It returns d, or an error
// wrapping almanac.ErrNonFinite.
func finish(d *Decomposition) (*Decomposition, error) {
	parts := []struct {
		name string
		x    []float64
	}{{"trend", d.Trend}, {"seasonal", d.Seasonal}, {"remainder", d.Remainder}, {"seasonal figure", d.Figure}}
	for k, s := range d.Seasonals {
		parts = append(parts, struct {
			name string
			x    []float64
		}{fmt.Sprintf("seasonal component %d", k+1), s})
	}
	for _, p := range parts {
		for i, v := range p.x {
			if math.IsInf(v, 0) {
				return nil, fmt.Errorf("decompose: %s: %w: the %s at index %d exceeds the float64 range", d.Method, almanac.ErrNonFinite, p.name, i)
			}
		}
	}
	for i, v := range d.Series.Values {
		if d.Multiplicative && d.Seasonal[i] == 0 {
			return nil, fmt.Errorf("decompose: %s: %w: the seasonal factor at index %d is below the float64 range (it underflows to 0)", d.Method, almanac.ErrNonFinite, i)
		}
		a := v - d.Seasonal[i]
		if d.Multiplicative {
			a = v / d.Seasonal[i]
		}
		if math.IsInf(a, 0) {
			return nil, fmt.Errorf("decompose: %s: %w: the seasonally adjusted value at index %d is beyond the float64 range", d.Method, almanac.ErrNonFinite, i)
		}
	}
	return d, nil
}
