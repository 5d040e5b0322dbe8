package smoothing

import (
	"errors"
	"fmt"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/seasonal"
)

// classicalError wraps an error of the classical decomposition behind the
// start values of Holt-Winters and the seasonal adjustment of Theta in
// the root sentinel it stands for: too few observations
// (seasonal.ErrShort) wraps almanac.ErrTooShort, a component beyond the
// float64 range (seasonal.ErrOverflow: data such as 1e300 beside 1e−75
// give seasonal indices or a remainder that do not fit) wraps
// almanac.ErrNonFinite. what names the model and the step.
func classicalError(what string, err error) error {
	switch {
	case errors.Is(err, seasonal.ErrOverflow):
		return fmt.Errorf("smoothing: %s: %w: %v", what, almanac.ErrNonFinite, err)
	case errors.Is(err, seasonal.ErrShort):
		return fmt.Errorf("smoothing: %s: %w: %v", what, almanac.ErrTooShort, err)
	}
	return fmt.Errorf("smoothing: %s: %w", what, err)
}
