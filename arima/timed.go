package arima

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// timed is the part of a fit's regression built from the rules of
// Spec.Calendar (or Search.Calendar): the design, and which of its
// columns entered the fit (after the caller's own Regressors, in design
// order) or were left out as not estimable from the fitted window.
type timed struct {
	design  calendar.Design
	kept    []string
	dropped []string
}

// expandCalendar builds the columns of design on y's time axis and
// returns regs followed by the columns that vary over y's observed
// values, fixed without the entries of the columns left out, and the
// record of what was kept. A column constant over the observed values
// (an event outside the window, a holiday that never occurs in it, a
// step that began before it) has no estimable effect — it would be
// collinear with the mean, or zero after differencing — and is left out.
func expandCalendar(design calendar.Design, regs []Regressor, fixed map[string]float64, y almanac.Series) ([]Regressor, map[string]float64, *timed, error) {
	cols, err := design.Build(y.Start, y.Freq, y.Len(), 0)
	if err != nil {
		return nil, nil, nil, fmt.Errorf("arima: %w: calendar regressors of series %q: %w", almanac.ErrInvalid, y.Key, err)
	}
	t := &timed{design: design}
	out := append([]Regressor(nil), regs...)
	for _, c := range cols {
		if constantOver(c.Values, y.Values) {
			t.dropped = append(t.dropped, c.Name)
			continue
		}
		t.kept = append(t.kept, c.Name)
		out = append(out, Regressor{Name: c.Name, Values: c.Values})
	}
	if len(t.dropped) > 0 && len(fixed) > 0 {
		f := make(map[string]float64, len(fixed))
		for k, v := range fixed {
			f[k] = v
		}
		for _, name := range t.dropped {
			delete(f, name)
		}
		fixed = f
	}
	return out, fixed, t, nil
}

// constantOver reports whether v takes one value at the times where y is
// observed (true when none is).
func constantOver(v, y []float64) bool {
	first, seen := 0.0, false
	for i, x := range v {
		if math.IsNaN(y[i]) {
			continue
		}
		if !seen {
			first, seen = x, true
			continue
		}
		if x != first {
			return false
		}
	}
	return true
}

// future returns the h future values of every kept column, for a fit of
// n observations from the fitted series' start.
func (t *timed) future(f *Fitted, h int) ([][]float64, error) {
	cols, err := t.design.Build(f.start, f.freq, f.n, h)
	if err != nil {
		return nil, fmt.Errorf("arima: %w: future calendar regressors: %w", almanac.ErrInvalid, err)
	}
	byName := make(map[string][]float64, len(cols))
	for _, c := range cols {
		byName[c.Name] = c.Values
	}
	out := make([][]float64, len(t.kept))
	for j, name := range t.kept {
		v, ok := byName[name]
		if !ok || len(v) != f.n+h {
			// The design is the one fitted: an effect whose columns
			// change between calls breaks the Effect contract.
			return nil, fmt.Errorf("arima: %w: calendar regressor %q not rebuilt for the forecast", almanac.ErrInvalid, name)
		}
		out[j] = v[f.n:]
	}
	return out, nil
}

// numTimed returns the number of regression columns built from the
// calendar design.
func (f *Fitted) numTimed() int {
	if f.timed == nil {
		return 0
	}
	return len(f.timed.kept)
}

// withTimed appends the future values of the calendar columns to the
// caller's future regressor values.
func (f *Fitted) withTimed(h int, future [][]float64) ([][]float64, error) {
	if f.numTimed() == 0 {
		return future, nil
	}
	fut, err := f.timed.future(f, h)
	if err != nil {
		return nil, err
	}
	return append(append([][]float64(nil), future...), fut...), nil
}

// LeftOut returns the names of the calendar regressors (Spec.Calendar)
// that were left out of the fit because they are constant over the
// fitted window's observed values — an event that does not touch the
// window, a holiday that never falls in it — and so cannot be estimated
// there. Their future values are not used either. nil when none was.
func (f *Fitted) LeftOut() []string { return append([]string(nil), f.timedDropped()...) }

func (f *Fitted) timedDropped() []string {
	if f.timed == nil {
		return nil
	}
	return f.timed.dropped
}

// leftOutString is the note String appends for calendar regressors left
// out of the fit.
func (f *Fitted) leftOutString() string {
	d := f.timedDropped()
	if len(d) == 0 {
		return ""
	}
	return " (not estimable here: " + strings.Join(d, ", ") + ")"
}

// searchTimed is search with the calendar regressors of s.Calendar built
// on y's time axis and appended to s.Regressors; the chosen model keeps
// the design so that it forecasts with their future values.
func (s Search) searchTimed(ctx context.Context, y almanac.Series) (*SearchResult, error) {
	if len(s.Calendar.Effects) == 0 {
		return s.search(ctx, y)
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("arima: search: %w", err)
	}
	given := s
	regs, _, tm, err := expandCalendar(s.Calendar, s.Regressors, nil, y)
	if err != nil {
		return nil, err
	}
	s.Regressors, s.Calendar = regs, calendar.Design{}
	r, err := s.search(ctx, y)
	if err != nil {
		return nil, err
	}
	r.Model.timed = tm
	r.Model.spec.Regressors = given.Regressors
	r.Model.spec.Calendar = given.Calendar
	return r, nil
}
