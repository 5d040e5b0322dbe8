package arima

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

func civil(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

// hardwareCalendar is an invented region's holidays (a fictional chain of
// hardware stores closes on them).
var hardwareCalendar = calendar.Calendar{Holidays: []calendar.Holiday{
	{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.NearestWeekday}},
	{Name: "Spring Friday", Rule: calendar.EasterOffset{Days: -2}},
	{Name: "Harvest Monday", Rule: calendar.NthWeekday{Month: time.September, Weekday: time.Monday, N: 1}},
	{Name: "Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 25, Observed: calendar.NearestWeekday}},
}}

// weeklyStore is invented weekly sales of a hardware store from Monday
// 4 January 2021: a level of 1000, an annual cycle of exact period
// 365.25/7 (amplitudes 120 and 40 on the first two harmonics), −90 per
// holiday day, AR(1) noise (φ = 0.5, σ = 25), and whatever extra the
// caller adds (indexed by week).
func weeklyStore(n int, seed uint64, extra func(i int) float64) almanac.Series {
	start := civil(2021, time.January, 4)
	g := calendar.Grid{Start: start, Freq: calendar.Weekly, N: n}
	hol, err := g.Holidays(hardwareCalendar)
	if err != nil {
		panic(err)
	}
	// Weeks from the origin of calendar.Cycle (a whole number here).
	whole := int(math.Round(start.Sub(calendar.CycleOrigin).Hours() / (24 * 7)))
	rng := rand.New(rand.NewPCG(seed, 7))
	v := make([]float64, n)
	e := 0.0
	for i := range v {
		t := float64(whole + i)
		x := 2 * math.Pi * t / (365.25 / 7)
		e = 0.5*e + 25*rng.NormFloat64()
		v[i] = 1000 + 120*math.Sin(x) + 40*math.Cos(2*x) - 90*hol[i] + e
		if extra != nil {
			v[i] += extra(i)
		}
	}
	return almanac.Series{Key: "store", Start: start, Freq: calendar.Weekly, Values: v}
}

// TestCalendarEqualsRegressors: a Spec with calendar rules fits and
// forecasts exactly as the same columns given as Regressors with their
// future values by hand (the columns the Design builds).
func TestCalendarEqualsRegressors(t *testing.T) {
	y := weeklyStore(156, 1, nil)
	design := calendar.Design{Effects: []calendar.Effect{
		calendar.HolidayCount{Calendar: hardwareCalendar},
		calendar.Cycle{Period: 365.25 / 7, Harmonics: 2},
	}}
	ruled := mustFit(t, Spec{P: 1, Calendar: design}, y)
	cols, err := design.Build(y.Start, y.Freq, y.Len(), 13)
	if err != nil {
		t.Fatal(err)
	}
	hist, fut, err := (calendar.Grid{Start: y.Start, Freq: y.Freq, N: y.Len(), H: 13}).Split(cols...)
	if err != nil {
		t.Fatal(err)
	}
	regs := make([]Regressor, len(hist))
	for j, c := range hist {
		regs[j] = Regressor(c)
	}
	byHand := mustFit(t, Spec{P: 1, Regressors: regs}, y)
	if ruled.LogLik() != byHand.LogLik() {
		t.Errorf("log-likelihood %v with rules, %v by hand", ruled.LogLik(), byHand.LogLik())
	}
	a, err := ruled.Forecast(13, 80)
	if err != nil {
		t.Fatal(err)
	}
	b, err := byHand.ForecastWith(13, fut, 80)
	if err != nil {
		t.Fatal(err)
	}
	for h := range a.Mean {
		if a.Mean[h] != b.Mean[h] {
			t.Fatalf("step %d: %v with rules, %v by hand", h+1, a.Mean[h], b.Mean[h])
		}
	}
	// Coefficients by name with standard errors; the planted holiday
	// effect (−90 per day, invented) within three of them.
	for _, c := range ruled.Coef() {
		if !(c.StdErr > 0) {
			t.Errorf("%s: standard error %v", c.Name, c.StdErr)
		}
		if c.Name == "holidays" && math.Abs(c.Value+90) > 3*c.StdErr {
			t.Errorf("holiday effect %.1f ± %.1f, planted −90", c.Value, c.StdErr)
		}
	}
	if got := ruled.String(); got != "ARIMA(1,0,0) + mean + regressors(holidays, cycle 52.18 sin1, cycle 52.18 cos1, cycle 52.18 sin2, cycle 52.18 cos2)" {
		t.Errorf("String %q", got)
	}
	// Simulation uses the future calendar values too.
	paths, err := ruled.Simulate(13, 2000, rand.NewPCG(3, 4))
	if err != nil {
		t.Fatal(err)
	}
	sd := a.Dist.(*almanac.Normal).SD
	for h := range a.Mean {
		m := 0.0
		for _, p := range paths {
			m += p[h]
		}
		m /= float64(len(paths))
		if math.Abs(m-a.Mean[h]) > 4*sd[h]/math.Sqrt(float64(len(paths))) {
			t.Errorf("step %d: mean of paths %.2f, forecast %.2f", h+1, m, a.Mean[h])
		}
	}
}

// TestCalendarLeftOut: events that do not touch the fitted window are
// left out and named, not fatal; the rest still forecasts on its own.
func TestCalendarLeftOut(t *testing.T) {
	y := weeklyStore(104, 2, nil)
	design := calendar.Design{Effects: []calendar.Effect{
		calendar.HolidayCount{Calendar: hardwareCalendar},
		calendar.Event{Name: "old fire", From: civil(2019, time.May, 1)},
		calendar.Event{Name: "future sale", Shape: calendar.Shift, From: civil(2023, time.January, 9), Through: civil(2023, time.January, 22)},
		calendar.Event{Name: "past closure", Shape: calendar.Step, From: civil(2020, time.May, 1)},
	}}
	f := mustFit(t, Spec{P: 1, Calendar: design, Fixed: map[string]float64{"old fire": 3}}, y)
	// The sale lies after the history: its column is zero there, so it
	// cannot be estimated either.
	if got, want := strings.Join(f.LeftOut(), ", "), "old fire, future sale, past closure"; got != want {
		t.Errorf("left out %q, want %q", got, want)
	}
	if !strings.Contains(f.String(), "(not estimable here: old fire, future sale, past closure)") {
		t.Errorf("String %q does not say what was left out", f.String())
	}
	if _, err := f.Forecast(4); err != nil {
		t.Fatal(err)
	}
	// A Search with the same design.
	r, err := Search{MaxP: 1, MaxQ: 1, D: NoDifferencing, Calendar: design}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := r.Forecast(13, 95); err != nil {
		t.Fatal(err)
	}
	if sp := r.(*Fitted).Spec(); len(sp.Calendar.Effects) != 4 || len(sp.Regressors) != 0 {
		t.Errorf("Spec of the result: %d effects, %d regressors", len(sp.Calendar.Effects), len(sp.Regressors))
	}
}

// TestCalendarBadInput: bad designs give errors wrapping sentinels.
func TestCalendarBadInput(t *testing.T) {
	y := weeklyStore(60, 3, nil)
	hol := calendar.HolidayCount{Calendar: hardwareCalendar}
	tests := []struct {
		name string
		spec Spec
		want error
	}{
		{"bad event", Spec{Calendar: calendar.Design{Effects: []calendar.Effect{calendar.Event{Name: "x", Shape: calendar.Decay, From: civil(2021, time.March, 1), Rate: 3}}}}, almanac.ErrInvalid},
		{"nil effect", Spec{Calendar: calendar.Design{Effects: []calendar.Effect{nil}}}, almanac.ErrInvalid},
		{"name used twice", Spec{Regressors: []Regressor{{Name: "holidays", Values: make([]float64, 60)}}, Calendar: calendar.Design{Effects: []calendar.Effect{hol}}}, almanac.ErrInvalid},
		{"reserved name", Spec{Calendar: calendar.Design{Effects: []calendar.Effect{calendar.HolidayCount{Calendar: hardwareCalendar, Name: "ar1"}}}}, almanac.ErrInvalid},
		{"user regressor still needed", Spec{Regressors: []Regressor{{Name: "price", Values: seq(60)}}, Calendar: calendar.Design{Effects: []calendar.Effect{hol}}}, ErrNeedRegressors},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, err := tt.spec.Fit(context.Background(), y)
			if err == nil {
				_, err = f.Forecast(3)
			}
			if !errors.Is(err, tt.want) {
				t.Errorf("got %v, want %v", err, tt.want)
			}
		})
	}
}

func seq(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = float64(i%5) + 0.1*float64(i)
	}
	return v
}
