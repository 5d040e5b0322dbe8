package main

import (
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"strings"
	"testing"
)

// benchService is a server with the demo series and one ETS model.
func benchService(b *testing.B) (*Server, *SQLiteStore, int64) {
	b.Helper()
	st, err := OpenSQLite(filepath.Join(b.TempDir(), "bench.db"))
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { st.Close() })
	s := NewServer(st, Limits{})
	h := s.Handler()
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, httptest.NewRequest("POST", "/v1/series", strings.NewReader(`{"series": [`+seriesJSON("north/paint", "2021-01", "month", paintSales(48))+`]}`)))
	if rec.Code != http.StatusCreated {
		b.Fatal(rec.Body.String())
	}
	rec = httptest.NewRecorder()
	h.ServeHTTP(rec, httptest.NewRequest("POST", "/v1/models", strings.NewReader(`{"series": "north/paint", "method": "ets"}`)))
	if rec.Code != http.StatusCreated {
		b.Fatal(rec.Body.String())
	}
	return s, st, 1
}

// BenchmarkForecastRequest measures GET /v1/models/{id}/forecast for a
// model in the cache: the store read, the forecast and the JSON.
func BenchmarkForecastRequest(b *testing.B) {
	s, _, id := benchService(b)
	h := s.Handler()
	path := fmt.Sprintf("/v1/models/%d/forecast?h=12&level=80&level=95", id)
	b.ReportAllocs()
	for b.Loop() {
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, httptest.NewRequest("GET", path, nil))
		if rec.Code != http.StatusOK {
			b.Fatal(rec.Body.String())
		}
	}
}

// BenchmarkLoadStoredModel measures rebuilding a stored ETS model from
// its document, as after a restart.
func BenchmarkLoadStoredModel(b *testing.B) {
	_, st, id := benchService(b)
	rec, err := st.Model(context.Background(), id)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := loadFit(context.Background(), rec); err != nil {
			b.Fatal(err)
		}
	}
}
