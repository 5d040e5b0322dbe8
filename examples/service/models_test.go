package main

import (
	"bytes"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"image/png"
	"math"
	"net/http"
	"strings"
	"testing"

	"github.com/almanac-go/almanac"
)

type forecastBody struct {
	ModelID int64     `json:"model_id"`
	Model   string    `json:"model"`
	Series  string    `json:"series"`
	Unit    string    `json:"unit"`
	Every   int       `json:"every"`
	Times   []string  `json:"times"`
	Mean    []float64 `json:"mean"`
	Bands   []bandOut `json:"bands"`
}

// sameBits reports whether two forecasts hold the same float64 bits.
func sameBits(a, b forecastBody) error {
	eq := func(what string, x, y []float64) error {
		if len(x) != len(y) {
			return fmt.Errorf("%s: %d values, want %d", what, len(x), len(y))
		}
		for i := range x {
			if math.Float64bits(x[i]) != math.Float64bits(y[i]) {
				return fmt.Errorf("%s[%d] = %v (bits %x), want %v (bits %x)", what, i, x[i], math.Float64bits(x[i]), y[i], math.Float64bits(y[i]))
			}
		}
		return nil
	}
	if a.Model != b.Model || len(a.Bands) != len(b.Bands) || strings.Join(a.Times, ",") != strings.Join(b.Times, ",") {
		return fmt.Errorf("forecast of %q with %d bands at %v, want %q with %d bands at %v", a.Model, len(a.Bands), a.Times, b.Model, len(b.Bands), b.Times)
	}
	if err := eq("mean", a.Mean, b.Mean); err != nil {
		return err
	}
	for i := range a.Bands {
		if a.Bands[i].Level != b.Bands[i].Level {
			return fmt.Errorf("band %d at level %v, want %v", i, a.Bands[i].Level, b.Bands[i].Level)
		}
		if err := eq(fmt.Sprintf("band %v lower", a.Bands[i].Level), a.Bands[i].Lower, b.Bands[i].Lower); err != nil {
			return err
		}
		if err := eq(fmt.Sprintf("band %v upper", a.Bands[i].Level), a.Bands[i].Upper, b.Bands[i].Upper); err != nil {
			return err
		}
	}
	return nil
}

// fromLibrary turns a forecast of the library into the response shape.
func fromLibrary(fc almanac.Forecast) forecastBody {
	o := forecastBody{Mean: fc.Mean}
	for _, iv := range fc.Intervals {
		o.Bands = append(o.Bands, bandOut{Level: iv.Level, Lower: iv.Lower, Upper: iv.Upper})
	}
	return o
}

func TestFitAndForecast(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	var listed struct{ Methods []methodInfo }
	ts.must(http.StatusOK, "GET", "/v1/methods", "", &listed)
	if len(listed.Methods) != len(methods) {
		t.Errorf("%d methods listed, want %d", len(listed.Methods), len(methods))
	}

	ets := ts.fit("north/paint", "ets", "")
	if ets.ID < 1 || ets.Method != "ets" || !strings.HasPrefix(ets.Model, "ETS(") || ets.Stored != FormDocument || ets.Seen != 48 {
		t.Fatalf("ets fit: %+v", ets)
	}
	var fc forecastBody
	ts.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d/forecast?h=6&level=50&level=90", ets.ID), "", &fc)
	if fc.ModelID != ets.ID || fc.Series != "north/paint" || fc.Unit != "month" || len(fc.Mean) != 6 || len(fc.Bands) != 2 || fc.Times[0] != "2025-01-01T00:00:00Z" {
		t.Fatalf("forecast: %+v", fc)
	}
	for s := range fc.Mean {
		if b := fc.Bands; !(b[1].Lower[s] <= b[0].Lower[s] && b[0].Lower[s] <= fc.Mean[s] && fc.Mean[s] <= b[0].Upper[s] && b[0].Upper[s] <= b[1].Upper[s]) {
			t.Errorf("step %d: bands not nested around the mean: %+v", s+1, b)
		}
	}
	// Defaults: 12 steps, bands at 80 and 95.
	var def forecastBody
	ts.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d/forecast", ets.ID), "", &def)
	if len(def.Mean) != DefaultHorizon || len(def.Bands) != 2 || def.Bands[0].Level != 80 || def.Bands[1].Level != 95 {
		t.Errorf("default forecast: %d steps, bands %+v", len(def.Mean), def.Bands)
	}

	// The document is the library's: LoadModel rebuilds the model, which
	// forecasts what the service does, bit for bit.
	doc := ts.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d/document", ets.ID), "", nil)
	fit, err := almanac.LoadModel(bytes.NewReader(doc))
	if err != nil {
		t.Fatal(err)
	}
	lib, err := fit.Forecast(6, 50, 90)
	if err != nil {
		t.Fatal(err)
	}
	want := fromLibrary(lib)
	want.Model, want.Times = fc.Model, fc.Times
	if err := sameBits(fc, want); err != nil {
		t.Errorf("service and LoadModel disagree: %v", err)
	}

	var one modelInfo
	ts.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d", ets.ID), "", &one)
	if one.ID != ets.ID || one.Model != ets.Model {
		t.Errorf("model %d: %+v", ets.ID, one)
	}
	ts.fit("north/hoses", "naive", "")
	var list struct{ Models []modelInfo }
	ts.must(http.StatusOK, "GET", "/v1/models?series=north%2Fhoses", "", &list)
	if len(list.Models) != 1 || list.Models[0].Method != "naive" {
		t.Errorf("models of north/hoses: %+v", list.Models)
	}
	ts.must(http.StatusOK, "GET", "/v1/models", "", &list)
	if len(list.Models) != 2 {
		t.Errorf("%d models listed, want 2", len(list.Models))
	}
}

func TestBadModelRequests(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	ets := ts.fit("north/paint", "theta", "")
	id := fmt.Sprint(ets.ID)
	tests := []struct {
		name, method, path, body string
		status                   int
		kind, field              string
	}{
		{"unknown model", "GET", "/v1/models/999", "", 404, kindNotFound, ""},
		{"model id not a number", "GET", "/v1/models/paint", "", 404, kindNotFound, ""},
		{"forecast of unknown model", "GET", "/v1/models/999/forecast", "", 404, kindNotFound, ""},
		{"chart of unknown model", "GET", "/v1/models/999/chart", "", 404, kindNotFound, ""},
		{"document of unknown model", "GET", "/v1/models/999/document", "", 404, kindNotFound, ""},
		{"refresh of unknown model", "POST", "/v1/models/999/refresh", "", 404, kindNotFound, ""},
		{"unknown series", "GET", "/v1/series/nowhere", "", 404, kindNotFound, ""},
		{"fit of unknown series", "POST", "/v1/models", `{"series": "nowhere", "method": "ets"}`, 404, kindNotFound, ""},
		{"backtest of unknown series", "POST", "/v1/series/nowhere/backtest", `{"methods": ["theta"]}`, 404, kindNotFound, ""},
		{"review of unknown series", "GET", "/v1/review?series=nowhere", "", 404, kindNotFound, ""},
		{"unknown route", "GET", "/v2/everything", "", 404, kindNotFound, ""},
		{"unknown method", "POST", "/v1/models", `{"series": "north/paint", "method": "crystal-ball"}`, 400, kindInvalid, "method"},
		{"no series", "POST", "/v1/models", `{"method": "ets"}`, 400, kindInvalid, "series"},
		{"seed for a method without paths", "POST", "/v1/models", `{"series": "north/paint", "method": "ets", "seed": 3}`, 400, kindInvalid, "seed"},
		{"negative paths", "POST", "/v1/models", `{"series": "north/paint", "paths": -1}`, 400, kindInvalid, "paths"},
		{"fit body malformed", "POST", "/v1/models", `{"series": "north/paint",`, 400, kindInvalid, ""},
		{"fit field of wrong type", "POST", "/v1/models", `{"series": 7}`, 400, kindInvalid, "series"},
		{"horizon zero", "GET", "/v1/models/" + id + "/forecast?h=0", "", 400, kindInvalid, "h"},
		{"horizon too long", "GET", "/v1/models/" + id + "/forecast?h=100000", "", 400, kindInvalid, "h"},
		{"level 100", "GET", "/v1/models/" + id + "/forecast?level=100", "", 400, kindInvalid, "level"},
		{"level not a number", "GET", "/v1/models/" + id + "/forecast?level=high", "", 400, kindInvalid, "level"},
		{"chart format", "GET", "/v1/models/" + id + "/chart?format=gif", "", 400, kindInvalid, "format"},
		{"chart size", "GET", "/v1/models/" + id + "/chart?width=5", "", 400, kindInvalid, "width"},
		{"refresh policy out of range", "POST", "/v1/models/" + id + "/refresh", `{"signal_limit": 2}`, 400, kindInvalid, ""},
		{"refresh body unknown member", "POST", "/v1/models/" + id + "/refresh", `{"every": 2}`, 400, kindInvalid, ""},
		{"backtest of a benchmark", "POST", "/v1/series/north%2Fpaint/backtest", `{"methods": ["naive"]}`, 400, kindInvalid, "methods[0]"},
		{"backtest method twice", "POST", "/v1/series/north%2Fpaint/backtest", `{"methods": ["theta", "theta"]}`, 400, kindInvalid, "methods[1]"},
		{"backtest level", "POST", "/v1/series/north%2Fpaint/backtest", `{"methods": ["theta"], "levels": [0]}`, 400, kindInvalid, "levels[0]"},
		{"backtest origins", "POST", "/v1/series/north%2Fpaint/backtest", `{"methods": ["theta"], "origins": 1000}`, 400, kindInvalid, "origins"},
		{"method not allowed", "DELETE", "/v1/models/" + id, "", 405, kindMethod, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ct := ""
			if tt.body != "" {
				ct = "application/json"
			}
			status, b := ts.do(tt.method, tt.path, ct, tt.body)
			if status != tt.status {
				t.Fatalf("status %d, want %d: %s", status, tt.status, b)
			}
			if tt.kind == "" {
				return
			}
			if p := problemOf(t, b); p.Kind != tt.kind || p.Field != tt.field || p.Detail == "" {
				t.Errorf("problem %+v, want kind %q field %q", p, tt.kind, tt.field)
			}
		})
	}
	// A series too short for any model of the method: 422, nothing stored.
	ts.must(http.StatusCreated, "POST", "/v1/series", `{"series": [`+seriesJSON("east/rope", "2024-01", "month", []float64{5})+`]}`, nil)
	status, b := ts.do("POST", "/v1/models", "application/json", `{"series": "east/rope", "method": "arima"}`)
	if p := problemOf(t, b); status != http.StatusUnprocessableEntity || p.Kind != kindCannotFit {
		t.Errorf("arima on one value: %d %+v", status, p)
	}
	var list struct{ Models []modelInfo }
	ts.must(http.StatusOK, "GET", "/v1/models", "", &list)
	if len(list.Models) != 1 {
		t.Errorf("%d models stored, want 1", len(list.Models))
	}
}

func TestChart(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	m := ts.fit("north/paint", "theta", "")
	status, b := ts.do("GET", fmt.Sprintf("/v1/models/%d/chart?format=png&width=320&height=200&h=6", m.ID), "", "")
	if status != 200 {
		t.Fatalf("png: %d %s", status, b)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if r := img.Bounds(); r.Dx() != 320 || r.Dy() != 200 {
		t.Errorf("png of %d × %d, want 320 × 200", r.Dx(), r.Dy())
	}
	status, b = ts.do("GET", fmt.Sprintf("/v1/models/%d/chart", m.ID), "", "")
	if status != 200 {
		t.Fatalf("svg: %d %s", status, b)
	}
	var svg struct {
		XMLName xml.Name
		Width   string `xml:"width,attr"`
		Height  string `xml:"height,attr"`
	}
	// 960 × 420 pixels by default, written in points (3/4 of a pixel).
	if err := xml.Unmarshal(b, &svg); err != nil || svg.XMLName.Local != "svg" || svg.Width != "720pt" || svg.Height != "315pt" {
		t.Fatalf("not an SVG document (%v): %.200s", err, b)
	}
}

func TestBacktest(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	var out compareOut
	ts.must(http.StatusOK, "POST", "/v1/series/north%2Fpaint/backtest", `{"methods": ["theta", "ets"], "horizon": 6, "origins": 2, "levels": [80]}`, &out)
	if out.Series != "north/paint" || out.Horizon != 6 || out.Period != 12 || len(out.Origins) != 2 || out.Baseline != "seasonal naive" {
		t.Fatalf("backtest: %+v", out)
	}
	names := []string{}
	for _, r := range out.Runs {
		names = append(names, r.Name)
		if r.Done != 2 || len(r.Fits) != 2 || r.Scores.Cells != 12 || len(r.Scores.Bands) != 1 {
			t.Errorf("run %s: %+v", r.Name, r)
		}
	}
	if got := strings.Join(names, ","); got != "theta,ets,naive,seasonal naive" {
		t.Errorf("runs %s", got)
	}
	// The baseline's ratios to itself are 1.
	last := out.Runs[len(out.Runs)-1]
	if last.Relative.MASE != 1 || !last.Benchmark || out.Runs[0].Benchmark {
		t.Errorf("baseline run: %+v", last)
	}
	// JSON of a run in the response has null for an undefined score.
	b, _ := json.Marshal(num(math.NaN()))
	if string(b) != "null" {
		t.Errorf("NaN encodes as %s", b)
	}
}

func TestReviewPage(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	a := ts.fit("north/paint", "theta", "")
	b := ts.fit("north/hoses", "seasonal-naive", "")
	status, page := ts.do("GET", "/v1/review?h=6&level=80", "", "")
	if status != 200 {
		t.Fatalf("review: %d %s", status, page)
	}
	for _, want := range []string{fmt.Sprintf("north/paint · model %d", a.ID), fmt.Sprintf("north/hoses · model %d", b.ID), "<svg", a.Model} {
		if !bytes.Contains(page, []byte(want)) {
			t.Errorf("the page lacks %q", want)
		}
	}
	// The page is well-formed XML (accuracy.WriteReview promises it).
	dec := xml.NewDecoder(bytes.NewReader(page))
	dec.Strict = true
	dec.Entity = xml.HTMLEntity
	for {
		if _, err := dec.Token(); err != nil {
			if err.Error() != "EOF" {
				t.Errorf("page is not well-formed: %v", err)
			}
			break
		}
	}
	status, page = ts.do("GET", "/v1/review?series=north%2Fhoses", "", "")
	if status != 200 || bytes.Contains(page, []byte("north/paint · model")) {
		t.Errorf("review of north/hoses: %d, holds north/paint: %v", status, bytes.Contains(page, []byte("north/paint · model")))
	}
}

func TestReviewWithoutModels(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	status, b := ts.do("GET", "/v1/review", "", "")
	if p := problemOf(t, b); status != 404 || p.Kind != kindNotFound {
		t.Errorf("empty review: %d %+v", status, p)
	}
}

// TestDamagedStoredModel checks that a stored document damaged in the
// database is answered with 500 (the service's problem), not a panic
// and not a client error.
func TestDamagedStoredModel(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	m := ts.fit("north/paint", "theta", "")
	if _, err := ts.store.db.Exec(`UPDATE models SET body = substr(body, 1, 40) WHERE id = ?`, m.ID); err != nil {
		t.Fatal(err)
	}
	status, b := ts.do("GET", fmt.Sprintf("/v1/models/%d/forecast", m.ID), "", "")
	if p := problemOf(t, b); status != http.StatusInternalServerError || p.Kind != kindStore || !strings.Contains(p.Detail, "cannot decode saved model") {
		t.Errorf("damaged model: %d %+v", status, p)
	}
}
