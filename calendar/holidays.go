package calendar

import (
	"cmp"
	"fmt"
	"slices"
	"time"
)

// Holiday is a named rule, e.g.
// Holiday{Name: "Lantern Day", Rule: FixedDate{Month: time.March, Day: 3}}.
// Several holidays may share a name (one holiday given by two rules);
// they then form one column in Grid.HolidayColumns.
type Holiday struct {
	Name string
	Rule Rule
}

// Calendar is a region's set of holidays and its weekend. The zero value
// has no holidays and a Saturday–Sunday weekend. A Calendar is a plain
// value; its methods do not modify it and are safe for concurrent use as
// long as nobody modifies the slices.
type Calendar struct {
	// Holidays lists the region's holidays, in any order.
	Holidays []Holiday
	// Weekend lists the non-working days of the week; nil means
	// Saturday and Sunday. A non-nil empty slice means no weekend.
	Weekend []time.Weekday
}

// Occurrence is one holiday on one date (00:00 UTC).
type Occurrence struct {
	Date time.Time
	Name string
}

// Validate returns an error wrapping ErrRule for a holiday without a
// name or rule (a nil pointer to a FixedDate, NthWeekday, EasterOffset or
// Span counts as none), an invalid rule (or ErrSpan for an empty span), or a
// weekend day outside Sunday..Saturday.
func (c Calendar) Validate() error {
	for i, h := range c.Holidays {
		if h.Name == "" {
			return fmt.Errorf("calendar: %w: holiday %d has no name", ErrRule, i)
		}
		if h.Rule == nil || isNilRule(h.Rule) {
			return fmt.Errorf("calendar: %w: holiday %q has no rule", ErrRule, h.Name)
		}
		if err := h.Rule.Validate(); err != nil {
			return fmt.Errorf("holiday %q: %w", h.Name, err)
		}
	}
	for _, w := range c.Weekend {
		if w < time.Sunday || w > time.Saturday {
			return fmt.Errorf("calendar: %w: weekend day %d", ErrRule, int(w))
		}
	}
	return nil
}

// isNilRule reports a nil pointer to one of this package's rules held in
// a non-nil Rule (its value methods would dereference it).
func isNilRule(r Rule) bool {
	switch p := r.(type) {
	case *FixedDate:
		return p == nil
	case *NthWeekday:
		return p == nil
	case *EasterOffset:
		return p == nil
	case *Span:
		return p == nil
	}
	return false
}

// checkYears returns an error wrapping ErrYear when the range starting on
// day lo reaches before 1583 and the calendar has an Easter rule, which
// would otherwise be silently missing there.
func (c Calendar) checkYears(lo int64) error {
	if fromCivil(lo).Year() >= 1583+1 {
		return nil
	}
	for _, h := range c.Holidays {
		switch h.Rule.(type) {
		case EasterOffset, *EasterOffset:
			return fmt.Errorf("calendar: %w: holiday %q follows Gregorian Easter, defined from 1583 on; the range starts %s", ErrYear, h.Name, fromCivil(lo).Format(time.DateOnly))
		}
	}
	return nil
}

// weekendMask returns bit w set for each weekend day w.
func (c Calendar) weekendMask() uint8 {
	if c.Weekend == nil {
		return 1<<time.Saturday | 1<<time.Sunday
	}
	var m uint8
	for _, w := range c.Weekend {
		m |= 1 << w
	}
	return m
}

// Occurrences lists the holidays whose (observed) date falls from the
// calendar date of from through that of to, both included, sorted by
// date and then in the order of c.Holidays. Holidays on the same date are
// all listed.
//
// Special cases: an invalid calendar gives its Validate error; to before
// from gives an error wrapping ErrSpan; a range reaching before 1584 in a
// calendar with an EasterOffset rule gives an error wrapping ErrYear (the
// holiday of the year before is looked at too, for observance shifts).
func (c Calendar) Occurrences(from, to time.Time) ([]Occurrence, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	lo, hi := civilDays(from), civilDays(to)
	if hi < lo {
		return nil, fmt.Errorf("calendar: %w: %s..%s", ErrSpan, from.Format(time.DateOnly), to.Format(time.DateOnly))
	}
	if err := c.checkYears(lo); err != nil {
		return nil, err
	}
	type occ struct {
		Occurrence
		d   int64
		ord int
	}
	var all []occ
	c.each(lo, hi, func(hol int, d int64) {
		all = append(all, occ{Occurrence{fromCivil(d), c.Holidays[hol].Name}, d, hol})
	})
	slices.SortStableFunc(all, func(a, b occ) int {
		if r := cmp.Compare(a.d, b.d); r != 0 {
			return r
		}
		return cmp.Compare(a.ord, b.ord)
	})
	out := make([]Occurrence, len(all))
	for i, o := range all {
		out[i] = o.Occurrence
	}
	return out, nil
}

// IsHoliday reports whether the calendar date of t is a holiday of c
// (false for an invalid calendar, and for Easter holidays before 1583).
func (c Calendar) IsHoliday(t time.Time) bool {
	if c.Validate() != nil {
		return false
	}
	d := civilDays(t)
	found := false
	c.each(d, d, func(int, int64) { found = true })
	return found
}

// each calls fn(holiday index, day) for every occurrence with day in
// lo..hi. Rules are asked for the years around the range so that dates
// moved across a year end are found. c must be valid.
func (c Calendar) each(lo, hi int64, fn func(hol int, d int64)) {
	y0 := fromCivil(lo).Year() - 1
	y1 := fromCivil(hi).Year() + 1
	for i, h := range c.Holidays {
		if s, ok := h.Rule.(Span); ok {
			// Ask a span only for its own days, not year by year.
			a, b := max(lo, civilDays(s.First)), min(hi, civilDays(s.Last))
			for d := a; d <= b; d++ {
				fn(i, d)
			}
			continue
		}
		for y := y0; y <= y1; y++ {
			for _, t := range h.Rule.Dates(y) {
				if d := civilDays(t); d >= lo && d <= hi {
					fn(i, d)
				}
			}
		}
	}
}
