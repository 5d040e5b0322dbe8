package arima

import (
	"errors"
	"fmt"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// storedDesign is the saved form of a calendar.Design: every built-in
// effect and holiday rule by its type name and fields. A user's own
// Effect or Rule type cannot be saved (MarshalModel fails).
type storedDesign struct {
	Stamp   string         `json:"stamp"`
	Effects []storedEffect `json:"effects"`
}

type storedEffect struct {
	Type       string          `json:"type"` // holidays, working days, weekdays, event, cycle
	Name       string          `json:"name,omitempty"`
	PerHoliday bool            `json:"per_holiday,omitempty"`
	Calendar   *storedCalendar `json:"calendar,omitempty"`
	Prefix     string          `json:"prefix,omitempty"`
	Shape      string          `json:"shape,omitempty"`
	From       *time.Time      `json:"from,omitempty"`
	Through    *time.Time      `json:"through,omitempty"`
	Rate       float64         `json:"rate,omitempty"`
	Period     float64         `json:"period,omitempty"`
	Harmonics  int             `json:"harmonics,omitempty"`
}

type storedCalendar struct {
	Holidays []storedHoliday `json:"holidays"`
	Weekend  []int           `json:"weekend"` // null: Saturday and Sunday
}

type storedHoliday struct {
	Name string     `json:"name"`
	Rule storedRule `json:"rule"`
}

type storedRule struct {
	Type     string     `json:"type"` // fixed date, nth weekday, easter, span
	Month    int        `json:"month,omitempty"`
	Day      int        `json:"day,omitempty"`
	Observed int        `json:"observed,omitempty"`
	Weekday  int        `json:"weekday,omitempty"`
	N        int        `json:"n,omitempty"`
	Days     int        `json:"days,omitempty"`
	First    *time.Time `json:"first,omitempty"`
	Last     *time.Time `json:"last,omitempty"`
}

var errUnsavable = errors.New("cannot be saved")

func timePtr(t time.Time) *time.Time {
	if t.IsZero() {
		return nil
	}
	return &t
}

func timeOf(p *time.Time) time.Time {
	if p == nil {
		return time.Time{}
	}
	return *p
}

func storeDesign(d calendar.Design) (*storedDesign, error) {
	if len(d.Effects) == 0 && d.Stamp == calendar.StampStart {
		return nil, nil
	}
	out := &storedDesign{Stamp: d.Stamp.String()}
	for k, e := range d.Effects {
		var s storedEffect
		var err error
		switch e := e.(type) {
		case calendar.HolidayCount:
			s = storedEffect{Type: "holidays", Name: e.Name, PerHoliday: e.PerHoliday}
			s.Calendar, err = storeCalendar(e.Calendar)
		case calendar.WorkingDayCount:
			s = storedEffect{Type: "working days", Name: e.Name}
			s.Calendar, err = storeCalendar(e.Calendar)
		case calendar.WeekdayCounts:
			s = storedEffect{Type: "weekdays", Prefix: e.Prefix}
		case calendar.Event:
			s = storedEffect{Type: "event", Name: e.Name, Shape: e.Shape.String(), From: timePtr(e.From), Through: timePtr(e.Through), Rate: e.Rate}
		case calendar.Cycle:
			s = storedEffect{Type: "cycle", Name: e.Name, Period: e.Period, Harmonics: e.Harmonics}
		default:
			err = fmt.Errorf("arima: %w: %w: calendar effect %d of type %T (only the calendar package's own effects are saved)", almanac.ErrInvalid, errUnsavable, k, e)
		}
		if err != nil {
			return nil, err
		}
		out.Effects = append(out.Effects, s)
	}
	return out, nil
}

func storeCalendar(c calendar.Calendar) (*storedCalendar, error) {
	out := &storedCalendar{Holidays: []storedHoliday{}}
	if c.Weekend != nil {
		out.Weekend = []int{}
		for _, d := range c.Weekend {
			out.Weekend = append(out.Weekend, int(d))
		}
	}
	for _, h := range c.Holidays {
		var r storedRule
		switch rule := h.Rule.(type) {
		case calendar.FixedDate:
			r = storedRule{Type: "fixed date", Month: int(rule.Month), Day: rule.Day, Observed: int(rule.Observed)}
		case calendar.NthWeekday:
			r = storedRule{Type: "nth weekday", Month: int(rule.Month), Weekday: int(rule.Weekday), N: rule.N}
		case calendar.EasterOffset:
			r = storedRule{Type: "easter", Days: rule.Days}
		case calendar.Span:
			r = storedRule{Type: "span", First: timePtr(rule.First), Last: timePtr(rule.Last)}
		default:
			return nil, fmt.Errorf("arima: %w: %w: holiday %q has a rule of type %T (only the calendar package's own rules are saved)", almanac.ErrInvalid, errUnsavable, h.Name, h.Rule)
		}
		out.Holidays = append(out.Holidays, storedHoliday{Name: h.Name, Rule: r})
	}
	return out, nil
}

func loadDesign(s *storedDesign) (calendar.Design, error) {
	var d calendar.Design
	if s == nil {
		return d, nil
	}
	switch s.Stamp {
	case calendar.StampStart.String():
	case calendar.StampEnd.String():
		d.Stamp = calendar.StampEnd
	default:
		return d, fmt.Errorf("calendar stamp %q", s.Stamp)
	}
	for k, e := range s.Effects {
		var eff calendar.Effect
		switch e.Type {
		case "holidays", "working days":
			c, err := loadCalendar(e.Calendar)
			if err != nil {
				return d, fmt.Errorf("calendar effect %d: %w", k, err)
			}
			if e.Type == "holidays" {
				eff = calendar.HolidayCount{Calendar: c, Name: e.Name, PerHoliday: e.PerHoliday}
			} else {
				eff = calendar.WorkingDayCount{Calendar: c, Name: e.Name}
			}
		case "weekdays":
			eff = calendar.WeekdayCounts{Prefix: e.Prefix}
		case "event":
			shape := calendar.Shape(-1)
			for sh := calendar.Pulse; sh <= calendar.Decay; sh++ {
				if sh.String() == e.Shape {
					shape = sh
				}
			}
			ev := calendar.Event{Name: e.Name, Shape: shape, From: timeOf(e.From), Through: timeOf(e.Through), Rate: e.Rate}
			if err := ev.Validate(); err != nil {
				return d, fmt.Errorf("calendar effect %d: %w", k, err)
			}
			eff = ev
		case "cycle":
			eff = calendar.Cycle{Period: e.Period, Harmonics: e.Harmonics, Name: e.Name}
		default:
			return d, fmt.Errorf("calendar effect %d: unknown type %q", k, e.Type)
		}
		d.Effects = append(d.Effects, eff)
	}
	return d, nil
}

func loadCalendar(s *storedCalendar) (calendar.Calendar, error) {
	var c calendar.Calendar
	if s == nil {
		return c, errors.New("no calendar")
	}
	if s.Weekend != nil {
		c.Weekend = []time.Weekday{}
		for _, d := range s.Weekend {
			if d < 0 || d > 6 {
				return c, fmt.Errorf("weekend day %d", d)
			}
			c.Weekend = append(c.Weekend, time.Weekday(d))
		}
	}
	for _, h := range s.Holidays {
		var r calendar.Rule
		switch h.Rule.Type {
		case "fixed date":
			r = calendar.FixedDate{Month: time.Month(h.Rule.Month), Day: h.Rule.Day, Observed: calendar.Observance(h.Rule.Observed)}
		case "nth weekday":
			r = calendar.NthWeekday{Month: time.Month(h.Rule.Month), Weekday: time.Weekday(h.Rule.Weekday), N: h.Rule.N}
		case "easter":
			r = calendar.EasterOffset{Days: h.Rule.Days}
		case "span":
			if h.Rule.First == nil || h.Rule.Last == nil {
				return c, fmt.Errorf("holiday %q: a span needs first and last", h.Name)
			}
			r = calendar.Span{First: *h.Rule.First, Last: *h.Rule.Last}
		default:
			return c, fmt.Errorf("holiday %q: unknown rule type %q", h.Name, h.Rule.Type)
		}
		if err := r.Validate(); err != nil {
			return c, fmt.Errorf("holiday %q: %w", h.Name, err)
		}
		c.Holidays = append(c.Holidays, calendar.Holiday{Name: h.Name, Rule: r})
	}
	return c, nil
}
