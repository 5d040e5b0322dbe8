package decompose

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
)

// kindForecaster is the kind of a ForecasterFit in saved documents (see
// almanac.SaveModel).
const kindForecaster = "decompose.forecaster"

func init() { almanac.Register(kindForecaster, 1, loadForecaster) }

var _ almanac.Storable = (*ForecasterFit)(nil)

// forecasterBody is the saved form of a ForecasterFit: the decomposition
// as computed (every component; the method that made it is not run
// again, so a user's own Method takes part too) and the model of the
// adjusted series as a nested document.
type forecasterBody struct {
	Series         almanac.StoredSeries   `json:"series"`
	Method         string                 `json:"method"`
	Multiplicative bool                   `json:"multiplicative"`
	Periods        []int                  `json:"periods"`
	Trend          almanac.StoredValues   `json:"trend"`
	Seasonal       almanac.StoredValues   `json:"seasonal"`
	Seasonals      []almanac.StoredValues `json:"seasonals"`
	Remainder      almanac.StoredValues   `json:"remainder"`
	Weights        almanac.StoredValues   `json:"weights,omitempty"`
	Figure         almanac.StoredValues   `json:"figure,omitempty"`
	Settings       []STL                  `json:"settings,omitempty"`
	Inner          json.RawMessage        `json:"inner"`
}

// StoredKind implements almanac.Storable.
func (f *ForecasterFit) StoredKind() (string, int) { return kindForecaster, 1 }

// StoredBody implements almanac.Storable; the inner model must be
// almanac.Storable too.
func (f *ForecasterFit) StoredBody() ([]byte, error) {
	if f == nil || f.decomp == nil || f.inner == nil {
		return nil, fmt.Errorf("decompose: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	inner, err := almanac.MarshalModel(f.inner)
	if err != nil {
		return nil, err
	}
	d := f.decomp
	b := forecasterBody{
		Series: almanac.StoreSeries(d.Series), Method: d.Method, Multiplicative: d.Multiplicative, Periods: d.Periods,
		Trend: d.Trend, Seasonal: d.Seasonal, Remainder: d.Remainder, Weights: d.Weights, Figure: d.Figure,
		Settings: d.Settings, Inner: inner,
	}
	for _, s := range d.Seasonals {
		b.Seasonals = append(b.Seasonals, s)
	}
	return json.Marshal(b)
}

func loadForecaster(_ int, body []byte) (almanac.Fitted, error) {
	var b forecasterBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	n := y.Len()
	d := &Decomposition{Series: y, Method: b.Method, Multiplicative: b.Multiplicative, Periods: b.Periods,
		Trend: b.Trend, Seasonal: b.Seasonal, Remainder: b.Remainder, Weights: b.Weights, Figure: b.Figure, Settings: b.Settings}
	for _, s := range b.Seasonals {
		d.Seasonals = append(d.Seasonals, s)
	}
	if b.Method == "" {
		return nil, errors.New("no method name")
	}
	for what, v := range map[string][]float64{"trend": d.Trend, "remainder": d.Remainder} {
		if len(v) != n {
			return nil, fmt.Errorf("%w: %s has %d values for %d observations", almanac.ErrLength, what, len(v), n)
		}
	}
	if err := d.check(n); err != nil {
		return nil, err
	}
	// The last cycle of each seasonal component is carried forward in
	// forecasts: finite, and positive for a multiplicative decomposition.
	for k, s := range d.Seasonals {
		for i := n - d.Periods[k]; i < n; i++ {
			if v := s[i]; math.IsNaN(v) || (d.Multiplicative && !(v > 0)) {
				return nil, fmt.Errorf("seasonal component %d at %d is %v", k, i, v)
			}
		}
	}
	if d.Weights != nil && len(d.Weights) != n {
		return nil, fmt.Errorf("%w: %d weights for %d observations", almanac.ErrLength, len(d.Weights), n)
	}
	inner, err := almanac.UnmarshalModel(b.Inner)
	if err != nil {
		return nil, fmt.Errorf("inner model: %w", err)
	}
	if got := len(inner.FittedValues()); got != n {
		return nil, fmt.Errorf("%w: the inner model has %d observations, the series %d", almanac.ErrLength, got, n)
	}
	return newForecasterFit(y, d, inner)
}
