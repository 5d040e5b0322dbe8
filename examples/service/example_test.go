package main

import (
	"encoding/json"
	"fmt"
	"io"
	"log"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
)

// Example runs the service on a database in a temporary directory, posts
// a quarterly series of ladder sales (invented), fits the seasonal naive
// method and asks for two quarters ahead with an 80% band. Checked by
// hand: the forecasts repeat the last year (27, 34); the one-step errors
// of the method are 2, 3, 3, 1, so σ = √(23/4) = 2.398, and the 80% band
// is ±1.2816 σ = ±3.073 (1.2816 is the 90% normal quantile, a table
// value) in the first year ahead.
func Example() {
	dir, err := os.MkdirTemp("", "plan")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	store, err := OpenSQLite(filepath.Join(dir, "plan.db"))
	if err != nil {
		log.Fatal(err)
	}
	defer store.Close()
	srv := httptest.NewServer(NewServer(store, Limits{}).Handler())
	defer srv.Close()

	post := func(path, contentType, body string) []byte {
		resp, err := http.Post(srv.URL+path, contentType, strings.NewReader(body))
		if err != nil {
			log.Fatal(err)
		}
		defer resp.Body.Close()
		b, _ := io.ReadAll(resp.Body)
		fmt.Println(path, resp.Status)
		return b
	}
	post("/v1/series", "text/csv", "series,period,value\nsouth/ladders,2023-01-01,25\nsouth/ladders,2023-04-01,31\nsouth/ladders,2023-07-01,38\nsouth/ladders,2023-10-01,29\n"+
		"south/ladders,2024-01-01,27\nsouth/ladders,2024-04-01,34\nsouth/ladders,2024-07-01,41\nsouth/ladders,2024-10-01,30\n")
	var model struct {
		ID    int64
		Model string
	}
	json.Unmarshal(post("/v1/models", "application/json", `{"series": "south/ladders", "method": "seasonal-naive"}`), &model)
	fmt.Println("model", model.ID, model.Model)

	resp, err := http.Get(fmt.Sprintf("%s/v1/models/%d/forecast?h=2&level=80", srv.URL, model.ID))
	if err != nil {
		log.Fatal(err)
	}
	defer resp.Body.Close()
	var fc struct {
		Times []string
		Mean  []float64
		Bands []struct {
			Level        float64
			Lower, Upper []float64
		}
	}
	json.NewDecoder(resp.Body).Decode(&fc)
	for i, t := range fc.Times {
		fmt.Printf("%s %.3f [%.3f, %.3f]\n", t[:10], fc.Mean[i], fc.Bands[0].Lower[i], fc.Bands[0].Upper[i])
	}
	// Output:
	// /v1/series 201 Created
	// /v1/models 201 Created
	// model 1 SeasonalNaive(4)
	// 2025-01-01 27.000 [23.927, 30.073]
	// 2025-04-01 34.000 [30.927, 37.073]
}
