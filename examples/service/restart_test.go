package main

import (
	"fmt"
	"net/http"
	"path/filepath"
	"testing"
)

// TestRestart fits models of several methods, closes the store, opens the
// same database file in a new server and checks that every stored model
// forecasts bit for bit what it did before (means and bands, compared as
// float64 bit patterns after the JSON round trip, which writes the
// shortest text that reads back as the same float64). Models stored as
// documents are rebuilt by almanac.UnmarshalModel, recipes by fitting
// again (TestRecipe covers that form whatever the library can save).
func TestRestart(t *testing.T) {
	t.Parallel()
	path := filepath.Join(t.TempDir(), "plan.db")
	first := openService(t, path, Limits{})
	first.postDemo()
	fits := []struct{ series, method, extra string }{
		{"north/paint", "ets", ""},
		{"north/paint", "arima", ""},
		{"north/hoses", "pilot", `, "seed": 11, "paths": 200`},
		{"north/hoses", "theta", ""},
		{"north/paint", "seasonal-naive", ""},
	}
	const query = "?h=9&level=70&level=95"
	before := map[int64]forecastBody{}
	var ids []int64
	for _, f := range fits {
		m := first.fit(f.series, f.method, f.extra)
		var fc forecastBody
		first.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d/forecast%s", m.ID, query), "", &fc)
		before[m.ID] = fc
		ids = append(ids, m.ID)
		t.Logf("model %d: %s by %s, stored as %s", m.ID, m.Model, m.Method, m.Stored)
	}
	first.close()

	second := openService(t, path, Limits{})
	var list struct{ Models []modelInfo }
	second.must(http.StatusOK, "GET", "/v1/models", "", &list)
	if len(list.Models) != len(fits) {
		t.Fatalf("%d models after the restart, want %d", len(list.Models), len(fits))
	}
	for i, id := range ids {
		t.Run(fits[i].method, func(t *testing.T) {
			var fc forecastBody
			second.must(http.StatusOK, "GET", fmt.Sprintf("/v1/models/%d/forecast%s", id, query), "", &fc)
			if err := sameBits(fc, before[id]); err != nil {
				t.Errorf("model %d after the restart: %v", id, err)
			}
		})
	}
	var series struct{ Series []SeriesInfo }
	second.must(http.StatusOK, "GET", "/v1/series", "", &series)
	if len(series.Series) != 2 {
		t.Errorf("%d series after the restart, want 2", len(series.Series))
	}
}
