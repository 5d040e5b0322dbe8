package main

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

type refreshBody struct {
	Action   string    `json:"action"`
	Model    modelInfo `json:"model"`
	Decision struct {
		Refit  bool     `json:"refit"`
		Reason string   `json:"reason"`
		Added  int      `json:"added"`
		Signal *float64 `json:"signal"`
	} `json:"decision"`
}

func TestRefresh(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	all := paintSales(53)
	ets := ts.fit("north/paint", "ets", "")
	doc := ts.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d/document", ets.ID), "", nil)
	refresh := func(body string) refreshBody {
		t.Helper()
		var rb refreshBody
		ts.must(http.StatusOK, "POST", fmt.Sprintf("/v1/models/%d/refresh", ets.ID), body, &rb)
		return rb
	}
	forecast := func(id int64) forecastBody {
		t.Helper()
		var fc forecastBody
		ts.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d/forecast?h=6&level=80", id), "", &fc)
		return fc
	}

	if rb := refresh(""); rb.Action != "unchanged" || rb.Model.Seen != 48 {
		t.Errorf("refresh with nothing new: %+v", rb)
	}

	// Three new observations, one missing: the model takes them without
	// estimation, as almanac.Refresh does on the saved model.
	ts.must(http.StatusOK, "POST", "/v1/series/north%2Fpaint/observations", fmt.Sprintf(`{"values": [%v, null, %v]}`, all[48], all[50]), nil)
	rb := refresh("")
	if rb.Action != "refreshed" || rb.Decision.Refit || rb.Decision.Added != 3 || rb.Model.Seen != 51 || rb.Model.Added != 3 || rb.Model.ID != ets.ID || !strings.HasPrefix(rb.Decision.Reason, "refresh") {
		t.Fatalf("refresh: %+v", rb)
	}
	saved, err := almanac.LoadModel(bytes.NewReader(doc))
	if err != nil {
		t.Fatal(err)
	}
	lib, err := almanac.Refresh(saved, []float64{all[48], math.NaN(), all[50]})
	if err != nil {
		t.Fatal(err)
	}
	libFC, err := lib.Forecast(6, 80)
	if err != nil {
		t.Fatal(err)
	}
	got := forecast(ets.ID)
	want := fromLibrary(libFC)
	want.Model, want.Times = got.Model, got.Times
	if err := sameBits(got, want); err != nil {
		t.Errorf("refreshed model and almanac.Refresh disagree: %v", err)
	}

	// Two more, with a policy that refits after 4 new observations: ETS
	// cannot be estimated on a series with a missing value, so the refit
	// fails (422) and the stored model stays as it was.
	ts.must(http.StatusOK, "POST", "/v1/series/north%2Fpaint/observations", fmt.Sprintf(`{"values": [%v, %v]}`, all[51], all[52]), nil)
	status, b := ts.do("POST", fmt.Sprintf("/v1/models/%d/refresh", ets.ID), "application/json", `{"refit_after": 4}`)
	if p := problemOf(t, b); status != http.StatusUnprocessableEntity || p.Kind != kindCannotFit || p.Field != "values[49]" {
		t.Errorf("refit over a missing value: %d %+v", status, p)
	}
	var kept modelInfo
	ts.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d", ets.ID), "", &kept)
	if kept.Seen != 51 || kept.Added != 3 || kept.Refits != 0 {
		t.Errorf("model after a failed refit: %+v", kept)
	}

	// On complete data the policy's refit estimates the model again on
	// the whole series, as a new fit does. Theta cannot take new
	// observations at all, so it is refitted whatever the policy.
	hoses := ts.fit("north/hoses", "ets", "")
	theta := ts.fit("north/hoses", "theta", "")
	more := hoseSales(42)
	ts.must(http.StatusOK, "POST", "/v1/series/north%2Fhoses/observations", fmt.Sprintf(`{"values": [%v, %v]}`, more[40], more[41]), nil)
	ts.must(http.StatusOK, "POST", fmt.Sprintf("/v1/models/%d/refresh", hoses.ID), `{"refit_after": 2}`, &rb)
	if rb.Action != "refitted" || !rb.Decision.Refit || rb.Decision.Added != 2 || rb.Model.Seen != 42 || rb.Model.Added != 0 || rb.Model.Refits != 1 {
		t.Fatalf("refit: %+v", rb)
	}
	y, err := almanac.NewSeries("north/hoses", time.Date(2021, 1, 1, 0, 0, 0, 0, time.UTC), calendar.Monthly, more)
	if err != nil {
		t.Fatal(err)
	}
	fit, err := smoothing.Select{Workers: 1}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	libFC, err = fit.Forecast(6, 80)
	if err != nil {
		t.Fatal(err)
	}
	got = forecast(hoses.ID)
	want = fromLibrary(libFC)
	want.Model, want.Times = got.Model, got.Times
	if err := sameBits(got, want); err != nil {
		t.Errorf("refitted model and a new fit disagree: %v", err)
	}
	ts.must(http.StatusOK, "POST", fmt.Sprintf("/v1/models/%d/refresh", theta.ID), "", &rb)
	if rb.Action != "refitted" || !strings.Contains(rb.Decision.Reason, "cannot take new observations") || rb.Model.Seen != 42 {
		t.Errorf("theta refresh: %+v", rb)
	}

	// Replacing the series' history makes the model's history stale.
	ts.must(http.StatusCreated, "POST", "/v1/series", `{"series": [`+seriesJSON("north/paint", "2021-01", "month", hoseSales(60))+`]}`, nil)
	status, b = ts.do("POST", fmt.Sprintf("/v1/models/%d/refresh", ets.ID), "", "")
	if p := problemOf(t, b); status != http.StatusConflict || p.Kind != kindConflict {
		t.Errorf("refresh after the history changed: %d %+v", status, p)
	}
	status, b = ts.do("GET", fmt.Sprintf("/v1/models/%d/chart", ets.ID), "", "")
	if p := problemOf(t, b); status != http.StatusConflict {
		t.Errorf("chart after the history changed: %d %+v", status, p)
	}
}

// hookStore calls seriesRead after each read of a series.
type hookStore struct {
	Store
	seriesRead func()
}

func (h hookStore) Series(ctx context.Context, key string) (almanac.Series, error) {
	y, err := h.Store.Series(ctx, key)
	h.seriesRead()
	return y, err
}

// TestCancelledFit checks that a fit whose request is cancelled —
// before it starts, while it runs, or by the request deadline — answers
// 503 and stores nothing.
func TestCancelledFit(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	body := `{"series": "north/paint", "method": "pilot", "paths": 200}`
	models := func() int {
		t.Helper()
		recs, err := ts.store.Models(context.Background(), "")
		if err != nil {
			t.Fatal(err)
		}
		return len(recs)
	}
	check := func(name string, rec *httptest.ResponseRecorder, took time.Duration, during bool) {
		t.Helper()
		p := problemOf(t, rec.Body.Bytes())
		if rec.Code != http.StatusServiceUnavailable || p.Kind != kindDeadline || during != strings.Contains(p.Detail, "fit pilot") {
			t.Errorf("%s: status %d, problem %+v", name, rec.Code, p)
		}
		if n := models(); n != 0 {
			t.Errorf("%s: %d models stored, want none", name, n)
		}
		t.Logf("%s: answered after %v: %s", name, took, p.Detail)
	}

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	rec := httptest.NewRecorder()
	start := time.Now()
	ts.srv.Handler().ServeHTTP(rec, httptest.NewRequestWithContext(ctx, "POST", "/v1/models", strings.NewReader(body)))
	check("cancelled before", rec, time.Since(start), false)

	// Cancelled while fitting: the series has been read, the fit begins.
	ctx, cancel = context.WithCancel(context.Background())
	defer cancel()
	hooked := NewServer(hookStore{Store: ts.store, seriesRead: func() { time.AfterFunc(5*time.Millisecond, cancel) }}, Limits{})
	rec = httptest.NewRecorder()
	start = time.Now()
	hooked.Handler().ServeHTTP(rec, httptest.NewRequestWithContext(ctx, "POST", "/v1/models", strings.NewReader(body)))
	check("cancelled during the fit", rec, time.Since(start), true)

	// The request's own deadline.
	short := NewServer(ts.store, Limits{Timeout: 20 * time.Millisecond})
	rec = httptest.NewRecorder()
	start = time.Now()
	short.Handler().ServeHTTP(rec, httptest.NewRequest("POST", "/v1/models", strings.NewReader(body)))
	check("deadline", rec, time.Since(start), true)
}
