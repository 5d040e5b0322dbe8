package main

import (
	"bytes"
	"encoding/json"
	"io"
	"math"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"strings"
	"testing"
)

// Invented demo data: monthly sales of paint and of garden hoses at a
// fictional chain of hardware stores (a trend, a yearly cycle and a
// little deterministic wobble), and quarterly sales of ladders.
func paintSales(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 200 + 1.5*float64(i) + 30*math.Sin(2*math.Pi*float64(i)/12) + 7*math.Sin(float64(i)*1.7)
	}
	return v
}

func hoseSales(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 80 + 40*math.Max(0, math.Sin(2*math.Pi*float64(i-2)/12)) + 5*math.Cos(float64(i)*2.3)
	}
	return v
}

func seriesJSON(key, start, unit string, v []float64) string {
	b, _ := json.Marshal(map[string]any{"key": key, "start": start, "unit": unit, "values": v})
	return string(b)
}

// testService is a server on a database file in a test directory.
type testService struct {
	t     *testing.T
	path  string
	store *SQLiteStore
	srv   *Server
	http  *httptest.Server
}

func openService(t *testing.T, path string, lim Limits) *testService {
	t.Helper()
	st, err := OpenSQLite(path)
	if err != nil {
		t.Fatal(err)
	}
	s := NewServer(st, lim)
	ts := &testService{t: t, path: path, store: st, srv: s, http: httptest.NewServer(s.Handler())}
	t.Cleanup(ts.close)
	return ts
}

func newService(t *testing.T) *testService {
	return openService(t, filepath.Join(t.TempDir(), "plan.db"), Limits{})
}

// close stops the server and closes the store (twice is harmless).
func (ts *testService) close() {
	if ts.http != nil {
		ts.http.Close()
		ts.http = nil
		if err := ts.store.Close(); err != nil {
			ts.t.Error(err)
		}
	}
}

// do sends a request and returns the status and body.
func (ts *testService) do(method, path, contentType, body string) (int, []byte) {
	ts.t.Helper()
	req, err := http.NewRequest(method, ts.http.URL+path, strings.NewReader(body))
	if err != nil {
		ts.t.Fatal(err)
	}
	if contentType != "" {
		req.Header.Set("Content-Type", contentType)
	}
	resp, err := ts.http.Client().Do(req)
	if err != nil {
		ts.t.Fatal(err)
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if err != nil {
		ts.t.Fatal(err)
	}
	return resp.StatusCode, b
}

// must sends a request that must answer want, and decodes the JSON
// answer into v (when not nil).
func (ts *testService) must(want int, method, path, body string, v any) []byte {
	ts.t.Helper()
	ct := ""
	if body != "" {
		ct = "application/json"
	}
	status, b := ts.do(method, path, ct, body)
	if status != want {
		ts.t.Fatalf("%s %s: status %d, want %d: %s", method, path, status, want, b)
	}
	if v != nil {
		if err := json.Unmarshal(b, v); err != nil {
			ts.t.Fatalf("%s %s: %v: %s", method, path, err, b)
		}
	}
	return b
}

// problemOf decodes an error answer.
func problemOf(t *testing.T, b []byte) problem {
	t.Helper()
	var p map[string]problem
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&p); err != nil {
		t.Fatalf("not a problem document: %v: %s", err, b)
	}
	return p["problem"]
}

// postDemo stores the demo series.
func (ts *testService) postDemo() {
	ts.t.Helper()
	body := `{"series": [` + seriesJSON("north/paint", "2021-01", "month", paintSales(48)) + `, ` +
		seriesJSON("north/hoses", "2021-01-01", "month", hoseSales(40)) + `]}`
	ts.must(http.StatusCreated, "POST", "/v1/series", body, nil)
}

// fit fits a stored series and returns the model's description.
func (ts *testService) fit(series, method, extra string) modelInfo {
	ts.t.Helper()
	var mi modelInfo
	ts.must(http.StatusCreated, "POST", "/v1/models", `{"series": "`+series+`", "method": "`+method+`"`+extra+`}`, &mi)
	return mi
}
