package arima_test

import (
	"context"
	"errors"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/persisttest"
)

func promoFuture(f almanac.Fitted, h int, levels ...float64) (almanac.Forecast, error) {
	fut := make([]float64, h)
	for i := range fut {
		fut[i] = float64(i % 2)
	}
	return f.(*arima.Fitted).ForecastWith(h, [][]float64{fut}, levels...)
}

func TestSavedARIMARoundTrip(t *testing.T) {
	for _, gaps := range []struct {
		name    string
		missing []int
	}{{"complete", nil}, {"missing values", []int{20, 41, 66, 67}}} {
		all, promo := footfall(72, gaps.missing...)
		head := all.Head(60)
		for _, tc := range arimaCases() {
			t.Run(gaps.name+"/"+tc.name, func(t *testing.T) {
				f := fitArima(t, tc.withPromo(promo[:60]), head)
				o := persisttest.Options{H: 10}
				if tc.promo {
					o.Forecast = promoFuture
				}
				g := persisttest.CheckRoundTrip(t, f, o).(*arima.Fitted)
				if c, d := g.Coef(), f.Coef(); len(c) != len(d) || c[0].Value != d[0].Value || c[len(c)-1].StdErr != d[len(d)-1].StdErr {
					t.Errorf("coefficients after loading %v, want %v", c, d)
				}
				if g.AICc() != f.AICc() || g.Method() != f.Method() || g.Converged() != f.Converged() {
					t.Errorf("criteria or method differ after loading")
				}
				// Refreshed, then saved and loaded.
				var r *arima.Fitted
				var err error
				if tc.promo {
					r, err = f.UpdateWith(all.Values[60:], [][]float64{promo[60:]})
				} else {
					r, err = f.Update(all.Values[60:])
				}
				if err != nil {
					t.Fatal(err)
				}
				persisttest.CheckRoundTrip(t, r, o)
			})
		}
	}
}

func TestSavedARIMAOthers(t *testing.T) {
	y, _ := footfall(72)
	weekly := almanac.Series{Key: "w", Start: time.Date(2020, 1, 6, 0, 0, 0, 0, time.UTC), Freq: calendar.Weekly, Values: make([]float64, 160)}
	for i := range weekly.Values {
		weekly.Values[i] = 100 + 10*float64(i%52)/52 + float64((i*31)%7)
		if i >= 90 {
			weekly.Values[i] += 25 // a level shift for the detection
		}
	}
	for _, tc := range []struct {
		name  string
		model almanac.Model
		y     almanac.Series
	}{
		{"CSS", arima.Spec{P: 1, D: 1, Method: arima.CSS}, y},
		{"search", arima.Search{}, y},
		{"harmonic regression", arima.HarmonicRegression{Search: arima.Search{MaxP: 1, MaxQ: 1}}, weekly},
		{"detection", arima.Detection{Orders: &arima.Spec{P: 1}, Kinds: []arima.InterventionKind{arima.LevelShift, arima.AdditiveOutlier}}, weekly},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f, err := tc.model.Fit(context.Background(), tc.y)
			if err != nil {
				t.Fatal(err)
			}
			g := persisttest.CheckRoundTrip(t, f, persisttest.Options{H: 12})
			if d, ok := f.(*arima.DetectionResult); ok {
				e := g.(*arima.DetectionResult)
				if len(d.Found) == 0 || len(e.Found) != len(d.Found) || e.Found[0] != d.Found[0] || e.Base.String() != d.Base.String() {
					t.Errorf("interventions after loading %v, want %v", e.Found, d.Found)
				}
			}
		})
	}
}

func TestSavedARIMATampered(t *testing.T) {
	y, promo := footfall(60)
	f := fitArima(t, arima.Spec{P: 1, D: 1, Calendar: promoEvent, Regressors: []arima.Regressor{{Name: "promo", Values: promo}}}, y)
	setCoef := func(i int, key string, v any) func(map[string]any) {
		return func(b map[string]any) { b["coef"].([]any)[i].(map[string]any)[key] = v }
	}
	persisttest.CheckTampered(t, f, persisttest.Tampers{
		"negative order":               setBody("orders", []any{-1, 1, 0, 0, 0, 0}),
		"order beyond the data":        setBody("orders", []any{100, 1, 0, 0, 0, 0}),
		"unknown method":               setBody("method", "guess"),
		"CSS used for CSS-ML":          setBody("method_used", "CSS"),
		"unknown prior":                setBody("prior", "flat"),
		"coefficient as a string":      setCoef(0, "value", "NaN"),
		"coefficient renamed":          setCoef(0, "name", "ar9"),
		"non-stationary AR":            setCoef(0, "value", 1.5),
		"coefficient missing":          func(b map[string]any) { b["coef"] = b["coef"].([]any)[1:] },
		"regressor too short":          func(b map[string]any) { b["regressors"].([]any)[0].(map[string]any)["values"] = []any{1, 2} },
		"negative variance":            func(b map[string]any) { b["cov"].([]any)[0] = -1.0 },
		"covariance of the wrong size": func(b map[string]any) { b["cov"] = b["cov"].([]any)[1:] },
		"unknown calendar effect": func(b map[string]any) {
			b["calendar"].(map[string]any)["effects"].([]any)[0].(map[string]any)["type"] = "moon"
		},
		"event without a shape": func(b map[string]any) {
			b["calendar"].(map[string]any)["effects"].([]any)[0].(map[string]any)["shape"] = "zigzag"
		},
		"holiday on February 30":          func(b map[string]any) { holiday(b, 1)["day"] = 30.0; holiday(b, 1)["month"] = 2.0 },
		"unknown holiday rule":            func(b map[string]any) { holiday(b, 0)["type"] = "full moon" },
		"estimated on more than there is": setBody("estimated_on", 61),
		"all values missing": func(b map[string]any) {
			v := persisttest.Values(b, "series", "values")
			for i := range v {
				v[i] = nil
			}
		},
		"fixed value differs": setBody("fixed", map[string]any{"ar1": 0.3}),
	})
}

func holiday(b map[string]any, i int) map[string]any {
	eff := b["calendar"].(map[string]any)["effects"].([]any)[2].(map[string]any)
	return eff["calendar"].(map[string]any)["holidays"].([]any)[i].(map[string]any)["rule"].(map[string]any)
}

func setBody(key string, v any) func(map[string]any) {
	return func(b map[string]any) { b[key] = v }
}

// userEffect is an Effect of the caller's own: it cannot be saved.
type userEffect struct{}

func (userEffect) Columns(g calendar.Grid) ([]calendar.Column, error) {
	v := make([]float64, g.N+g.H)
	for i := range v {
		v[i] = float64(i % 3)
	}
	return []calendar.Column{{Name: "thirds", Values: v}}, nil
}

func TestSaveARIMAUserEffect(t *testing.T) {
	y, _ := footfall(60)
	f := fitArima(t, arima.Spec{P: 1, Calendar: calendar.Design{Effects: []calendar.Effect{userEffect{}}}}, y)
	if _, err := almanac.MarshalModel(f); !errors.Is(err, almanac.ErrInvalid) {
		t.Fatalf("saving a model with a user's calendar effect: %v", err)
	}
}
