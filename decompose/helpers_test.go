package decompose_test

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/reftest"
)

// fixtureInput returns the input series of a reference fixture (R
// datasets: co2, nottem, UKgas, AirPassengers) as a Series.
func fixtureInput(t testing.TB, name string) almanac.Series {
	t.Helper()
	f, err := reftest.Load("testdata/reference/" + name + ".json")
	if err != nil {
		t.Fatal(err)
	}
	freq := int(f.Float(t, "dataset.frequency"))
	year := int(f.Float(t, "dataset.start.0"))
	fr := calendar.Monthly
	if freq == 4 {
		fr = calendar.Quarterly
	}
	return almanac.Series{Key: name, Start: time.Date(year, 1, 1, 0, 0, 0, 0, time.UTC), Freq: fr, Values: f.Floats(t, "input")}
}

// co2Weekly reads the weekly Mauna Loa CO2 series (Keeling & Whorf 2004,
// open data, copied from the shared data folder): 2,284 weeks, 59
// missing.
func co2Weekly(t testing.TB) almanac.Series {
	t.Helper()
	fh, err := os.Open("testdata/co2_weekly.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	sc := bufio.NewScanner(fh)
	sc.Scan() // header
	var vals []float64
	var start time.Time
	for sc.Scan() {
		date, v, _ := strings.Cut(sc.Text(), ",")
		if start.IsZero() {
			if start, err = time.Parse("2006-01-02", date); err != nil {
				t.Fatal(err)
			}
		}
		x := math.NaN()
		if v != "" {
			if x, err = strconv.ParseFloat(v, 64); err != nil {
				t.Fatal(err)
			}
		}
		vals = append(vals, x)
	}
	return almanac.Series{Key: "co2 weekly", Start: start, Freq: calendar.Weekly, Values: vals}
}
