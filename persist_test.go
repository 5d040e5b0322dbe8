package almanac_test

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/persisttest"
)

// persistSeries is invented demo data: monthly sales of a fictional
// hardware store, with a gap.
func persistSeries(missing bool) almanac.Series {
	v := make([]float64, 40)
	for i := range v {
		v[i] = 100 + 2*float64(i) + 15*math.Sin(2*math.Pi*float64(i)/12) + float64((i*37)%11)
	}
	if missing {
		v[7], v[20] = math.NaN(), math.NaN()
	}
	return almanac.Series{Key: "store-7/paint", Start: time.Date(2022, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

func mustFit(t *testing.T, m almanac.Model, y almanac.Series) almanac.Fitted {
	t.Helper()
	f, err := m.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("Fit(%T): %v", m, err)
	}
	return f
}

func TestSavedModelRoundTrip(t *testing.T) {
	bench := []almanac.Model{almanac.Naive{}, almanac.SeasonalNaive{}, almanac.Drift{}, almanac.Mean{}}
	cases := []struct {
		name    string
		model   almanac.Model
		missing bool
	}{
		{"naive", almanac.Naive{}, false},
		{"naive/missing", almanac.Naive{}, true},
		{"seasonal naive", almanac.SeasonalNaive{}, true},
		{"seasonal naive/period 4", almanac.SeasonalNaive{Period: 4}, false},
		{"drift", almanac.Drift{}, true},
		{"mean", almanac.Mean{}, true},
		{"box-cox/guerrero", almanac.BoxCox{Model: almanac.Drift{}}, false},
		{"box-cox/fixed bias-adjusted", almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed, Lambda: 0.3, BiasAdjust: true}, true},
		{"box-cox/negative lambda", almanac.BoxCox{Model: almanac.Mean{}, Method: almanac.LambdaFixed, Lambda: -0.5}, false},
		{"box-cox/nested", almanac.BoxCox{Model: almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed, Lambda: 0.5}, Method: almanac.LambdaFixed}, false},
		{"combination/mean", almanac.Combination{Members: bench, Seed: 3, Paths: 200}, false},
		{"combination/median", almanac.Combination{Members: bench, Rule: almanac.CombineMedian, Paths: 100}, true},
		{"combination/weighted", almanac.Combination{Members: bench, Rule: almanac.CombineWeighted, Weights: []float64{1, 0, 2, 1}, Paths: 100}, false},
		{"combination/inverse error", almanac.Combination{Members: bench, Rule: almanac.CombineInverseError, Paths: 100}, false},
		{"combination/with failure", almanac.Combination{Members: []almanac.Model{almanac.Drift{}, almanac.SeasonalNaive{Period: 100}}, Paths: 50}, false},
		{"combination/of box-cox", almanac.Combination{Members: []almanac.Model{almanac.BoxCox{Model: almanac.Drift{}}, almanac.Naive{}}, Paths: 50}, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			f := mustFit(t, tc.model, persistSeries(tc.missing))
			persisttest.CheckRoundTrip(t, f, persisttest.Options{H: 14})
		})
	}
}

func TestSavedCombinationKeepsFailures(t *testing.T) {
	f := mustFit(t, almanac.Combination{Members: []almanac.Model{almanac.Drift{}, almanac.SeasonalNaive{Period: 100}}}, persistSeries(false))
	g := persisttest.CheckRoundTrip(t, f, persisttest.Options{})
	fl := g.(*almanac.CombinationFit).Failures()
	want := f.(*almanac.CombinationFit).Failures()
	if len(fl) != 1 || fl[0].Index != want[0].Index || fl[0].Err.Error() != want[0].Err.Error() {
		t.Fatalf("failures after loading: %v, want %v", fl, want)
	}
}

func setNumber(path string, v any) func(map[string]any) {
	return func(b map[string]any) {
		keys := strings.Split(path, ".")
		cur := b
		for _, k := range keys[:len(keys)-1] {
			cur = cur[k].(map[string]any)
		}
		cur[keys[len(keys)-1]] = v
	}
}

func TestSavedModelTampered(t *testing.T) {
	y := persistSeries(false)
	t.Run("benchmark", func(t *testing.T) {
		persisttest.CheckTampered(t, mustFit(t, almanac.SeasonalNaive{}, y), persisttest.Tampers{
			"unknown method":         setNumber("method", "oracle"),
			"period 0":               setNumber("period", 0),
			"period beyond the data": setNumber("period", 1000),
			"NaN as a string":        func(b map[string]any) { persisttest.Values(b, "series", "values")[3] = "NaN" },
			"infinite value":         func(b map[string]any) { persisttest.Values(b, "series", "values")[3] = json.Number("1e999") },
			"all missing": func(b map[string]any) {
				v := persisttest.Values(b, "series", "values")
				for i := range v {
					v[i] = nil
				}
			},
			"no values":      setNumber("series.values", []any{}),
			"bad unit":       setNumber("series.unit", "fortnight"),
			"unknown member": setNumber("extra", 1),
			"method changed (model string no longer matches)": setNumber("method", "mean"),
		})
	})
	t.Run("box-cox", func(t *testing.T) {
		persisttest.CheckTampered(t, mustFit(t, almanac.BoxCox{Model: almanac.Drift{}}, y), persisttest.Tampers{
			"lambda as a string": setNumber("lambda", "NaN"),
			"negative data for log": func(b map[string]any) {
				b["lambda"] = 0.0
				persisttest.Values(b, "series", "values")[2] = -4.0
			},
			"inner of another length": func(b map[string]any) {
				v := persisttest.Values(b, "series", "values")
				setNumber("series.values", v[:len(v)-1])(b)
			},
			"inner unknown kind": setNumber("inner.kind", "nobody.model"),
			"inner missing":      func(b map[string]any) { delete(b, "inner") },
		})
	})
	t.Run("combination", func(t *testing.T) {
		f := mustFit(t, almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Drift{}}, Rule: almanac.CombineInverseError}, y)
		persisttest.CheckTampered(t, f, persisttest.Tampers{
			"unknown rule":         setNumber("rule", "vote"),
			"negative weight":      func(b map[string]any) { b["members"].([]any)[0].(map[string]any)["weight"] = -0.2 },
			"negative mse":         func(b map[string]any) { b["members"].([]any)[0].(map[string]any)["mse"] = []any{-1.0} },
			"indexes out of order": func(b map[string]any) { b["members"].([]any)[1].(map[string]any)["index"] = 0.0 },
			"no members":           setNumber("members", []any{}),
			"zero paths":           setNumber("paths", 0),
			"huge paths":           setNumber("paths", 1e9),
			"negative seed":        setNumber("seed", -1),
		})
	})
}

func TestLoadModelRejects(t *testing.T) {
	f := mustFit(t, almanac.Drift{}, persistSeries(true))
	doc, err := almanac.MarshalModel(f)
	if err != nil {
		t.Fatal(err)
	}
	edit := func(from, to string) []byte { return []byte(strings.Replace(string(doc), from, to, 1)) }
	cases := []struct {
		name string
		data []byte
	}{
		{"empty", nil},
		{"not json", []byte("ETS(A,N,N)")},
		{"truncated", doc[:len(doc)/2]},
		{"trailing data", append(append([]byte{}, doc...), []byte(` {}`)...)},
		{"array", []byte(`[1,2]`)},
		{"not a saved model", edit(`"almanac":"fitted-model"`, `"almanac":"forecast"`)},
		{"unknown kind", edit(`"kind":"almanac.benchmark"`, `"kind":"almanac.crystal-ball"`)},
		{"newer version", edit(`"version":1`, `"version":2`)},
		{"version zero", edit(`"version":1`, `"version":0`)},
		{"no body", edit(`"body":{`, `"nobody":{`)},
		{"null body", []byte(`{"almanac":"fitted-model","kind":"almanac.benchmark","version":1,"model":"Drift","body":null}`)},
		{"model string differs", edit(`"model":"Drift"`, `"model":"Naive"`)},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := almanac.UnmarshalModel(tc.data)
			if !errors.Is(err, almanac.ErrDecode) || g != nil {
				t.Fatalf("got %v, %v; want an error wrapping ErrDecode", g, err)
			}
			if _, err := almanac.LoadModel(bytes.NewReader(tc.data)); !errors.Is(err, almanac.ErrDecode) {
				t.Fatalf("LoadModel: %v", err)
			}
		})
	}
}

func TestSaveModelNotStorable(t *testing.T) {
	var buf bytes.Buffer
	err := almanac.SaveModel(&buf, notStorable{})
	if !errors.Is(err, almanac.ErrInvalid) {
		t.Fatalf("SaveModel of a model without StoredKind: %v", err)
	}
	if _, err := almanac.MarshalModel(nil); !errors.Is(err, almanac.ErrInvalid) {
		t.Fatalf("MarshalModel(nil): %v", err)
	}
}

type notStorable struct{ almanac.Fitted }

func (notStorable) String() string { return "opaque" }

func TestSaveLoadStream(t *testing.T) {
	f := mustFit(t, almanac.SeasonalNaive{}, persistSeries(true))
	var buf bytes.Buffer
	if err := almanac.SaveModel(&buf, f); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), "null") {
		t.Errorf("a missing value should be written as null: %s", buf.String())
	}
	g, err := almanac.LoadModel(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if g.String() != f.String() {
		t.Fatalf("loaded %s, saved %s", g, f)
	}
	kinds := almanac.RegisteredKinds()
	for _, k := range []string{"almanac.benchmark", "almanac.boxcox", "almanac.combination"} {
		found := false
		for _, have := range kinds {
			found = found || have == k
		}
		if !found {
			t.Errorf("kind %q is not registered (have %v)", k, kinds)
		}
	}
}

func TestRegisterPanicsOnMisuse(t *testing.T) {
	for _, tc := range []struct {
		name string
		call func()
	}{
		{"duplicate", func() {
			almanac.Register("almanac.benchmark", 1, func(int, []byte) (almanac.Fitted, error) { return nil, nil })
		}},
		{"empty kind", func() { almanac.Register("", 1, func(int, []byte) (almanac.Fitted, error) { return nil, nil }) }},
		{"nil loader", func() { almanac.Register("test.nil", 1, nil) }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Fatal("no panic")
				}
			}()
			tc.call()
		})
	}
}

// FuzzUnmarshalModel checks that no input makes the decoder panic, that
// every failure wraps ErrDecode, and that whatever loads saves again and
// loads to the same document.
func FuzzUnmarshalModel(f *testing.F) {
	y := persistSeries(true)
	for _, m := range []almanac.Model{
		almanac.Naive{}, almanac.SeasonalNaive{}, almanac.Drift{}, almanac.Mean{},
		almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed, Lambda: 0.5},
		almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Mean{}}, Paths: 20},
	} {
		fit, err := m.Fit(context.Background(), y)
		if err != nil {
			f.Fatal(err)
		}
		doc, err := almanac.MarshalModel(fit)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(doc)
	}
	f.Add([]byte(`{"almanac":"fitted-model","kind":"almanac.boxcox","version":1,"model":"x","body":{"inner":{}}}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := almanac.UnmarshalModel(data)
		if err != nil {
			if !errors.Is(err, almanac.ErrDecode) {
				t.Fatalf("error not wrapping ErrDecode: %v", err)
			}
			return
		}
		doc, err := almanac.MarshalModel(g)
		if err != nil {
			t.Fatalf("a loaded model does not save: %v", err)
		}
		h, err := almanac.UnmarshalModel(doc)
		if err != nil {
			t.Fatalf("a saved loaded model does not load: %v", err)
		}
		if h.String() != g.String() {
			t.Fatalf("%s became %s", g, h)
		}
		if fc, err := g.Forecast(3, 80); err == nil {
			for _, v := range fc.Mean {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("forecast %v with a nil error", fc.Mean)
				}
			}
		}
	})
}

func TestSaveZeroValues(t *testing.T) {
	for _, f := range []almanac.Fitted{(*almanac.BenchmarkFit)(nil), &almanac.BenchmarkFit{}, &almanac.BoxCoxFit{}, &almanac.CombinationFit{}} {
		if _, err := almanac.MarshalModel(f); !errors.Is(err, almanac.ErrNotFitted) {
			t.Errorf("MarshalModel(%T zero value): %v", f, err)
		}
	}
}
