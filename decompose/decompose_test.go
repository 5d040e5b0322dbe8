package decompose_test

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"gonum.org/v1/gonum/stat"
)

func monthly(vals []float64) almanac.Series {
	return almanac.Series{Key: "t", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: vals}
}

func TestBadInput(t *testing.T) {
	co2 := fixtureInput(t, "stl_co2_swin7")
	withNaN := co2.Clone()
	withNaN.Values[100] = math.NaN()
	short := co2.Head(24)
	yearly := almanac.Series{Start: co2.Start, Freq: calendar.Yearly, Values: co2.Values[:40]}
	negative := co2.Clone()
	negative.Values[3] = -1
	for _, c := range []struct {
		name   string
		method decompose.Method
		y      almanac.Series
		want   error
		reason string
	}{
		{"stl period 1", decompose.STL{Period: 1}, co2, decompose.ErrPeriod, "a period below 2 has no seasonal cycle"},
		{"stl yearly frequency", decompose.STL{}, yearly, decompose.ErrPeriod, "no period from a yearly frequency"},
		{"stl two periods", decompose.STL{}, short, almanac.ErrTooShort, "R's stl needs more than two full periods"},
		{"stl NaN", decompose.STL{}, withNaN, almanac.ErrMissing, "gaps must be repaired first"},
		{"stl negative window", decompose.STL{SeasonalWindow: -7}, co2, decompose.ErrWindow, "negative span"},
		{"stl negative jump", decompose.STL{TrendJump: -1}, co2, decompose.ErrWindow, "negative jump"},
		{"stl bad degree", decompose.STL{TrendDegree: 7}, co2, decompose.ErrWindow, "degree outside the enum"},
		{"mstl NaN", decompose.MSTL{Periods: []float64{12}}, withNaN, almanac.ErrMissing, "gaps must be repaired first"},
		{"mstl period 1", decompose.MSTL{Periods: []float64{1, 12}}, co2, decompose.ErrPeriod, "period below 2"},
		{"mstl NaN period", decompose.MSTL{Periods: []float64{math.NaN()}}, co2, decompose.ErrPeriod, "non-finite period"},
		{"mstl no period", decompose.MSTL{Periods: []float64{}}, co2, decompose.ErrPeriod, "explicit empty list"},
		{"mstl all too long", decompose.MSTL{Periods: []float64{300}}, co2, almanac.ErrTooShort, "no period with two cycles"},
		{"mstl window count", decompose.MSTL{Periods: []float64{12, 6}, SeasonalWindows: []int{7}}, co2, decompose.ErrWindow, "one window per period"},
		{"classical short", decompose.Classical{}, co2.Head(23), almanac.ErrTooShort, "R's decompose needs two periods"},
		{"classical multiplicative negative", decompose.Classical{Multiplicative: true}, negative, almanac.ErrNonPositive, "multiplicative needs positive data"},
		{"classical period 1", decompose.Classical{Period: 1}, co2, decompose.ErrPeriod, "period below 2"},
		{"empty", decompose.STL{}, monthly(nil), almanac.ErrEmpty, "no data"},
		// Options so large that int arithmetic on them wrapped around:
		// these once panicked (slice bounds, makeslice) or gave a
		// misleading sentinel.
		{"stl huge seasonal window", decompose.STL{SeasonalWindow: math.MaxInt}, co2, decompose.ErrWindow, "R's stl takes 32-bit integers"},
		{"stl huge trend window", decompose.STL{TrendWindow: math.MaxInt32 + 1}, co2, decompose.ErrWindow, "just above the 32-bit bound"},
		{"stl huge period", decompose.STL{Period: math.MaxInt}, co2, almanac.ErrTooShort, "no two cycles fit"},
		{"mstl huge period", decompose.MSTL{Periods: []float64{1e300}}, co2, almanac.ErrTooShort, "no two cycles fit, not a wrapped int"},
		{"classical huge period", decompose.Classical{Period: math.MaxInt}, co2, almanac.ErrTooShort, "checked before allocating a period's figure"},
		{"classical period just too long", decompose.Classical{Period: 235}, co2, almanac.ErrTooShort, "468 < 2·235"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.method.Decompose(c.y)
			if !errors.Is(err, c.want) {
				t.Fatalf("err = %v, want %v (%s)", err, c.want, c.reason)
			}
			if err != nil && !strings.HasPrefix(err.Error(), "decompose: ") {
				t.Errorf("message %q does not start with the package name", err)
			}
		})
	}
	if _, err := (decompose.STL{}).Decompose(withNaN); err == nil || !strings.Contains(err.Error(), "Repair.Fill") {
		t.Errorf("NaN error %v does not point to Repair.Fill", err)
	}
	if !errors.Is(decompose.ErrWindow, almanac.ErrInvalid) || !errors.Is(decompose.ErrPeriod, almanac.ErrInvalid) {
		t.Error("package sentinels do not wrap almanac.ErrInvalid")
	}
}

// TestLargestSpans: spans and jumps at the 32-bit bound are accepted
// and give finite components (a span beyond the series is a global
// loess fit, as in the authors' Fortran).
func TestLargestSpans(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	for _, s := range []decompose.STL{
		{SeasonalWindow: math.MaxInt32},
		{TrendWindow: math.MaxInt32},
		{LowPassWindow: math.MaxInt32},
		{SeasonalJump: math.MaxInt32, TrendJump: math.MaxInt32, LowPassJump: math.MaxInt32},
	} {
		d, err := s.Decompose(y)
		if err != nil {
			t.Fatalf("%+v: %v", s, err)
		}
		for i := range d.Trend {
			if math.IsNaN(d.Trend[i]) || math.IsInf(d.Trend[i], 0) || math.IsNaN(d.Seasonal[i]) || math.IsInf(d.Seasonal[i], 0) {
				t.Fatalf("%+v: component not finite at %d", s, i)
			}
		}
	}
}

// TestSeasonalForwardEmpty: a horizon below 1 gives nil, not a panic.
func TestSeasonalForwardEmpty(t *testing.T) {
	d, err := decompose.STL{}.Decompose(fixtureInput(t, "stl_co2_swin7"))
	if err != nil {
		t.Fatal(err)
	}
	for _, h := range []int{0, -1, math.MinInt} {
		if s := d.SeasonalForward(h); s != nil {
			t.Errorf("h = %d: %v, want nil", h, s)
		}
	}
	if s := d.SeasonalForward(13); len(s) != 13 || s[12] != s[0] || s[0] != d.Seasonal[len(d.Seasonal)-12] {
		t.Errorf("h = 13: %v does not continue the last cycle", s)
	}
}

// TestEvenWindowRoundedUp: spans are raised to odd as in the Fortran of
// Cleveland et al. (1990), and the spans used are reported.
func TestEvenWindowRoundedUp(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	a, err := decompose.STL{SeasonalWindow: 6, TrendWindow: 22, LowPassWindow: 2}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	b, err := decompose.STL{SeasonalWindow: 7, TrendWindow: 23, LowPassWindow: 3}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	s := a.Settings[0]
	if s.SeasonalWindow != 7 || s.TrendWindow != 23 || s.LowPassWindow != 3 {
		t.Errorf("settings used %+v, want spans 7, 23, 3", s)
	}
	for i := range a.Trend {
		if a.Trend[i] != b.Trend[i] || a.Seasonal[i] != b.Seasonal[i] {
			t.Fatalf("even spans differ from the next odd ones at %d", i)
		}
	}
}

// TestAddBack: the components reproduce the data (sum, or product for a
// multiplicative decomposition) to rounding.
func TestAddBack(t *testing.T) {
	co2 := fixtureInput(t, "stl_co2_swin7")
	air := fixtureInput(t, "decompose_airpassengers_multiplicative")
	week := co2Weekly(t)
	week, _, err := decompose.Repair{}.Fill(week)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name   string
		method decompose.Method
		y      almanac.Series
	}{
		{"stl", decompose.STL{}, co2},
		{"stl robust", decompose.STL{Robust: true}, co2},
		{"stl periodic", decompose.STL{Periodic: true}, co2},
		{"mstl weekly co2 13 and 52", decompose.MSTL{Periods: []float64{13, 365.25 / 7}}, week},
		{"classical additive", decompose.Classical{}, co2},
		{"classical multiplicative", decompose.Classical{Multiplicative: true}, air},
	} {
		t.Run(c.name, func(t *testing.T) {
			d, err := c.method.Decompose(c.y)
			if err != nil {
				t.Fatal(err)
			}
			for i, v := range c.y.Values {
				var back float64
				if d.Multiplicative {
					back = d.Trend[i] * d.Seasonal[i] * d.Remainder[i]
				} else {
					back = d.Trend[i] + d.Seasonal[i] + d.Remainder[i]
				}
				if math.IsNaN(d.Trend[i]) {
					continue // classical trend ends
				}
				if math.Abs(back-v) > 1e-12*math.Abs(v) {
					t.Fatalf("index %d: components give %v, data %v", i, back, v)
				}
			}
			// The seasonal total is the sum of the per-period components.
			for i := range d.Seasonal {
				sum := 0.0
				for _, s := range d.Seasonals {
					sum += s[i]
				}
				if !d.Multiplicative && math.Abs(sum-d.Seasonal[i]) > 1e-12*(1+math.Abs(sum)) {
					t.Fatalf("index %d: seasonal total %v, sum of components %v", i, d.Seasonal[i], sum)
				}
			}
		})
	}
}

// TestPeriodicSeasonal: STL with Periodic gives a strictly periodic
// seasonal component (R's s.window = "periodic").
func TestPeriodicSeasonal(t *testing.T) {
	y := fixtureInput(t, "stl_nottem_periodic")
	// A start that is not the first month of the year must not matter.
	y.Start = time.Date(1920, 4, 1, 0, 0, 0, 0, time.UTC)
	for _, robust := range []bool{false, true} {
		d, err := decompose.STL{Periodic: true, Robust: robust}.Decompose(y)
		if err != nil {
			t.Fatal(err)
		}
		for i := 12; i < y.Len(); i++ {
			if d.Seasonal[i] != d.Seasonal[i-12] {
				t.Fatalf("robust=%v: seasonal[%d] = %v, seasonal[%d] = %v", robust, i, d.Seasonal[i], i-12, d.Seasonal[i-12])
			}
		}
	}
}

// TestStrength recomputes the strength measures of Wang, Smith & Hyndman
// (2006), F = max(0, 1 − Var(R)/Var(X + R)), with gonum's stat.Variance,
// independently of the package's own variance code.
func TestStrength(t *testing.T) {
	for _, c := range []struct {
		name   string
		method decompose.Method
		fix    string
	}{
		{"stl co2", decompose.STL{SeasonalWindow: 7}, "stl_co2_swin7"},
		{"classical nottem", decompose.Classical{}, "decompose_nottem_additive"},
		{"classical multiplicative air", decompose.Classical{Multiplicative: true}, "decompose_airpassengers_multiplicative"},
	} {
		t.Run(c.name, func(t *testing.T) {
			d, err := c.method.Decompose(fixtureInput(t, c.fix))
			if err != nil {
				t.Fatal(err)
			}
			got, err := d.Strength()
			if err != nil {
				t.Fatal(err)
			}
			var tr, sr, r []float64
			for i := range d.Trend {
				if math.IsNaN(d.Trend[i]) {
					continue
				}
				T, S, R := d.Trend[i], d.Seasonal[i], d.Remainder[i]
				if d.Multiplicative {
					T, S, R = math.Log(T), math.Log(S), math.Log(R)
				}
				tr, sr, r = append(tr, T+R), append(sr, S+R), append(r, R)
			}
			vr := stat.Variance(r, nil)
			wantT := math.Max(0, 1-vr/stat.Variance(tr, nil))
			wantS := math.Max(0, 1-vr/stat.Variance(sr, nil))
			if math.Abs(got.Trend-wantT) > 1e-12 || math.Abs(got.Seasonal[0]-wantS) > 1e-12 {
				t.Fatalf("strength %+v, want trend %v seasonal %v", got, wantT, wantS)
			}
			if got.Trend < 0 || got.Trend > 1 || got.Seasonal[0] < 0 || got.Seasonal[0] > 1 {
				t.Fatalf("strength outside [0, 1]: %+v", got)
			}
		})
	}
}

// TestAdjusted: the adjusted series is y − seasonal (y / seasonal).
func TestAdjusted(t *testing.T) {
	air := fixtureInput(t, "decompose_airpassengers_multiplicative")
	for _, mul := range []bool{false, true} {
		d, err := decompose.Classical{Multiplicative: mul}.Decompose(air)
		if err != nil {
			t.Fatal(err)
		}
		a := d.Adjusted()
		if a.Start != air.Start || a.Freq != air.Freq || a.Key != air.Key {
			t.Fatal("adjusted series lost its key, start or frequency")
		}
		for i, v := range air.Values {
			want := v - d.Seasonal[i]
			if mul {
				want = v / d.Seasonal[i]
			}
			if a.Values[i] != want {
				t.Fatalf("mul=%v index %d: %v, want %v", mul, i, a.Values[i], want)
			}
		}
	}
}

// TestConcurrentDeterminism: one specification used from several
// goroutines gives bit-identical results to a serial run.
func TestConcurrentDeterminism(t *testing.T) {
	ys := []almanac.Series{
		fixtureInput(t, "stl_co2_swin7"),
		fixtureInput(t, "stl_nottem_periodic"),
		fixtureInput(t, "decompose_airpassengers_multiplicative"),
		fixtureInput(t, "stl_ukgas_swin9_sdeg1"),
	}
	spec := decompose.STL{Robust: true}
	want := make([]*decompose.Decomposition, len(ys))
	for i, y := range ys {
		d, err := spec.Decompose(y)
		if err != nil {
			t.Fatal(err)
		}
		want[i] = d
	}
	got := make([]*decompose.Decomposition, 4*len(ys))
	errs := make([]error, len(got))
	done := make(chan struct{})
	for k := range got {
		go func() {
			defer func() { done <- struct{}{} }()
			got[k], errs[k] = spec.Decompose(ys[k%len(ys)])
		}()
	}
	for range got {
		<-done
	}
	for k, d := range got {
		if errs[k] != nil {
			t.Fatal(errs[k])
		}
		w := want[k%len(ys)]
		for i := range w.Trend {
			if math.Float64bits(d.Trend[i]) != math.Float64bits(w.Trend[i]) || math.Float64bits(d.Seasonal[i]) != math.Float64bits(w.Seasonal[i]) || math.Float64bits(d.Weights[i]) != math.Float64bits(w.Weights[i]) {
				t.Fatalf("goroutine %d differs at %d", k, i)
			}
		}
	}
}

// TestExactMedianOption: the option reaches the kernel (even n, robust:
// the results differ from R's default scale) and is reported in Settings.
func TestExactMedianOption(t *testing.T) {
	y := fixtureInput(t, "stl_airpassengers_log_swin13_robust")
	a, err := decompose.STL{SeasonalWindow: 13, Robust: true}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	b, err := decompose.STL{SeasonalWindow: 13, Robust: true, ExactMedian: true}.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	if !b.Settings[0].ExactMedian || a.Settings[0].ExactMedian {
		t.Fatal("ExactMedian not reported in Settings")
	}
	differ := false
	for i := range a.Weights {
		differ = differ || a.Weights[i] != b.Weights[i]
	}
	if !differ {
		t.Error("ExactMedian changed nothing on a robust even-length fit where R's partial sort is known to be off")
	}
}
