package main

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

func openStore(t *testing.T) *SQLiteStore {
	t.Helper()
	st, err := OpenSQLite(filepath.Join(t.TempDir(), "store.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	return st
}

func TestSQLiteStore(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	st := openStore(t)
	start := time.Date(2024, 3, 4, 0, 0, 0, 0, time.UTC)
	y, err := almanac.NewSeries("west/nails", start, calendar.Weekly, []float64{3, math.NaN(), 5})
	if err != nil {
		t.Fatal(err)
	}
	if err := st.PutSeries(ctx, []almanac.Series{y}); err != nil {
		t.Fatal(err)
	}
	got, err := st.Series(ctx, "west/nails")
	if err != nil {
		t.Fatal(err)
	}
	if !got.Start.Equal(start) || got.Freq != calendar.Weekly || len(got.Values) != 3 || !math.IsNaN(got.Values[1]) {
		t.Errorf("read back %+v", got)
	}
	ext, err := st.ExtendSeries(ctx, "west/nails", []float64{6, 7})
	if err != nil || ext.Len() != 5 {
		t.Fatalf("extend: %v, %d values", err, ext.Len())
	}
	rec := ModelRecord{SeriesKey: "west/nails", Method: "naive", Options: []byte("{}"), Label: "Naive", Form: FormDocument, Body: []byte(`{}`), Seen: 5, Digest: "d1"}
	id, err := st.AddModel(ctx, rec)
	if err != nil || id != 1 {
		t.Fatalf("add model: id %d, %v", id, err)
	}
	rec.ID, rec.Digest, rec.Added = id, "d2", 1
	if err := st.UpdateModel(ctx, rec, "d1"); err != nil {
		t.Fatal(err)
	}
	back, err := st.Model(ctx, id)
	if err != nil || back.Digest != "d2" || back.Added != 1 || string(back.Body) != "{}" || back.Created.IsZero() {
		t.Errorf("model after update: %+v, %v", back, err)
	}

	tests := []struct {
		name string
		err  error
		want error
	}{
		{"unknown series", func() error { _, err := st.Series(ctx, "nowhere"); return err }(), ErrNotFound},
		{"extend unknown series", func() error { _, err := st.ExtendSeries(ctx, "nowhere", []float64{1}); return err }(), ErrNotFound},
		{"extend with infinity", func() error { _, err := st.ExtendSeries(ctx, "west/nails", []float64{math.Inf(1)}); return err }(), almanac.ErrNonFinite},
		{"unknown model", func() error { _, err := st.Model(ctx, 99); return err }(), ErrNotFound},
		{"update unknown model", st.UpdateModel(ctx, ModelRecord{ID: 99}, "d1"), ErrNotFound},
		{"update from a stale version", st.UpdateModel(ctx, rec, "d1"), ErrConflict},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if !errors.Is(tt.err, tt.want) {
				t.Errorf("error %v, want one wrapping %v", tt.err, tt.want)
			}
		})
	}
	// The failed writes changed nothing.
	if y, _ := st.Series(ctx, "west/nails"); y.Len() != 5 {
		t.Errorf("series has %d values after failed writes, want 5", y.Len())
	}

	// A cancelled context writes nothing.
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	z, _ := almanac.NewSeries("west/screws", start, calendar.Weekly, []float64{1, 2})
	if err := st.PutSeries(cctx, []almanac.Series{z}); !errors.Is(err, context.Canceled) {
		t.Errorf("put with a cancelled context: %v", err)
	}
	if _, err := st.AddModel(cctx, rec); !errors.Is(err, context.Canceled) {
		t.Errorf("add model with a cancelled context: %v", err)
	}
	list, err := st.SeriesList(ctx)
	if err != nil || len(list) != 1 || list[0].Length != 5 || list[0].Missing != 1 {
		t.Errorf("series list %+v, %v", list, err)
	}
	models, err := st.Models(ctx, "")
	if err != nil || len(models) != 1 || models[0].Body != nil {
		t.Errorf("models %+v, %v", models, err)
	}
	if models, _ := st.Models(ctx, "west/screws"); len(models) != 0 {
		t.Errorf("models of west/screws: %+v", models)
	}
}

func TestOpenSQLiteErrors(t *testing.T) {
	t.Parallel()
	newer := filepath.Join(t.TempDir(), "newer.db")
	st, err := OpenSQLite(newer)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.db.Exec(`PRAGMA user_version = 99`); err != nil {
		t.Fatal(err)
	}
	st.Close()
	for _, path := range []string{"", filepath.Join(t.TempDir(), "missing-dir", "x.db"), newer} {
		if _, err := OpenSQLite(path); !errors.Is(err, ErrStore) {
			t.Errorf("OpenSQLite(%q) = %v, want an error wrapping ErrStore", path, err)
		}
	}
}

// TestOddPaths checks that the file opened is the one named, whatever
// characters its path holds (%, ? and # mean something in a file: URI).
func TestOddPaths(t *testing.T) {
	t.Parallel()
	for _, name := range []string{"with space", "per%cent", "what?mark", "hash#tag", "ünïcode"} {
		t.Run(name, func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), name)
			if err := os.Mkdir(dir, 0o755); err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(dir, "plan.db")
			st, err := OpenSQLite(path)
			if err != nil {
				t.Fatal(err)
			}
			st.Close()
			if _, err := os.Stat(path); err != nil {
				t.Errorf("no database at %s: %v", path, err)
			}
		})
	}
}

// TestConcurrentRequests forecasts, refreshes and lists at once (run
// under -race): every refresh either succeeds or reports a conflict,
// and the model ends with every observation.
func TestConcurrentRequests(t *testing.T) {
	t.Parallel()
	ts := newService(t)
	ts.postDemo()
	m := ts.fit("north/paint", "ets", "")
	ts.must(200, "POST", "/v1/series/north%2Fpaint/observations", `{"values": [290, 288]}`, nil)
	var wg sync.WaitGroup
	statuses := make([]int, 12)
	for i := range statuses {
		wg.Add(1)
		go func() {
			defer wg.Done()
			switch i % 3 {
			case 0:
				statuses[i], _ = ts.do("POST", "/v1/models/1/refresh", "", "")
			case 1:
				statuses[i], _ = ts.do("GET", "/v1/models/1/forecast?h=3", "", "")
			default:
				statuses[i], _ = ts.do("GET", "/v1/models", "", "")
			}
		}()
	}
	wg.Wait()
	for i, s := range statuses {
		if s != 200 && !(i%3 == 0 && s == 409) {
			t.Errorf("request %d: status %d", i, s)
		}
	}
	var mi modelInfo
	ts.must(200, "GET", "/v1/models/1", "", &mi)
	if mi.ID != m.ID || mi.Seen != 50 || mi.Added != 2 {
		t.Errorf("model after concurrent refreshes: %+v", mi)
	}
}

// opaque hides every capability of a fitted model but the Fitted
// interface, as a type that cannot be saved as a document.
type opaque struct{ almanac.Fitted }

// TestRecipe checks the form a model that cannot be saved as a document
// is stored in: the method, its options and the data, fitted again on
// loading to the same forecasts, bit for bit.
func TestRecipe(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	y, err := almanac.NewSeries("north/hoses", time.Date(2021, 1, 1, 0, 0, 0, 0, time.UTC), calendar.Monthly, hoseSales(40))
	if err != nil {
		t.Fatal(err)
	}
	f, err := fitWith(ctx, "theta", methodOptions{}, y)
	if err != nil {
		t.Fatal(err)
	}
	if f.form != FormDocument {
		t.Fatalf("theta stored as %s", f.form)
	}
	r, err := encodeFit(opaque{f.fit}, "theta", methodOptions{}, y)
	if err != nil || r.form != FormRecipe {
		t.Fatalf("opaque fit stored as %q, %v", r.form, err)
	}
	back, err := loadFit(ctx, ModelRecord{ID: 1, Label: f.fit.String(), Form: r.form, Body: r.body})
	if err != nil {
		t.Fatal(err)
	}
	want, _ := f.fit.Forecast(8, 80, 95)
	got, err := back.Forecast(8, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	if err := sameBits(fromLibrary(got), fromLibrary(want)); err != nil {
		t.Error(err)
	}

	// Stored bodies that cannot be rebuilt: the service's problem (500).
	tests := []struct {
		name string
		rec  ModelRecord
	}{
		{"truncated document", ModelRecord{Label: f.fit.String(), Form: FormDocument, Body: f.body[:len(f.body)/2]}},
		{"recipe of another model", ModelRecord{Label: "ETS(A,N,N)", Form: FormRecipe, Body: r.body}},
		{"recipe with an unknown method", ModelRecord{Label: "Theta", Form: FormRecipe, Body: []byte(strings.Replace(string(r.body), `"theta"`, `"tea-leaves"`, 1))}},
		{"unknown form", ModelRecord{Label: "Theta", Form: "scroll", Body: r.body}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := loadFit(ctx, tt.rec)
			if status, kind := statusOf(err); !errors.Is(err, ErrStore) || status != 500 || kind != kindStore {
				t.Errorf("error %v: status %d %s, want 500 %s", err, status, kind, kindStore)
			}
		})
	}
}
