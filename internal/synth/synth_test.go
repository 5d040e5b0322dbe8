package synth

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

func TestDeterministic(t *testing.T) {
	a := Generate(Config{Seed: 3, Weekly: 5, Daily: 5, Hourly: 5})
	b := Generate(Config{Seed: 3, Weekly: 5, Daily: 5, Hourly: 5})
	c := Generate(Config{Seed: 4, Weekly: 5, Daily: 5, Hourly: 5})
	same := func(x, y Series) bool {
		if x.ID != y.ID || !x.Start.Equal(y.Start) || len(x.Train) != len(y.Train) || len(x.Test) != len(y.Test) {
			return false
		}
		for i := range x.Train {
			if math.Float64bits(x.Train[i]) != math.Float64bits(y.Train[i]) {
				return false
			}
		}
		return true
	}
	differ := 0
	for i := range a {
		if !same(a[i], b[i]) {
			t.Errorf("series %d differs between two runs with the same seed", i)
		}
		if !same(a[i], c[i]) {
			differ++
		}
	}
	if differ == 0 {
		t.Error("another seed gave the same series")
	}
}

// TestShapes checks the documented properties of the invented series:
// horizons, length ranges, gaps only in the training part and never in
// its last two values, non-negative values, counts for count kinds.
func TestShapes(t *testing.T) {
	ss := Generate(Config{Seed: 1, Weekly: 150, Daily: 120, Hourly: 80})
	h := map[string]int{"weekly": WeeklyH, "daily": DailyH, "hourly": HourlyH}
	lo := map[string]int{"weekly": 26, "daily": 40, "hourly": 24 * 6}
	hi := map[string]int{"weekly": 520, "daily": 1500, "hourly": 24 * 70}
	kinds := map[string]bool{}
	short, gaps := 0, 0
	for _, s := range ss {
		kinds[s.Freq+"/"+s.Kind] = true
		if len(s.Test) != h[s.Freq] {
			t.Errorf("%s: horizon %d", s.ID, len(s.Test))
		}
		if n := len(s.Train); n < lo[s.Freq] || n > hi[s.Freq] {
			t.Errorf("%s: %d training values outside [%d, %d]", s.ID, n, lo[s.Freq], hi[s.Freq])
		}
		if s.Freq == "weekly" && len(s.Train) < 104 || s.Freq == "hourly" && len(s.Train) < 2*168 {
			short++
		}
		for i, v := range s.Test {
			if math.IsNaN(v) || v < 0 {
				t.Errorf("%s: test value %d is %v", s.ID, i, v)
			}
		}
		n := len(s.Train)
		for i, v := range s.Train {
			if math.IsNaN(v) {
				gaps++
				if i >= n-2 {
					t.Errorf("%s: gap at %d of %d", s.ID, i, n)
				}
				continue
			}
			if v < 0 {
				t.Errorf("%s: negative value %v", s.ID, v)
			}
			if (s.Kind == "parts" || s.Kind == "tickets" || s.Kind == "trips") && v != math.Trunc(v) {
				t.Errorf("%s: count %v", s.ID, v)
			}
		}
	}
	for _, k := range []string{"weekly/store", "weekly/price", "weekly/parts", "weekly/smooth", "daily/visits", "daily/tickets", "daily/price", "hourly/load", "hourly/trips"} {
		if !kinds[k] {
			t.Errorf("no %s series", k)
		}
	}
	if short == 0 || gaps == 0 {
		t.Errorf("%d short series, %d gaps: both kinds should occur", short, gaps)
	}
}

// TestWeeklyHolidayMovesBetweenWeeks checks the invented region's
// calendar against published dates: Easter Sunday 2019-04-21 and
// 2024-03-31 (published.md, Meeus's algorithm), so Good Friday falls in
// ISO weeks 16 and 13 — the holiday effect moves between weeks.
func TestWeeklyHolidayMovesBetweenWeeks(t *testing.T) {
	for _, tc := range []struct {
		year, week int
	}{{2019, 16}, {2024, 13}} {
		occ := holidaysBetween(time.Date(tc.year, 1, 1, 0, 0, 0, 0, time.UTC), time.Date(tc.year+1, 1, 1, 0, 0, 0, 0, time.UTC))
		found := false
		for d, name := range occ {
			if name == "good friday" {
				y, w := d.ISOWeek()
				found = y == tc.year && w == tc.week
			}
		}
		if !found {
			t.Errorf("%d: Good Friday not in ISO week %d", tc.year, tc.week)
		}
	}
	if _, err := calendar.Easter(2024); err != nil {
		t.Fatal(err)
	}
}

func TestWriteDir(t *testing.T) {
	dir := t.TempDir()
	ss := Generate(Config{Seed: 2, Weekly: 2, Daily: 1, Hourly: 1})
	if err := WriteDir(dir, ss); err != nil {
		t.Fatal(err)
	}
	meta, err := os.ReadFile(filepath.Join(dir, "synth_series.csv"))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(meta)), "\n")
	if len(lines) != 5 || !strings.HasPrefix(lines[0], "series,frequency,domain,n_train,h,start_year,start_period") {
		t.Errorf("metadata:\n%s", meta)
	}
	for _, f := range []string{"weekly", "daily", "hourly"} {
		if _, err := os.Stat(filepath.Join(dir, "synth_"+f+".csv")); err != nil {
			t.Error(err)
		}
	}
}
