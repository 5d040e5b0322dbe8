package calendar_test

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// TestReference is the package's data-driven reference test: it checks
// every fixture in testdata/reference, dispatching on its kind, and fails
// on a kind it does not know. The fixtures are written by
// testdata/gen_cycle.R (R 4.2.2): kind "cycle" holds Fourier terms whose
// phase R computed from the dates themselves (difftime from Monday
// 3 January 2000, or whole months from January 2000), an independent
// check of Cycle's anchoring to absolute time for weekly (also stamped on
// Sundays), daily, hourly and monthly grids.
func TestReference(t *testing.T) {
	paths, err := filepath.Glob("testdata/reference/*.json")
	if err != nil {
		t.Fatal(err)
	}
	if len(paths) == 0 {
		t.Fatal("no reference fixtures")
	}
	for _, p := range paths {
		var f struct {
			Case, Kind, Reference, Call string
			Spec                        struct {
				Frequency, Start string
				N                int
				Period           float64
				Harmonics        int
			}
			Expect struct {
				Names   []string
				Columns [][]float64
			}
			Tolerance map[string]struct{ Abs, Rel float64 }
		}
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(b, &f); err != nil {
			t.Fatalf("%s: %v", p, err)
		}
		t.Run(f.Case, func(t *testing.T) {
			t.Logf("reference: %s; call: %s", f.Reference, f.Call)
			if f.Kind != "cycle" {
				t.Fatalf("%s: unknown kind %q: no check is written for it", p, f.Kind)
			}
			freqs := map[string]calendar.Frequency{"hourly": calendar.Hourly, "daily": calendar.Daily, "weekly": calendar.Weekly, "monthly": calendar.Monthly, "quarterly": calendar.Quarterly}
			freq, ok := freqs[f.Spec.Frequency]
			if !ok {
				t.Fatalf("frequency %q not handled", f.Spec.Frequency)
			}
			start, err := time.Parse(time.RFC3339, f.Spec.Start)
			if err != nil {
				t.Fatal(err)
			}
			tol, ok := f.Tolerance["columns"]
			if !ok {
				t.Fatal("fixture has no tolerance for columns")
			}
			c := calendar.Cycle{Period: f.Spec.Period, Harmonics: f.Spec.Harmonics}
			cols, err := c.Columns(calendar.Grid{Start: start, Freq: freq, N: f.Spec.N})
			if err != nil {
				t.Fatal(err)
			}
			if len(cols) != len(f.Expect.Columns) || len(cols) != len(f.Expect.Names) {
				t.Fatalf("%d columns, R %d", len(cols), len(f.Expect.Columns))
			}
			for j, col := range cols {
				if !strings.HasSuffix(col.Name, " "+f.Expect.Names[j]) {
					t.Errorf("column %d named %q, R %q", j, col.Name, f.Expect.Names[j])
				}
				for i, v := range col.Values {
					want := f.Expect.Columns[j][i]
					if math.Abs(v-want) > tol.Abs+tol.Rel*math.Abs(want) {
						t.Errorf("%s at %d: %.17g, R %.17g", col.Name, i, v, want)
					}
				}
			}
		})
	}
}
