package calendar

import (
	"fmt"
	"math"
	"time"
)

// Effect is a regressor given as a rule on the time axis rather than as
// values: Columns builds its named columns for any Grid (history and
// future alike), so a model that holds Effects can make its own
// regressor values for whatever window it is fitted on and for any
// forecast horizon.
//
// Columns must return columns of g.Len() values each, all finite, and
// must not fail because a date of the effect lies outside g: an event
// that does not touch the grid gives zeros there. HolidayCount,
// WorkingDayCount, WeekdayCounts, Event and Cycle implement Effect; a
// user's own type (a promotion calendar, say) takes part by implementing
// it. Implementations must be safe for concurrent use.
type Effect interface {
	Columns(g Grid) ([]Column, error)
}

var (
	_ Effect = HolidayCount{}
	_ Effect = WorkingDayCount{}
	_ Effect = WeekdayCounts{}
	_ Effect = Event{}
	_ Effect = Cycle{}
)

// Design is the set of time-driven regressors of a model: its Effects,
// and where in its period each observation's time lies (Stamp, as in
// Grid). The zero value has no effects. A Design is plain data, safe to
// share.
type Design struct {
	Effects []Effect
	// Stamp says whether each observation's time starts (zero value) or
	// ends its period; it sets the Stamp of the grids the effects are
	// built on.
	Stamp Stamp
}

// Build returns the columns of every effect on the grid of n
// observations from start at freq followed by h future periods, in the
// order of Effects.
//
// Special cases: an invalid grid gives its Validate error; a nil effect,
// a column with an empty or repeated name, a length other than n + h or
// a non-finite value gives an error wrapping ErrColumn; an effect's own
// error is returned wrapped with its position.
func (d Design) Build(start time.Time, freq Frequency, n, h int) ([]Column, error) {
	g := Grid{Start: start, Freq: freq, N: n, H: h, Stamp: d.Stamp}
	if err := g.Validate(); err != nil {
		return nil, err
	}
	var out []Column
	seen := map[string]bool{}
	for k, e := range d.Effects {
		if e == nil {
			return nil, fmt.Errorf("calendar: %w: effect %d is nil", ErrColumn, k)
		}
		cols, err := e.Columns(g)
		if err != nil {
			return nil, fmt.Errorf("calendar: effect %d (%T): %w", k, e, err)
		}
		for _, c := range cols {
			if c.Name == "" {
				return nil, fmt.Errorf("calendar: %w: effect %d (%T) gives a column without a name", ErrColumn, k, e)
			}
			if seen[c.Name] {
				return nil, fmt.Errorf("calendar: %w: column name %q repeated (effect %d)", ErrColumn, c.Name, k)
			}
			seen[c.Name] = true
			if len(c.Values) != g.Len() {
				return nil, fmt.Errorf("calendar: %w: %q has %d values, the grid %d", ErrColumn, c.Name, len(c.Values), g.Len())
			}
			for i, v := range c.Values {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					return nil, fmt.Errorf("calendar: %w: %q value %d is %v", ErrColumn, c.Name, i, v)
				}
			}
			out = append(out, c)
		}
	}
	return out, nil
}

// HolidayCount is the number of holiday days of Calendar per period
// (Grid.Holidays), one column named Name ("holidays" when empty); with
// PerHoliday, one column per holiday name instead (Grid.HolidayColumns,
// named after the holidays).
type HolidayCount struct {
	Calendar   Calendar
	Name       string
	PerHoliday bool
}

// Columns implements Effect.
func (e HolidayCount) Columns(g Grid) ([]Column, error) {
	if e.PerHoliday {
		return g.HolidayColumns(e.Calendar)
	}
	v, err := g.Holidays(e.Calendar)
	if err != nil {
		return nil, err
	}
	return []Column{{Name: orDefault(e.Name, "holidays"), Values: orEmpty(v)}}, nil
}

// WorkingDayCount is the number of days per period that are neither
// weekend nor holiday of Calendar (Grid.WorkingDays), one column named
// Name ("working days" when empty).
type WorkingDayCount struct {
	Calendar Calendar
	Name     string
}

// Columns implements Effect.
func (e WorkingDayCount) Columns(g Grid) ([]Column, error) {
	v, err := g.WorkingDays(e.Calendar)
	if err != nil {
		return nil, err
	}
	return []Column{{Name: orDefault(e.Name, "working days"), Values: orEmpty(v)}}, nil
}

// WeekdayCounts is the number of Mondays, …, Saturdays per period
// (Grid.Weekdays without Sunday, the baseline: the seven counts add up
// to the period's length, so all seven beside a mean would be
// collinear). Columns are named "Monday" … "Saturday", after Prefix and
// a space when Prefix is set.
type WeekdayCounts struct {
	Prefix string
}

// Columns implements Effect.
func (e WeekdayCounts) Columns(g Grid) ([]Column, error) {
	cols, err := g.Weekdays()
	if err != nil {
		return nil, err
	}
	cols = cols[:6]
	if e.Prefix != "" {
		for k := range cols {
			cols[k].Name = e.Prefix + " " + cols[k].Name
		}
	}
	return cols, nil
}

// Shape is the time profile of an Event. Programs should not rely on
// the numeric values.
type Shape int

const (
	// Pulse (the zero value): 1 in the period containing From, 0
	// elsewhere — a one-off event, or an additive outlier.
	Pulse Shape = iota
	// Step: 0 before the period containing From, 1 from it on — a
	// permanent level shift.
	Step
	// Shift: 1 from the period containing From through the period
	// containing Through, 0 elsewhere — a temporary level shift such as a
	// shutdown or a reclassification that later reverts.
	Shift
	// Ramp: 0 up to the period k0 containing From, then i − k0 in period
	// i, held at k1 − k0 from the period k1 containing Through on (no cap
	// when Through is zero). The coefficient is the change per period.
	Ramp
	// Decay: 0 before the period k containing From, Rate^(i−k) from it
	// on — a change that dies away geometrically (a temporary change).
	Decay
)

var shapeNames = [...]string{"pulse", "step", "shift", "ramp", "decay"}

// String returns "pulse", "step", "shift", "ramp" or "decay", or
// "Shape(n)" for an unknown value.
func (s Shape) String() string {
	if s >= 0 && int(s) < len(shapeNames) {
		return shapeNames[s]
	}
	return fmt.Sprintf("Shape(%d)", int(s))
}

// DefaultDecayRate is the rate of a Decay event whose Rate is zero: 0.7,
// the value used for temporary changes by Chen and Liu (1993, JASA
// 88:284–297; recalled from memory).
const DefaultDecayRate = 0.7

// Event is a one-off happening as a regressor of one column named Name,
// with the time profile Shape starting in the period that contains From
// (see Shape). Unlike the Grid methods, an Event may lie partly or
// wholly outside the grid: the column then holds the part of the profile
// that falls inside (zeros when none does; a Decay or Ramp that started
// before the grid continues from where it would be).
type Event struct {
	Name    string
	Shape   Shape
	From    time.Time
	Through time.Time // last day of a Shift (required), cap of a Ramp (optional)
	Rate    float64   // decay per period of a Decay, in (0, 1); 0 means DefaultDecayRate
}

// Validate reports an event that can never be built: no name, an unknown
// shape (ErrColumn), a Shift without Through or a Through before From
// (ErrSpan), a Decay rate outside (0, 1) (ErrRate).
func (e Event) Validate() error {
	if e.Name == "" {
		return fmt.Errorf("calendar: %w: event without a name", ErrColumn)
	}
	switch e.Shape {
	case Pulse, Step:
	case Shift:
		if e.Through.IsZero() {
			return fmt.Errorf("calendar: %w: shift %q has no Through date", ErrSpan, e.Name)
		}
	case Ramp:
	case Decay:
		if r := e.Rate; r != 0 && !(r > 0 && r < 1) {
			return fmt.Errorf("calendar: %w: event %q rate %v (need 0 < rate < 1)", ErrRate, e.Name, r)
		}
	default:
		return fmt.Errorf("calendar: %w: event %q has unknown shape %v", ErrColumn, e.Name, e.Shape)
	}
	if !e.Through.IsZero() && civilDays(e.Through) < civilDays(e.From) {
		return fmt.Errorf("calendar: %w: event %q ends %v before it starts %v", ErrSpan, e.Name, e.Through, e.From)
	}
	return nil
}

// Columns implements Effect.
func (e Event) Columns(g Grid) ([]Column, error) {
	if err := e.Validate(); err != nil {
		return nil, err
	}
	if err := g.Validate(); err != nil {
		return nil, err
	}
	out := make([]float64, g.Len())
	k0 := g.periodOf(e.From)
	k1 := math.MaxInt
	if !e.Through.IsZero() {
		k1 = g.periodOf(e.Through)
	}
	for i := range out {
		switch e.Shape {
		case Pulse:
			if i == k0 {
				out[i] = 1
			}
		case Step:
			if i >= k0 {
				out[i] = 1
			}
		case Shift:
			if i >= k0 && i <= k1 {
				out[i] = 1
			}
		case Ramp:
			if i > k0 {
				out[i] = float64(min(i, k1) - k0)
			}
		}
	}
	if e.Shape == Decay && k0 < len(out) {
		r := e.Rate
		if r == 0 {
			r = DefaultDecayRate
		}
		// Repeated multiplication, as Grid.Decay, from r^(−k0) when the
		// change began before the grid.
		v, i := 1.0, k0
		if k0 < 0 {
			v, i = math.Pow(r, float64(-k0)), 0
		}
		for ; i < len(out); i++ {
			out[i] = v
			v *= r
		}
	}
	return []Column{{Name: e.Name, Values: out}}, nil
}

// periodOf returns the index of the period of g that contains t (see
// Grid), extended beyond the grid on both sides: negative before Start,
// Len() or more after the last period.
func (g Grid) periodOf(t time.Time) int {
	switch g.Freq.Unit {
	case Minute, Hour:
		step := int64(g.Freq.duration() / time.Second)
		// Seconds on the wall clock, from civil days, so that far dates
		// do not saturate time.Duration.
		sec := func(u time.Time) int64 {
			hh, mm, ss := u.Clock()
			return civilDays(u)*86400 + int64(hh*3600+mm*60+ss)
		}
		d := sec(t) - sec(g.Start)
		if g.Stamp == StampEnd {
			d += step - 1
		}
		return int(floorDiv64(d, step))
	case Day, Week:
		step := int64(g.Freq.mult())
		if g.Freq.Unit == Week {
			step *= 7
		}
		b0 := civilDays(g.Start)
		if g.Stamp == StampEnd {
			b0 += 1 - step
		}
		return int(floorDiv64(civilDays(t)-b0, step))
	}
	// Calendar units: estimate from the months between, then adjust so
	// that bound(k) ≤ day < bound(k+1).
	bound := func(i int) int64 {
		if g.Stamp == StampEnd {
			return civilDays(g.Time(i-1)) + 1
		}
		return civilDays(g.Time(i))
	}
	ys, ms, _ := g.Start.Date()
	yt, mt, _ := t.Date()
	k := floorDiv((yt-ys)*12+int(mt)-int(ms), g.Freq.months())
	d := civilDays(t)
	for bound(k) > d {
		k--
	}
	for bound(k+1) <= d {
		k++
	}
	return k
}

func floorDiv64(a, b int64) int64 {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

// Cycle is a smooth periodic pattern of Period observations (any real
// number above 2, e.g. 365.25/7 for the year in weekly data), given by
// Harmonics pairs of Fourier terms anchored to absolute time rather than
// to the start of a series: the phase is measured from Monday 3 January
// 2000, 00:00 (CycleOrigin) in units of the grid's frequency, so any
// window of a series — a backtest origin, a later refit — gets the same
// season. The columns are "Name sin1", "Name cos1", …, "Name cosK"
// (Name "cycle <period>" when empty, e.g. "cycle 52.18"); when 2·Harmonics
// equals an integer Period the last sine is zero everywhere and is left
// out. For monthly and longer frequencies the phase is counted in whole
// months from January 2000.
type Cycle struct {
	Period    float64
	Harmonics int
	Name      string
}

// CycleOrigin is the time from which a Cycle's phase is counted.
var CycleOrigin = time.Date(2000, time.January, 3, 0, 0, 0, 0, time.UTC)

// CycleName returns the default column prefix of a Cycle of the given
// period, "cycle 52.18" for 365.25/7.
func CycleName(period float64) string { return fmt.Sprintf("cycle %.4g", period) }

// Columns implements Effect.
//
// Special cases: Period ≤ 2 or not finite, Harmonics < 1 or 2·Harmonics
// > Period give an error wrapping ErrFourier.
func (e Cycle) Columns(g Grid) ([]Column, error) {
	if err := g.Validate(); err != nil {
		return nil, err
	}
	p, k := e.Period, e.Harmonics
	if !(p > 2) || math.IsInf(p, 0) || k < 1 || float64(2*k) > p {
		return nil, fmt.Errorf("calendar: %w: cycle of period %v with %d harmonics (need period > 2, 1 ≤ harmonics ≤ period/2)", ErrFourier, p, k)
	}
	name := orDefault(e.Name, CycleName(p))
	dropLast := float64(2*k) == p
	var cols []Column
	for j := 1; j <= k; j++ {
		if !(dropLast && j == k) {
			cols = append(cols, Column{Name: fmt.Sprintf("%s sin%d", name, j), Values: make([]float64, g.Len())})
		}
		cols = append(cols, Column{Name: fmt.Sprintf("%s cos%d", name, j), Values: make([]float64, g.Len())})
	}
	whole, frac := g.phaseOrigin()
	pi := int64(math.Round(p))
	for i := range g.Len() {
		for j := 1; j <= k; j++ {
			// The angle 2π j t / p with t = whole + frac + i, reduced to
			// one cycle before the float arithmetic so that times far
			// from the origin keep full precision: j·(whole + i) is
			// reduced modulo p exactly when p is an integer.
			var x float64
			if float64(pi) == p {
				m := (int64(j) * ((whole + int64(i)) % pi)) % pi
				x = math.Mod(float64(m)+float64(j)*frac, p)
			} else {
				x = math.Mod(math.Mod(float64(j)*float64(whole+int64(i)), p)+float64(j)*frac, p)
			}
			s, c := math.Sincos(2 * math.Pi * x / p)
			if dropLast && j == k {
				cols[2*j-2].Values[i] = c
				continue
			}
			cols[2*j-2].Values[i] = s
			cols[2*j-1].Values[i] = c
		}
	}
	return cols, nil
}

// phaseOrigin returns the position of g's first period from CycleOrigin
// in units of g's frequency, as a whole part and a fraction in [0, 1).
func (g Grid) phaseOrigin() (int64, float64) {
	switch g.Freq.Unit {
	case Minute, Hour, Day, Week:
		step := int64(g.Freq.duration() / time.Second)
		hh, mm, ss := g.Start.Clock()
		d := (civilDays(g.Start)-civilDays(CycleOrigin))*86400 + int64(hh*3600+mm*60+ss)
		w := floorDiv64(d, step)
		return w, float64(d-w*step) / float64(step)
	}
	y, m, _ := g.Start.Date()
	months := int64((y-2000)*12 + int(m) - 1)
	per := int64(g.Freq.months())
	w := floorDiv64(months, per)
	return w, float64(months-w*per) / float64(per)
}

func orDefault(s, def string) string {
	if s == "" {
		return def
	}
	return s
}

// orEmpty turns the nil of an empty grid into an empty column.
func orEmpty(v []float64) []float64 {
	if v == nil {
		return []float64{}
	}
	return v
}
