package accuracy

import (
	"context"
	"encoding/json"
	"fmt"

	"github.com/almanac-go/almanac"
)

// kindNaive2 is the kind of a Naive2Fit in saved documents (see
// almanac.SaveModel).
const kindNaive2 = "accuracy.naive2"

func init() { almanac.Register(kindNaive2, 1, loadNaive2) }

var _ almanac.Storable = (*Naive2Fit)(nil)

// naive2Body is the saved form of a Naive2Fit: the period and the data.
// Naive2 estimates nothing that the data do not fix in closed form (the
// seasonality test, the classical indices, the last adjusted value), so
// the loader fits it again, which is exact.
type naive2Body struct {
	Period int                  `json:"period"`
	Series almanac.StoredSeries `json:"series"`
}

// StoredKind implements almanac.Storable.
func (f *Naive2Fit) StoredKind() (string, int) { return kindNaive2, 1 }

// StoredBody implements almanac.Storable.
func (f *Naive2Fit) StoredBody() ([]byte, error) {
	if f == nil || f.y.Len() == 0 {
		return nil, fmt.Errorf("accuracy: naive2: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	return json.Marshal(naive2Body{Period: f.period, Series: almanac.StoreSeries(f.y)})
}

func loadNaive2(_ int, body []byte) (almanac.Fitted, error) {
	var b naive2Body
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	if b.Period < 1 {
		return nil, fmt.Errorf("period %d", b.Period)
	}
	return Naive2{Period: b.Period}.Fit(context.Background(), y)
}
