package decompose_test

import (
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
)

// TestMSTLOnePeriodIsSTL: with one period and one sweep, MSTL is exactly
// STL with the same seasonal span (the algorithm of Bandara et al. 2021
// reduces to one STL fit).
func TestMSTLOnePeriodIsSTL(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	m, err := decompose.MSTL{Periods: []float64{12}, Iterations: 1}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	s, err := decompose.STL{SeasonalWindow: 11}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	for i := range y.Values {
		if m.Trend[i] != s.Trend[i] || m.Seasonal[i] != s.Seasonal[i] {
			t.Fatalf("index %d: MSTL (%v, %v), STL (%v, %v)", i, m.Trend[i], m.Seasonal[i], s.Trend[i], s.Seasonal[i])
		}
	}
	if m.Settings[0] != s.Settings[0] {
		t.Fatalf("settings %+v vs %+v", m.Settings[0], s.Settings[0])
	}
}

// TestMSTLDefaults: periods from the frequency (hourly: 24 and 168),
// ascending, spans 7 + 4·i (Bandara et al. 2021), non-integer periods
// rounded, duplicates merged, periods without two full cycles left out.
func TestMSTLDefaults(t *testing.T) {
	n := 24 * 7 * 10
	vals := make([]float64, n)
	for i := range vals {
		// Constructed input with a known answer (a property check, not a
		// reference): a daily and a weekly cycle on a linear trend.
		vals[i] = 0.01*float64(i) + math.Sin(2*math.Pi*float64(i)/24) + 0.5*math.Cos(2*math.Pi*float64(i)/168)
	}
	y := almanac.Series{Start: time.Date(2026, 1, 5, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, Values: vals}
	d, err := decompose.MSTL{}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Periods) != 2 || d.Periods[0] != 24 || d.Periods[1] != 168 {
		t.Fatalf("periods %v", d.Periods)
	}
	if d.Settings[0].SeasonalWindow != 11 || d.Settings[1].SeasonalWindow != 15 {
		t.Fatalf("spans %d, %d, want 11, 15", d.Settings[0].SeasonalWindow, d.Settings[1].SeasonalWindow)
	}
	// The components are recovered away from the ends.
	worst := 0.0
	for i := 168; i < n-168; i++ {
		worst = math.Max(worst, math.Abs(d.Seasonals[0][i]-math.Sin(2*math.Pi*float64(i)/24)))
		worst = math.Max(worst, math.Abs(d.Seasonals[1][i]-0.5*math.Cos(2*math.Pi*float64(i)/168)))
	}
	if worst > 0.05 {
		t.Errorf("largest error of the recovered seasonal components %v", worst)
	}
	if testing.Verbose() {
		t.Logf("largest error %v", worst)
	}

	d, err = decompose.MSTL{Periods: []float64{168, 23.6, 24.4, 1000}}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Periods) != 2 || d.Periods[0] != 24 || d.Periods[1] != 168 {
		t.Fatalf("periods %v, want [24 168] (rounded, merged, 1000 left out)", d.Periods)
	}
}

// TestMSTLWeekly: weekly data carry the non-integer period 365.25/7,
// used as 52; on the weekly Mauna Loa CO2 record (gaps repaired) the
// annual cycle is strong — a seasonal strength above 0.9 is what the
// well-known regular CO2 cycle implies (common practice, loose check).
func TestMSTLWeekly(t *testing.T) {
	y, _, err := decompose.Repair{}.Fill(co2Weekly(t))
	if err != nil {
		t.Fatal(err)
	}
	d, err := decompose.MSTL{}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Periods) != 1 || d.Periods[0] != 52 {
		t.Fatalf("periods %v", d.Periods)
	}
	st, err := d.Strength()
	if err != nil {
		t.Fatal(err)
	}
	if st.Seasonal[0] < 0.9 || st.Trend < 0.9 {
		t.Errorf("strength %+v", st)
	}
}
