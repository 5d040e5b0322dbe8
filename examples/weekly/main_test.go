package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
)

// The demo runs once for the tests that check its result.
var (
	demoOnce sync.Once
	demoRes  *result
	demoText string
	demoErr  error
)

func demo(t *testing.T) (*result, string) {
	t.Helper()
	demoOnce.Do(func() {
		var out bytes.Buffer
		demoRes, demoErr = run(context.Background(), &out)
		demoText = out.String()
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoRes, demoText
}

// TestWeekly runs the whole demo and checks what it promises. The planted
// effects are those of scenario.go (invented data); the tolerances are
// this test's own choice.
func TestWeekly(t *testing.T) {
	res, text := demo(t)

	// The calendar effects come back with the planted sign and size:
	// within three standard errors of the planted value (zero where the
	// event did not touch the route), and the large event effects within
	// 30% as well.
	for r, rt := range res.routes {
		fit := res.fits[r]
		names := []string{holidayColumn}
		planted := []float64{rt.holidayEffect * rt.UnitFactor}
		for _, e := range res.regions[rt.Region].Events {
			names = append(names, e.Name)
			planted = append(planted, rt.eventEffect[e.Name]*rt.UnitFactor)
		}
		for i, name := range names {
			want := planted[i]
			t.Run(rt.Key+"/"+name, func(t *testing.T) {
				got, se, ok := effect(fit, name)
				if !ok {
					t.Fatalf("no coefficient %q in %s", name, fit)
				}
				if !(se > 0) {
					t.Fatalf("standard error %v", se)
				}
				if math.Abs(got-want) > 3*se {
					t.Errorf("effect %.1f ± %.1f, planted %.1f: more than three standard errors off", got, se, want)
				}
				if want != 0 && math.Signbit(got) != math.Signbit(want) {
					t.Errorf("effect %.1f has the wrong sign (planted %.1f)", got, want)
				}
				if math.Abs(want) > 1000 && math.Abs(got-want) > 0.3*math.Abs(want) {
					t.Errorf("effect %.1f, planted %.1f: off by more than 30%%", got, want)
				}
			})
		}
	}

	// The unit of S2 does not matter: forecasts equal up to rounding.
	if !(res.scaleDiff < 1e-6) {
		t.Errorf("forecasts in the delivered unit and on an index differ by %.3g (relative)", res.scaleDiff)
	}

	// Coherent plan: 13 weeks from the week after the history, finite,
	// inside their bands, positive.
	start := calendar.Weekly.Add(lastWeek, 1)
	for r, fc := range res.forecasts {
		key := res.routes[r].Key
		if fc.Horizon() != horizon || !fc.Start.Equal(start) || !fc.Freq.Equal(calendar.Weekly) {
			t.Errorf("%s: forecast of %d steps from %s (%s), want %d from %s", key, fc.Horizon(), fc.Start, fc.Freq, horizon, start)
		}
		lo, hi, err := fc.Bounds(level)
		if err != nil {
			t.Fatalf("%s: %v", key, err)
		}
		for h, m := range fc.Mean {
			if math.IsNaN(m) || math.IsInf(m, 0) || !(lo[h] < m && m < hi[h]) || !(lo[h] > 0) {
				t.Errorf("%s step %d: forecast %v, band %v to %v", key, h+1, m, lo[h], hi[h])
			}
		}
	}

	// Holiday weeks move the forecasts the way the routes react: the
	// commuter route N1 loses and the leisure route N2 gains, against
	// the week before, in the week of Spring Friday (week 5 of the plan:
	// Easter Sunday 2026 is 5 April, recalled from memory).
	n1, n2 := res.forecasts[0].Mean, res.forecasts[1].Mean
	if !(n1[4] < n1[3]) || !(n2[4] > n2[3]) {
		t.Errorf("Spring Friday week: N1 %.0f -> %.0f, N2 %.0f -> %.0f; want a fall and a rise", n1[3], n1[4], n2[3], n2[4])
	}

	for r, w := range res.winners {
		if w == "" {
			t.Errorf("%s: no winner", res.routes[r].Key)
		}
	}
	for _, want := range []string{
		"What the calendar explains", "Backtest of N1 Harbour Loop", "Winner per route",
		"Lantern Bay", "seat-km", "Spring Friday", "Boat Day",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	for _, line := range strings.Split(text, "\n") {
		if strings.HasPrefix(line, "2026-W14") && strings.Count(line, "*") != 4 {
			t.Errorf("holiday week not flagged on every route: %q", line)
		}
		if strings.HasPrefix(line, "2026-W12") && strings.Contains(line, "*") {
			t.Errorf("week without holidays flagged: %q", line)
		}
	}
}

// TestCalendarModelAnyOrigin fits the model on windows that start or end
// around the events, as a backtest or a sliding window would, and checks
// that an event outside the history is left out rather than failing.
func TestCalendarModelAnyOrigin(t *testing.T) {
	regs, rs := regions(), routes()
	ys, err := generate(regs, rs)
	if err != nil {
		t.Fatal(err)
	}
	at := func(y almanac.Series, d time.Time) int {
		i, err := y.Index(d)
		if err != nil {
			t.Fatal(err)
		}
		return i
	}
	tests := []struct {
		name        string
		route       int
		from, to    int
		wantDropped string // "" = every event estimable
	}{
		{"N1 before the reclassification", 0, 0, at(ys[0], day(2024, time.January, 1)), "Gull Point"},
		{"N1 ending inside the reclassification", 0, 0, at(ys[0], day(2024, time.May, 6)), ""},
		{"S1 starting inside the quay works", 2, at(ys[2], day(2023, time.October, 16)), ys[2].Len(), ""},
		{"S2 after both events", 3, at(ys[3], day(2024, time.September, 2)), ys[3].Len(), "Tidewater quay works, lantern festival"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			y := ys[tt.route].Window(tt.from, tt.to)
			fit, err := model(regs[rs[tt.route].Region]).Fit(context.Background(), y)
			if err != nil {
				t.Fatal(err)
			}
			s := fit.String()
			if tt.wantDropped == "" && strings.Contains(s, "not estimable") {
				t.Errorf("%s: an event was left out", s)
			}
			if tt.wantDropped != "" && !strings.Contains(s, "not estimable here: "+tt.wantDropped) {
				t.Errorf("%s: want %q left out", s, tt.wantDropped)
			}
			fc, err := fit.Forecast(horizon, level)
			if err != nil {
				t.Fatal(err)
			}
			if want := y.Time(y.Len()); !fc.Start.Equal(want) || fc.Horizon() != horizon {
				t.Errorf("forecast of %d from %s, want %d from %s", fc.Horizon(), fc.Start, horizon, want)
			}
			if _, err := fit.Forecast(0); !errors.Is(err, almanac.ErrHorizon) {
				t.Errorf("Forecast(0): %v, want ErrHorizon", err)
			}
			if _, err := fit.(almanac.Simulator).Simulate(0, 10, rand.NewPCG(1, 2)); !errors.Is(err, almanac.ErrHorizon) {
				t.Errorf("Simulate(0): %v, want ErrHorizon", err)
			}
			// The model builds its future regressors for any horizon:
			// a year ahead works as well as a quarter.
			if long, err := fit.Forecast(52); err != nil || long.Horizon() != 52 {
				t.Errorf("a year ahead: %v", err)
			}
			// Sample paths use the future regressors too: their mean
			// is close to the point forecast (within 4 standard errors
			// of a mean of 400 draws, this test's own bound).
			paths, err := fit.(almanac.Simulator).Simulate(horizon, 400, rand.NewPCG(20261201, 7))
			if err != nil {
				t.Fatal(err)
			}
			lo, hi, err := fc.Bounds(level)
			if err != nil {
				t.Fatal(err)
			}
			for h := range horizon {
				mean := 0.0
				for _, p := range paths {
					mean += p[h]
				}
				mean /= float64(len(paths))
				sd := (hi[h] - lo[h]) / (2 * 1.2815515655446004) // the 80% band of a normal forecast is ±1.2816 sd (common practice)
				if math.Abs(mean-fc.Mean[h]) > 4*sd/math.Sqrt(float64(len(paths))) {
					t.Errorf("step %d: mean of the paths %.1f, forecast %.1f (sd %.1f)", h+1, mean, fc.Mean[h], sd)
				}
			}
		})
	}
}

// TestCalendarModelBadInput: input the model cannot take gives an error
// wrapping a root sentinel, never a panic.
func TestCalendarModelBadInput(t *testing.T) {
	regs := regions()
	good := model(regs[0])
	weekly := func(vals ...float64) almanac.Series {
		return almanac.Series{Key: "x", Start: firstWeek, Freq: calendar.Weekly, Values: vals}
	}
	long := make([]float64, 120)
	for i := range long {
		long[i] = 100 + float64(i%7)
	}
	badEvent := good
	badEvent.Calendar.Effects = append([]calendar.Effect{calendar.Event{Name: "x", Shape: calendar.Shift, From: firstWeek}}, good.Calendar.Effects...)
	tests := []struct {
		name string
		m    arima.Search
		y    almanac.Series
		want error
	}{
		{"empty", good, weekly(), almanac.ErrEmpty},
		{"no frequency", good, almanac.Series{Key: "x", Start: firstWeek, Values: long}, almanac.ErrFrequency},
		{"infinite value", good, weekly(append([]float64{math.Inf(1)}, long...)...), almanac.ErrNonFinite},
		{"shift without an end", badEvent, weekly(long...), almanac.ErrInvalid},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := tt.m.Fit(context.Background(), tt.y)
			if !errors.Is(err, tt.want) {
				t.Errorf("got %v, want an error wrapping %v", err, tt.want)
			}
		})
	}
}

// TestBatchFitDeterministic: the model gives bit-identical forecasts
// whatever the number of BatchFit workers.
func TestBatchFitDeterministic(t *testing.T) {
	regs, rs := regions(), routes()
	ys, err := generate(regs, rs)
	if err != nil {
		t.Fatal(err)
	}
	north := ys[:2]
	var runs [2][]almanac.Forecast
	for k, workers := range []int{1, 2} {
		out, err := almanac.BatchFit(context.Background(), model(regs[0]), north, almanac.BatchOptions{Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		for _, b := range out {
			if b.Err != nil {
				t.Fatal(b.Err)
			}
			fc, err := b.Fitted.Forecast(horizon, level)
			if err != nil {
				t.Fatal(err)
			}
			runs[k] = append(runs[k], fc)
		}
	}
	for i := range runs[0] {
		for h := range runs[0][i].Mean {
			if runs[0][i].Mean[h] != runs[1][i].Mean[h] {
				t.Fatalf("%s step %d: %v with one worker, %v with two", north[i].Key, h+1, runs[0][i].Mean[h], runs[1][i].Mean[h])
			}
		}
	}
}

// TestInterventionsFound: the detection, told nothing of the events,
// finds them at their weeks (scenario.go; ISO weeks of the events'
// dates: the quay works run 2023-W40 to W44, the reclassification
// 2024-W10 to W30, the festival is in 2024-W33):
//   - the five-week quay works on S1 as a drop and a recovery: a level
//     shift down in W40 (or a temporary change) and one up in W45;
//   - the lantern festival on S2 as a one-week rise (an additive outlier,
//     or a temporary change);
//   - the Gull Point reclassification (±450 boardings, 2.6 and 3.8
//     innovation standard deviations on N1 and N2) only in part: on N1 as
//     the level shift back up in W31 when it ended; on N2 as a rise within
//     its weeks (a temporary change in W24). Its start is not found as a
//     level shift at the default critical value (3.70 here): the searched
//     error models difference the series (d = 1), in which a shift of that
//     size is hard to tell from the noise; with the critical value 3.0 the
//     start on N2 shows as a temporary change, among several false ones.
func TestInterventionsFound(t *testing.T) {
	res, text := demo(t)
	type want struct {
		from, to string // ISO weeks, inclusive
		kind     []arima.InterventionKind
		sign     float64
	}
	ls := []arima.InterventionKind{arima.LevelShift}
	shiftOrTC := []arima.InterventionKind{arima.LevelShift, arima.TemporaryChange}
	anyKind := []arima.InterventionKind{arima.AdditiveOutlier, arima.LevelShift, arima.TemporaryChange}
	wants := map[string][]want{
		"N1": {{"2024-W31", "2024-W31", ls, +1}},
		"N2": {{"2024-W10", "2024-W30", anyKind, +1}},
		"S1": {{"2023-W40", "2023-W40", shiftOrTC, -1}, {"2023-W45", "2023-W45", ls, +1}},
		"S2": {{"2024-W33", "2024-W33", []arima.InterventionKind{arima.AdditiveOutlier, arima.TemporaryChange}, +1}},
	}
	for r, rt := range res.routes {
		t.Run(rt.Key, func(t *testing.T) {
			found := res.found[r]
			for _, w := range wants[rt.Key] {
				ok := false
				for _, iv := range found {
					wk := isoWeek(iv.At)
					if wk >= w.from && wk <= w.to && slices.Contains(w.kind, iv.Kind) && iv.Size*w.sign > 0 {
						ok = true
					}
				}
				if !ok {
					t.Errorf("no %v of sign %+.0f in %s..%s; found %v", w.kind, w.sign, w.from, w.to, names(found))
				}
			}
			// Nothing else: every intervention found is one of those.
			if len(found) > len(wants[rt.Key]) {
				t.Errorf("found %v", names(found))
			}
		})
	}
	if !strings.Contains(text, "Interventions found without being told") {
		t.Error("output lacks the detection table")
	}
}

func names(ivs []arima.Intervention) []string {
	var out []string
	for _, iv := range ivs {
		out = append(out, fmt.Sprintf("%s %s %+.0f", iv.Kind, isoWeek(iv.At), iv.Size))
	}
	return out
}

// TestCombination: the calendar model and a dynamic harmonic regression
// (both building their own future regressors) combine like any models,
// with bands from their sample paths, and the combined forecast lies
// between the members'.
func TestCombination(t *testing.T) {
	regs, rs := regions(), routes()
	ys, err := generate(regs, rs)
	if err != nil {
		t.Fatal(err)
	}
	reg := regs[rs[2].Region]
	// The harmonic regression brings its own Fourier terms: give it the
	// holidays and the events.
	dhr := arima.HarmonicRegression{Calendar: calendar.Design{Effects: []calendar.Effect{calendar.HolidayCount{Calendar: reg.Cal, Name: holidayColumn}}}}
	for _, e := range reg.Events {
		dhr.Calendar.Effects = append(dhr.Calendar.Effects, e.rule())
	}
	members := []almanac.Model{model(reg), dhr}
	fit, err := almanac.Combination{Members: members}.Fit(context.Background(), ys[2])
	if err != nil {
		t.Fatal(err)
	}
	fc, err := fit.Forecast(horizon, level)
	if err != nil {
		t.Fatal(err)
	}
	var each [][]float64
	for _, m := range members {
		f, err := m.Fit(context.Background(), ys[2])
		if err != nil {
			t.Fatal(err)
		}
		mf, err := f.Forecast(horizon)
		if err != nil {
			t.Fatal(err)
		}
		each = append(each, mf.Mean)
	}
	lo, hi, err := fc.Bounds(level)
	if err != nil {
		t.Fatal(err)
	}
	for h, m := range fc.Mean {
		a, b := min(each[0][h], each[1][h]), max(each[0][h], each[1][h])
		if m < a-1e-9*math.Abs(a) || m > b+1e-9*math.Abs(b) || !(lo[h] < m && m < hi[h]) {
			t.Errorf("step %d: combined %.1f (band %.1f–%.1f), members %.1f and %.1f", h+1, m, lo[h], hi[h], each[0][h], each[1][h])
		}
	}
}
