package nightly_test

import (
	"context"
	"encoding/csv"
	"fmt"
	"log"
	"os"
	"path/filepath"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/examples/beam/catalogue"
	"github.com/almanac-go/almanac/examples/beam/nightly"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"
)

// Build a pipeline for a generated catalogue of one store with two
// departments of two product lines, run it in-process, and read the
// status file.
func ExampleBuild() {
	dir, err := os.MkdirTemp("", "nightly-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	in := filepath.Join(dir, "in")
	if _, err := catalogue.Write(in, catalogue.Options{Stores: 1, Departments: 2, Lines: 2, Months: 36}); err != nil {
		log.Fatal(err)
	}

	p, s := beam.NewPipelineWithRoot()
	err = nightly.Build(s, nightly.Options{
		Input:     filepath.Join(in, catalogue.DataPattern),
		Hierarchy: filepath.Join(in, catalogue.PlacesFile),
		Output:    filepath.Join(dir, "out"),
		Model:     "seasonal-naive",
		Horizon:   6,
		Shards:    1,
	})
	if err != nil {
		log.Fatal(err)
	}
	if _, err := beam.Run(context.Background(), "prism", p); err != nil {
		log.Fatal(err)
	}

	f, err := os.Open(filepath.Join(dir, "out", nightly.ShardName(nightly.OutputStatus, 0, 1)))
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range rows {
		fmt.Println(r[0], r[1], r[3], r[5])
	}
	// Output:
	// series role state model
	// N01 aggregate reconciled SeasonalNaive(12)
	// N01-GDN-01 input reconciled SeasonalNaive(12)
	// N01-GDN-02 input reconciled SeasonalNaive(12)
	// N01-PNT-01 input reconciled SeasonalNaive(12)
	// N01-PNT-02 input reconciled SeasonalNaive(12)
	// N01/GDN aggregate reconciled SeasonalNaive(12)
	// N01/PNT aggregate reconciled SeasonalNaive(12)
}

// Aggregate builds a store's hierarchy from its product lines and sums
// them into the department and store totals.
func ExampleAggregate() {
	start := time.Date(2025, time.January, 1, 0, 0, 0, 0, time.UTC)
	line := func(key string, v ...float64) almanac.Series {
		return almanac.Series{Key: key, Start: start, Freq: calendar.Monthly, Values: v}
	}
	h, aggs, err := nightly.Aggregate([]nightly.Placed{
		{Series: line("N01-PNT-01", 10, 12, 11), Within: "N01/PNT"},
		{Series: line("N01-PNT-02", 4, 5, 6), Within: "N01/PNT"},
		{Series: line("N01-GDN-01", 30, 41, 52), Within: "N01/GDN"},
	})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(h.Names())
	for _, a := range aggs {
		fmt.Printf("%-8s %.3f\n", a.Key, a.Values)
	}
	// Output:
	// [N01 N01/PNT N01/GDN N01-PNT-01 N01-PNT-02 N01-GDN-01]
	// N01      [44.000 58.000 69.000]
	// N01/PNT  [14.000 17.000 17.000]
	// N01/GDN  [30.000 41.000 52.000]
}
