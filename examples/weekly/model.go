package main

import (
	"context"
	"fmt"
	"math/rand/v2"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
)

// calendarARIMA is a regression with ARIMA errors whose regressors come
// from a route's calendar: holiday days per week, Fourier terms of the
// year and the route's one-off events. It is an almanac.Model of its own,
// so it works wherever a model does (BatchFit, accuracy.Backtest): Fit
// builds the regressors for the series' own weeks, whatever its start and
// length, so a backtest can refit it at any origin.
type calendarARIMA struct {
	// Cal is the region's holiday calendar.
	Cal calendar.Calendar
	// Events are the route's one-off events. An event that does not
	// touch the history being fitted cannot be estimated and is left out
	// of that fit.
	Events []event
	// Harmonics is the number of Fourier pairs for the annual cycle of
	// 365.25/7 weeks.
	Harmonics int
	// MaxHorizon is the longest forecast the fitted model can make: the
	// future regressors are built this far ahead at Fit.
	MaxHorizon int
	// Search chooses the ARIMA orders of the errors; its Regressors field
	// is filled in by Fit.
	Search arima.Search
}

var (
	_ almanac.Model     = calendarARIMA{}
	_ almanac.Simulator = (*calendarFit)(nil)
)

// epoch anchors the Fourier terms to the calendar (the Monday of ISO week
// 2000-W01), so a window starting at any week gets the same season.
var epoch = day(2000, time.January, 3)

// Column names of the calendar regressors.
const holidayColumn = "holiday days"

// Fit builds the regressors on the series' grid plus MaxHorizon future
// weeks and fits the ARIMA search with them.
func (m calendarARIMA) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := y.Validate(); err != nil {
		return nil, err
	}
	if !y.Freq.Equal(calendar.Weekly) {
		return nil, fmt.Errorf("weekly: %w: calendar model needs weekly data, have %s", almanac.ErrFrequency, y.Freq)
	}
	if m.MaxHorizon < 1 || m.Harmonics < 1 {
		return nil, fmt.Errorf("weekly: %w: MaxHorizon and Harmonics must be positive", almanac.ErrInvalid)
	}
	g := calendar.Grid{Start: y.Start, Freq: y.Freq, N: y.Len(), H: m.MaxHorizon}
	cols, err := m.columns(g)
	if err != nil {
		return nil, fmt.Errorf("weekly: %s: %w", y.Key, err)
	}
	// A column that is constant over the history (an event outside it)
	// has no estimable effect: leave it out.
	var kept []calendar.Column
	var dropped []string
	for _, c := range cols {
		if constant(c.Values[:g.N]) {
			dropped = append(dropped, c.Name)
			continue
		}
		kept = append(kept, c)
	}
	history, future, err := g.Split(kept...)
	if err != nil {
		return nil, fmt.Errorf("weekly: %s: %w", y.Key, err)
	}
	s := m.Search
	s.Regressors = make([]arima.Regressor, len(history))
	for j, c := range history {
		s.Regressors[j] = arima.Regressor(c)
	}
	fit, err := s.Fit(ctx, y)
	if err != nil {
		return nil, err
	}
	res, ok := fit.(*arima.Fitted)
	if !ok {
		return nil, fmt.Errorf("weekly: %w: arima.Search returned %T", almanac.ErrNotFitted, fit)
	}
	return &calendarFit{Fitted: res, future: future, dropped: dropped}, nil
}

// columns returns the calendar regressors on g: holiday days, the Fourier
// pairs and one column per event.
func (m calendarARIMA) columns(g calendar.Grid) ([]calendar.Column, error) {
	hol, err := g.Holidays(m.Cal)
	if err != nil {
		return nil, err
	}
	cols := []calendar.Column{{Name: holidayColumn, Values: hol}}
	t0, err := calendar.Weekly.Between(epoch, g.Start)
	if err != nil {
		return nil, err
	}
	four, err := calendar.FourierFrom(t0+1, g.Len(), 365.25/7, m.Harmonics)
	if err != nil {
		return nil, err
	}
	for j, f := range four {
		kind := "sin"
		if j%2 == 1 {
			kind = "cos"
		}
		cols = append(cols, calendar.Column{Name: fmt.Sprintf("year %s%d", kind, j/2+1), Values: f})
	}
	for _, e := range m.Events {
		v, err := eventColumn(g, e)
		if err != nil {
			return nil, err
		}
		cols = append(cols, calendar.Column{Name: e.Name, Values: v})
	}
	return cols, nil
}

// eventColumn is the regressor of e on g; an event wholly outside g gives
// zeros, and a shift that began before g starts at g's first week.
func eventColumn(g calendar.Grid, e event) ([]float64, error) {
	if e.Kind != pulse && e.Kind != shift {
		return nil, fmt.Errorf("%w: event %q has kind %s", almanac.ErrInvalid, e.Name, e.Kind)
	}
	first := g.Time(0)
	end := g.Time(g.Len()) // the Monday after the last week
	last := e.Through
	if e.Kind == pulse {
		last = e.From
	}
	if last.Before(first) || !e.From.Before(end) {
		return make([]float64, g.Len()), nil
	}
	if e.Kind == pulse {
		return g.Pulse(e.From)
	}
	from := e.From
	if from.Before(first) {
		from = first
	}
	return g.Shift(from, e.Through)
}

func constant(xs []float64) bool {
	for _, x := range xs {
		if x != xs[0] {
			return false
		}
	}
	return true
}

// calendarFit is a fitted calendarARIMA: the chosen ARIMA model with the
// future regressors it forecasts with.
type calendarFit struct {
	*arima.Fitted
	future  [][]float64 // MaxHorizon future values per kept regressor
	dropped []string    // regressors left out: constant over the history
}

// Forecast forecasts h ≤ MaxHorizon weeks with the calendar's future
// regressors.
func (f *calendarFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	fut, err := f.futureFor(h)
	if err != nil {
		return almanac.Forecast{}, err
	}
	return f.ForecastWith(h, fut, levels...)
}

// Simulate draws n sample paths of h ≤ MaxHorizon weeks with the
// calendar's future regressors (the embedded model's own Simulate would
// lack them).
func (f *calendarFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	fut, err := f.futureFor(h)
	if err != nil {
		return nil, err
	}
	return f.SimulateWith(h, n, fut, src)
}

// futureFor returns the first h future values of every regressor.
func (f *calendarFit) futureFor(h int) ([][]float64, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, err
	}
	if len(f.future) > 0 && h > len(f.future[0]) {
		return nil, fmt.Errorf("weekly: %w: horizon %d beyond the %d weeks of future regressors built at Fit", almanac.ErrHorizon, h, len(f.future[0]))
	}
	fut := make([][]float64, len(f.future))
	for j, c := range f.future {
		fut[j] = c[:h]
	}
	return fut, nil
}

// String names the ARIMA model with its regressors.
func (f *calendarFit) String() string {
	s := f.Fitted.String()
	if len(f.dropped) > 0 {
		s += " (not estimable here: " + strings.Join(f.dropped, ", ") + ")"
	}
	return s
}

// effect returns the estimate and standard error of a regressor, and
// whether the fit has it.
func (f *calendarFit) effect(name string) (value, se float64, ok bool) {
	for _, c := range f.Coef() {
		if c.Name == name {
			return c.Value, c.StdErr, true
		}
	}
	return 0, 0, false
}
