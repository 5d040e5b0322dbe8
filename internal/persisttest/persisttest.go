// Package persisttest holds the checks shared by the saved-model tests of
// every package: a round trip through almanac.MarshalModel and
// almanac.UnmarshalModel must give a model that forecasts bit-identically,
// and a tampered document must fail with an error wrapping
// almanac.ErrDecode.
package persisttest

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/almanac-go/almanac"
)

// Options says what CheckRoundTrip compares beyond point forecasts.
type Options struct {
	H      int       // horizon (default 8)
	Levels []float64 // interval levels (default 80, 95)
	// Forecast, when set, replaces f.Forecast (models that need future
	// regressor values).
	Forecast func(f almanac.Fitted, h int, levels ...float64) (almanac.Forecast, error)
}

// CheckRoundTrip saves f, loads it back and checks that the loaded model
// has the same String, fitted values and residuals, forecasts the same
// means, bands and quantiles bit for bit, simulates the same paths from
// the same source (when f is an almanac.Simulator), and saves to the
// same document. It returns the loaded model.
func CheckRoundTrip(t testing.TB, f almanac.Fitted, o Options) almanac.Fitted {
	t.Helper()
	if o.H == 0 {
		o.H = 8
	}
	if o.Levels == nil {
		o.Levels = []float64{80, 95}
	}
	fc := o.Forecast
	if fc == nil {
		fc = func(f almanac.Fitted, h int, levels ...float64) (almanac.Forecast, error) {
			return f.Forecast(h, levels...)
		}
	}
	doc, err := almanac.MarshalModel(f)
	if err != nil {
		t.Fatalf("MarshalModel(%s): %v", f, err)
	}
	g, err := almanac.UnmarshalModel(doc)
	if err != nil {
		t.Fatalf("UnmarshalModel(%s): %v\n%s", f, err, clip(doc))
	}
	if g.String() != f.String() {
		t.Errorf("String: loaded %q, saved %q", g, f)
	}
	Same(t, "fitted values", g.FittedValues(), f.FittedValues())
	Same(t, "residuals", g.Residuals(), f.Residuals())
	Same(t, "response residuals", almanac.ResponseResiduals(g), almanac.ResponseResiduals(f))
	if pc, ok := f.(almanac.ParamCounter); ok {
		if pg, ok := g.(almanac.ParamCounter); !ok || pg.NumParams() != pc.NumParams() {
			t.Errorf("NumParams differ after loading")
		}
	}
	want, errW := fc(f, o.H, o.Levels...)
	got, errG := fc(g, o.H, o.Levels...)
	if (errW == nil) != (errG == nil) {
		t.Fatalf("Forecast errors differ: saved %v, loaded %v", errW, errG)
	}
	if errW == nil {
		SameForecast(t, got, want)
	}
	if sw, ok := f.(almanac.Simulator); ok {
		sg, ok := g.(almanac.Simulator)
		if !ok {
			t.Fatalf("loaded %s does not simulate", g)
		}
		pw, errW := sw.Simulate(o.H, 5, rand.NewPCG(7, 11))
		pg, errG := sg.Simulate(o.H, 5, rand.NewPCG(7, 11))
		if (errW == nil) != (errG == nil) {
			t.Fatalf("Simulate errors differ: saved %v, loaded %v", errW, errG)
		}
		for i := range pw {
			Same(t, "sample path", pg[i], pw[i])
		}
	}
	again, err := almanac.MarshalModel(g)
	if err != nil {
		t.Fatalf("MarshalModel(loaded): %v", err)
	}
	if !bytes.Equal(again, doc) {
		t.Errorf("the document changed on a second save:\nfirst  %s\nsecond %s", clip(doc), clip(again))
	}
	return g
}

// SameForecast fails unless the forecasts are bit-identical: start,
// means, bands, and the quantiles at a few probabilities.
func SameForecast(t testing.TB, got, want almanac.Forecast) {
	t.Helper()
	if !got.Start.Equal(want.Start) || got.Freq != want.Freq {
		t.Errorf("forecast axis: got %v %v, want %v %v", got.Start, got.Freq, want.Start, want.Freq)
	}
	Same(t, "point forecasts", got.Mean, want.Mean)
	if len(got.Intervals) != len(want.Intervals) {
		t.Fatalf("%d intervals, want %d", len(got.Intervals), len(want.Intervals))
	}
	for i := range want.Intervals {
		Same(t, "lower bounds", got.Intervals[i].Lower, want.Intervals[i].Lower)
		Same(t, "upper bounds", got.Intervals[i].Upper, want.Intervals[i].Upper)
	}
	if want.Dist != nil {
		for _, p := range []float64{0.05, 0.5, 0.9} {
			qw, _ := want.Quantile(p)
			qg, err := got.Quantile(p)
			if err != nil {
				t.Fatalf("Quantile(%v) of the loaded model: %v", p, err)
			}
			Same(t, "quantiles", qg, qw)
		}
	}
}

// Same fails unless got and want have the same length and the same bits
// (NaN equal to NaN).
func Same(t testing.TB, what string, got, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d values, want %d", what, len(got), len(want))
	}
	for i := range want {
		if math.Float64bits(got[i]) != math.Float64bits(want[i]) && !(math.IsNaN(got[i]) && math.IsNaN(want[i])) {
			t.Fatalf("%s[%d] = %v, want %v (not bit-identical)", what, i, got[i], want[i])
		}
	}
}

// Close fails unless got and want agree to tol relative to the largest
// |want| (NaN only where want is NaN).
func Close(t testing.TB, what string, got, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d values, want %d", what, len(got), len(want))
	}
	scale := 0.0
	for _, w := range want {
		if !math.IsNaN(w) {
			scale = math.Max(scale, math.Abs(w))
		}
	}
	scale = math.Max(scale, 1e-300)
	for i := range want {
		if math.IsNaN(want[i]) != math.IsNaN(got[i]) || math.Abs(got[i]-want[i]) > tol*scale {
			t.Fatalf("%s[%d] = %v, want %v (tolerance %g relative to %g)", what, i, got[i], want[i], tol, scale)
		}
	}
}

// Tampers are named changes to a saved document: each receives the body
// of the outer document decoded as a JSON object and changes it in
// place.
type Tampers map[string]func(body map[string]any)

// CheckTampered applies each tamper to the document of f and checks that
// loading the result fails with an error wrapping almanac.ErrDecode (and
// does not panic).
func CheckTampered(t *testing.T, f almanac.Fitted, tampers Tampers) {
	t.Helper()
	doc, err := almanac.MarshalModel(f)
	if err != nil {
		t.Fatalf("MarshalModel: %v", err)
	}
	names := make([]string, 0, len(tampers))
	for name := range tampers {
		names = append(names, name)
	}
	slices.Sort(names)
	for _, name := range names {
		edit := tampers[name]
		t.Run(name, func(t *testing.T) {
			var env map[string]any
			if err := json.Unmarshal(doc, &env); err != nil {
				t.Fatal(err)
			}
			body, ok := env["body"].(map[string]any)
			if !ok {
				t.Fatalf("document has no body object")
			}
			edit(body)
			bad, err := json.Marshal(env)
			if err != nil {
				t.Fatal(err)
			}
			g, err := almanac.UnmarshalModel(bad)
			if !errors.Is(err, almanac.ErrDecode) {
				t.Fatalf("loading the tampered document: got %v, %v; want an error wrapping ErrDecode", g, err)
			}
		})
	}
}

// Values returns body[key] as a []any of numbers (for tampering with
// stored series and vectors).
func Values(body map[string]any, path ...string) []any {
	var cur any = body
	for _, p := range path {
		m, ok := cur.(map[string]any)
		if !ok {
			return nil
		}
		cur = m[p]
	}
	v, _ := cur.([]any)
	return v
}

func clip(b []byte) string {
	if len(b) > 600 {
		return string(b[:600]) + "…"
	}
	return string(b)
}
