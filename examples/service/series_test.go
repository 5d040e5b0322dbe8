package main

import (
	"math"
	"net/http"
	"strings"
	"testing"
)

func TestSeriesEndpoints(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()

	// The long CSV of the library (almanac.ReadCSV): quarterly ladders,
	// rows in any order, one missing value.
	csv := "series,period,value\nsouth/ladders,2022-04-01,31\nsouth/ladders,2022-01-01,25\nsouth/ladders,2022-07-01,NA\nsouth/ladders,2022-10-01,40\nsouth/ladders,2023-01-01,27\n"
	status, b := ts.do("POST", "/v1/series", "text/csv; charset=utf-8", csv)
	if status != http.StatusCreated {
		t.Fatalf("csv: %d %s", status, b)
	}

	// A gap in the CSV: refused by default, missing values on request.
	gappy := "series,period,value\neast/rope,2024-01-01,3\neast/rope,2024-02-01,4\neast/rope,2024-05-01,5\n"
	if status, b := ts.do("POST", "/v1/series", "text/csv", gappy); status != http.StatusBadRequest {
		t.Errorf("gap refused: %d %s", status, b)
	}
	if status, b := ts.do("POST", "/v1/series?gaps=fill", "text/csv", gappy); status != http.StatusCreated || !strings.Contains(string(b), `"length":5,"missing":2`) {
		t.Errorf("gap filled: %d %s", status, b)
	}
	if status, b := ts.do("POST", "/v1/series?gaps=guess", "text/csv", gappy); status != http.StatusBadRequest || problemOf(t, b).Field != "gaps" {
		t.Errorf("gaps=guess: %d %s", status, b)
	}

	var list struct{ Series []SeriesInfo }
	ts.must(http.StatusOK, "GET", "/v1/series", "", &list)
	if len(list.Series) != 4 {
		t.Fatalf("listed %d series, want 4: %+v", len(list.Series), list.Series)
	}
	want := []struct {
		key           string
		unit          string
		length, nmiss int
	}{{"east/rope", "month", 5, 2}, {"north/hoses", "month", 40, 0}, {"north/paint", "month", 48, 0}, {"south/ladders", "quarter", 5, 1}}
	for i, w := range want {
		got := list.Series[i]
		if got.Key != w.key || got.Unit != w.unit || got.Length != w.length || got.Missing != w.nmiss {
			t.Errorf("series %d = %+v, want %+v", i, got, w)
		}
	}

	var got struct {
		Key, Start, Unit string
		Every            int
		Values           []*float64
	}
	ts.must(http.StatusOK, "GET", "/v1/series/south%2Fladders", "", &got)
	if got.Start != "2022-01-01T00:00:00Z" || got.Unit != "quarter" || len(got.Values) != 5 || got.Values[2] != nil || *got.Values[1] != 31 {
		t.Errorf("south/ladders = %+v", got)
	}

	var info SeriesInfo
	ts.must(http.StatusOK, "POST", "/v1/series/south%2Fladders/observations", `{"values": [33, null]}`, &info)
	if info.Length != 7 || info.Missing != 2 {
		t.Errorf("extended: %+v, want 7 values, 2 missing", info)
	}
	// Replacing a series by posting it again.
	ts.must(http.StatusCreated, "POST", "/v1/series", `{"series": [`+seriesJSON("south/ladders", "2022-01", "quarter", []float64{1, 2, 3})+`]}`, nil)
	ts.must(http.StatusOK, "GET", "/v1/series/south%2Fladders", "", &got)
	if len(got.Values) != 3 {
		t.Errorf("replaced series has %d values, want 3", len(got.Values))
	}
}

func TestBadSeries(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	paint := seriesJSON("x", "2021-01", "month", []float64{1, 2, 3})
	tests := []struct {
		name        string
		contentType string
		body        string
		status      int
		kind        string
		field       string
		line        int
		detail      string
	}{
		{"malformed JSON", "application/json", `{"series": [`, 400, kindInvalid, "", 0, "truncated"},
		{"JSON syntax", "application/json", `{"series": [}`, 400, kindInvalid, "", 0, "malformed JSON"},
		{"empty body", "application/json", ``, 400, kindInvalid, "", 0, "empty body"},
		{"unknown member", "application/json", `{"series": [], "colour": 1}`, 400, kindInvalid, "", 0, "colour"},
		{"trailing data", "application/json", `{"series": [` + paint + `]} {}`, 400, kindInvalid, "", 0, "after the JSON"},
		{"wrong type", "application/json", `{"series": [{"key": "a", "start": "2021-01", "unit": "month", "values": ["7"]}]}`, 400, kindInvalid, "series.values", 0, "string"},
		{"no series", "application/json", `{"series": []}`, 400, kindInvalid, "series", 0, "no series"},
		{"empty key", "application/json", `{"series": [{"key": "", "start": "2021-01", "unit": "month", "values": [1]}]}`, 400, kindInvalid, "series[0].key", 0, "empty key"},
		{"bad start", "application/json", `{"series": [` + paint + `, {"key": "b", "start": "March", "unit": "month", "values": [1]}]}`, 400, kindInvalid, "series[1].start", 0, "March"},
		{"bad unit", "application/json", `{"series": [{"key": "b", "start": "2021-01", "unit": "fortnight", "values": [1]}]}`, 400, kindInvalid, "series[0].unit", 0, "fortnight"},
		{"negative every", "application/json", `{"series": [{"key": "b", "start": "2021-01", "unit": "month", "every": -2, "values": [1]}]}`, 400, kindInvalid, "series[0].every", 0, "negative"},
		{"no values", "application/json", `{"series": [{"key": "b", "start": "2021-01", "unit": "month", "values": []}]}`, 400, kindInvalid, "series[0].values", 0, "empty"},
		{"all missing", "application/json", `{"series": [{"key": "b", "start": "2021-01", "unit": "month", "values": [null, null]}]}`, 400, kindInvalid, "series[0].values", 0, "missing"},
		{"beyond float64", "application/json", `{"series": [{"key": "b", "start": "2021-01", "unit": "month", "values": [1, 1e400]}]}`, 400, kindInvalid, "series.values", 0, "1e400"},
		{"duplicate key", "application/json", `{"series": [` + paint + `, ` + paint + `]}`, 400, kindInvalid, "series[1].key", 0, "twice"},
		{"csv bad value", "text/csv", "series,period,value\na,2021-01,1\na,2021-02,lots\n", 400, kindInvalid, "value", 3, "bad value"},
		{"csv bad time", "text/csv", "series,period,value\na,2021-01,1\na,someday,2\n", 400, kindInvalid, "period", 3, "bad time"},
		{"csv header", "text/csv", "item,period,value\na,2021-01,1\n", 400, kindInvalid, "series", 1, "header"},
		{"csv infinite", "text/csv", "series,period,value\na,2021-01,1\na,2021-02,Inf\n", 400, kindInvalid, "value", 3, "non-finite"},
		{"csv duplicate", "text/csv", "series,period,value\na,2021-01,1\na,2021-01,2\na,2021-02,2\n", 400, kindInvalid, "period", 3, "duplicate"},
		{"csv gap", "text/csv", "series,period,value\na,2021-01,1\na,2021-02,2\na,2021-05,2\n", 400, kindInvalid, "period", 4, "gap"},
		{"csv no rows", "text/csv", "series,period,value\n", 400, kindInvalid, "", 0, "empty"},
		{"csv quotes", "text/csv", "series,period,value\n\"a,2021-01,1\n", 400, kindInvalid, "", 2, "malformed"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			status, b := ts.do("POST", "/v1/series", tt.contentType, tt.body)
			if status != tt.status {
				t.Fatalf("status %d, want %d: %s", status, tt.status, b)
			}
			p := problemOf(t, b)
			if p.Kind != tt.kind || p.Field != tt.field || p.Line != tt.line || p.Status != status || !strings.Contains(p.Detail, tt.detail) {
				t.Errorf("problem %+v, want kind %q field %q line %d detail containing %q", p, tt.kind, tt.field, tt.line, tt.detail)
			}
		})
	}
	// Nothing of the bad requests was stored.
	var list struct{ Series []SeriesInfo }
	ts.must(http.StatusOK, "GET", "/v1/series", "", &list)
	if len(list.Series) != 2 {
		t.Errorf("%d series stored, want the 2 of the demo", len(list.Series))
	}
	// Extending: unknown series, no values, all missing stays an error.
	status, b := ts.do("POST", "/v1/series/nowhere/observations", "application/json", `{"values": [1]}`)
	if p := problemOf(t, b); status != 404 || p.Kind != kindNotFound {
		t.Errorf("extend unknown: %d %+v", status, p)
	}
	status, b = ts.do("POST", "/v1/series/north%2Fpaint/observations", "application/json", `{"values": []}`)
	if p := problemOf(t, b); status != 400 || p.Field != "values" {
		t.Errorf("extend with nothing: %d %+v", status, p)
	}
}

func TestOversizedBody(t *testing.T) {
	t.Parallel()
	ts := openService(t, t.TempDir()+"/plan.db", Limits{Body: 2048})
	big := `{"series": [` + seriesJSON("north/paint", "2000-01", "month", paintSales(400)) + `]}`
	for _, ct := range []string{"application/json", "text/csv"} {
		body := big
		if ct == "text/csv" {
			body = "series,period,value\n" + strings.Repeat("a,2021-01,1\n", 400)
		}
		status, b := ts.do("POST", "/v1/series", ct, body)
		p := problemOf(t, b)
		if status != http.StatusRequestEntityTooLarge || p.Kind != kindTooLarge || !strings.Contains(p.Detail, "2048") {
			t.Errorf("%s: status %d, problem %+v; want 413 %s", ct, status, p, kindTooLarge)
		}
	}
	status, b := ts.do("POST", "/v1/models", "application/json", `{"series": "a", "method": "`+strings.Repeat("x", 4000)+`"}`)
	if status != http.StatusRequestEntityTooLarge {
		t.Errorf("fit request: %d %s", status, b)
	}
}

func TestSeriesValuesKeepBits(t *testing.T) {
	t.Parallel()
	// The store keeps the bit patterns of the values: the smallest
	// subnormal, the largest finite value, negative zero and missing.
	st, err := OpenSQLite(t.TempDir() + "/bits.db")
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	v := []float64{math.SmallestNonzeroFloat64, math.MaxFloat64, math.Copysign(0, -1), math.NaN(), 0.1}
	enc := decodeValuesMust(t, encodeValues(v))
	for i := range v {
		if math.Float64bits(enc[i]) != math.Float64bits(v[i]) {
			t.Errorf("value %d: bits %x, want %x", i, math.Float64bits(enc[i]), math.Float64bits(v[i]))
		}
	}
	if _, err := decodeValues(make([]byte, 7)); err == nil {
		t.Error("a blob of 7 bytes decoded")
	}
}

func decodeValuesMust(t *testing.T, b []byte) []float64 {
	t.Helper()
	v, err := decodeValues(b)
	if err != nil {
		t.Fatal(err)
	}
	return v
}
