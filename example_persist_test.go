package almanac_test

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// ewma is a user's own model: an exponentially weighted level with a
// weight the user chooses (nothing is estimated). It takes part in saving
// and refreshing by implementing almanac.Storable and almanac.Refresher
// and registering its kind.
type ewma struct{ Weight float64 }

type ewmaFit struct {
	weight float64
	y      almanac.Series
	level  float64
	fitted []float64
	sigma  float64
}

func (m ewma) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	if !(m.Weight > 0 && m.Weight <= 1) {
		return nil, fmt.Errorf("ewma: %w: weight %v", almanac.ErrInvalid, m.Weight)
	}
	if err := y.Validate(); err != nil {
		return nil, err
	}
	f := &ewmaFit{weight: m.Weight, y: y.Clone(), level: math.NaN()}
	f.run(y.Values)
	return f, nil
}

// run advances the level over v (a missing value leaves it as it is).
func (f *ewmaFit) run(v []float64) {
	for _, x := range v {
		f.fitted = append(f.fitted, f.level)
		switch {
		case math.IsNaN(x):
		case math.IsNaN(f.level):
			f.level = x
		default:
			f.level += f.weight * (x - f.level)
		}
	}
	ss, n := 0.0, 0
	for i, x := range f.y.Values {
		if e := x - f.fitted[i]; !math.IsNaN(e) {
			ss, n = ss+e*e, n+1
		}
	}
	f.sigma = math.Sqrt(ss / math.Max(float64(n), 1))
}

func (f *ewmaFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, err
	}
	mean, sd := make([]float64, h), make([]float64, h)
	for i := range mean {
		mean[i], sd[i] = f.level, f.sigma*math.Sqrt(1+float64(i)*f.weight*f.weight)
	}
	return almanac.NewForecast(f.y.Time(f.y.Len()), f.y.Freq, mean, &almanac.Normal{Mean: mean, SD: sd}, levels...)
}

func (f *ewmaFit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }
func (f *ewmaFit) Residuals() []float64 {
	r := make([]float64, len(f.fitted))
	for i, x := range f.y.Values {
		r[i] = x - f.fitted[i]
	}
	return r
}
func (f *ewmaFit) String() string { return fmt.Sprintf("EWMA(%g)", f.weight) }

// Refresh implements almanac.Refresher: the level runs on over the new
// values with the same weight.
func (f *ewmaFit) Refresh(v []float64) (almanac.Fitted, error) {
	y := f.y.Clone()
	y.Values = append(y.Values, v...)
	if err := y.Validate(); err != nil {
		return nil, err
	}
	g := &ewmaFit{weight: f.weight, y: y, level: f.level, fitted: append([]float64(nil), f.fitted...)}
	g.run(v)
	return g, nil
}

// The saved form: the weight and the data (the level is rebuilt by
// running over them again, which is exact).
type ewmaBody struct {
	Weight float64              `json:"weight"`
	Series almanac.StoredSeries `json:"series"`
}

func (f *ewmaFit) StoredKind() (string, int) { return "example.ewma", 1 }
func (f *ewmaFit) StoredBody() ([]byte, error) {
	return json.Marshal(ewmaBody{Weight: f.weight, Series: almanac.StoreSeries(f.y)})
}

func loadEWMA(_ int, body []byte) (almanac.Fitted, error) {
	var b ewmaBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	return ewma{Weight: b.Weight}.Fit(context.Background(), y) // validates the weight
}

func init() { almanac.Register("example.ewma", 1, loadEWMA) }

// A user's own model saved inside a combination, loaded back, and
// refreshed with a new month (one of two values missing).
func ExampleRegister() {
	y := almanac.Series{Key: "store-3/nails", Start: time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly,
		Values: []float64{40, 42, 41, 45, 44, 47, 46, 49, 48, 52, 51, 53}}
	model := almanac.Combination{Members: []almanac.Model{ewma{Weight: 0.4}, ewma{Weight: 0.8}}}
	fit, err := model.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	var saved bytes.Buffer
	if err := almanac.SaveModel(&saved, fit); err != nil {
		fmt.Println(err)
		return
	}
	loaded, err := almanac.LoadModel(&saved)
	if err != nil {
		fmt.Println(err)
		return
	}
	fresh, err := almanac.Refresh(loaded, []float64{55, math.NaN()})
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, _ := fresh.Forecast(2)
	fmt.Println(loaded)
	fmt.Printf("%s %.3f %.3f\n", fc.Start.Format("2006-01"), fc.Mean[0], fc.Mean[1])
	// Output:
	// mean(EWMA(0.4), EWMA(0.8))
	// 2025-03 53.600 53.600
}

// A refresh policy decides, after each batch of new observations,
// whether refreshing is still enough.
func ExampleRefreshPolicy_Decide() {
	y := almanac.Series{Key: "store-3/nails", Start: time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly,
		Values: []float64{40, 42, 41, 43, 42, 41, 43, 42, 40, 42, 41, 43}}
	fit, _ := ewma{Weight: 0.3}.Fit(context.Background(), y)
	policy := almanac.RefreshPolicy{RefitAfter: 6}
	added := 0
	for _, month := range [][]float64{{42, 41}, {55, 57}, {58, 60}} {
		fit, _ = almanac.Refresh(fit, month)
		added += len(month)
		d, _ := policy.Decide(fit, added)
		fmt.Println(d.Reason)
	}
	// Output:
	// refresh: 2 observations added, tracking signal 0.18 within ±0.50
	// refit: tracking signal 0.79 beyond ±0.50 (the data have run above the forecasts)
	// refit: 6 observations added since the last estimation (refit after 6)
}
