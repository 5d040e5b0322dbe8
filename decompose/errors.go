package decompose

import (
	"errors"
	"fmt"

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
	case errors.Is(err, stl.ErrParams):
		return fmt.Errorf("decompose: %w: %v", ErrWindow, err)
	}
	return fmt.Errorf("decompose: %w", err)
}

// seasonalError translates an error of internal/seasonal.
func seasonalError(err error, n, m int) error {
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
