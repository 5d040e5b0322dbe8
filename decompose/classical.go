package decompose

import (
	"fmt"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/seasonal"
)

// Classical is the classical moving-average decomposition, with the
// conventions of R's stats::decompose: the trend is the centred moving
// average of order Period (a 2×Period average for an even period), NaN
// for the first and last floor(Period/2) observations; the seasonal
// figure is the mean of the detrended values at each position of the
// cycle, counted from the first observation, centred to sum to zero
// (additive) or to average one (multiplicative); the remainder is what is
// left. The zero value is the additive decomposition with the period of
// the series frequency.
//
// Example:
//
//	d, err := decompose.Classical{Multiplicative: true}.Decompose(y)
//
// A Classical value is a specification, safe for concurrent use.
type Classical struct {
	// Period in observations, ≥ 2; 0 means y.Period().
	Period int
	// Multiplicative divides instead of subtracting; the data must be
	// positive.
	Multiplicative bool
}

var _ Method = Classical{}

// Decompose splits y into trend, seasonal and remainder.
//
// Special cases: missing values are allowed (they make the trend NaN in
// every window that holds them and are left out of the seasonal means); a
// period below 2 gives an error wrapping ErrPeriod; fewer than 2·Period
// observations one wrapping almanac.ErrTooShort; a value ≤ 0 with
// Multiplicative one wrapping almanac.ErrNonPositive.
func (c Classical) Decompose(y almanac.Series) (*Decomposition, error) {
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("decompose: %w", err)
	}
	if c.Period < 0 {
		return nil, fmt.Errorf("decompose: classical: %w: period %d", ErrPeriod, c.Period)
	}
	m := c.Period
	if m == 0 {
		m = y.Period()
	}
	if c.Multiplicative {
		if err := y.CheckPositive(); err != nil {
			return nil, fmt.Errorf("decompose: multiplicative classical decomposition: %w", err)
		}
	}
	if n := y.Len(); m >= 2 && m > n/2 {
		// Checked here too, before any slice of the period's size is
		// made: internal/seasonal would allocate for a huge period.
		return nil, fmt.Errorf("decompose: %w: %d observations, classical decomposition with period %d needs at least twice as many", almanac.ErrTooShort, n, m)
	}
	r, err := seasonal.Classical(y.Values, m, c.Multiplicative)
	if err != nil {
		return nil, seasonalError(err, y.Len(), m)
	}
	return finish(&Decomposition{
		Series:         y.Clone(),
		Method:         "Classical",
		Multiplicative: c.Multiplicative,
		Periods:        []int{m},
		Trend:          r.Trend,
		Seasonal:       r.Seasonal,
		Seasonals:      [][]float64{r.Seasonal},
		Remainder:      r.Remainder,
		Figure:         r.Figure,
	})
}
