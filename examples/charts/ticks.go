package charts

import (
	"math"
	"strconv"
	"time"

	"github.com/almanac-go/almanac/calendar"
	"gonum.org/v1/plot"
)

// timeTicker marks a time axis (values in Unix seconds) at the turn of
// each hour, day, month, quarter or year: the finest unit coarser than
// the data's frequency that gives at most eight marks, or every k-th
// year (k = 1, 2, 5, 10, ...) when even years are too many.
type timeTicker struct {
	freq calendar.Frequency
	loc  *time.Location
}

// maxTicks is the most labelled marks on an axis.
const maxTicks = 8

// turn is a calendar unit at whose turns the axis may be marked.
type turn struct {
	rank   int // coarseness, comparable with the frequency's
	floor  func(t time.Time) time.Time
	next   func(t time.Time) time.Time
	layout string
}

var turns = []turn{
	{1, func(t time.Time) time.Time { return t.Truncate(time.Hour) }, func(t time.Time) time.Time { return t.Add(time.Hour) }, "15:04"},
	{2, func(t time.Time) time.Time { return time.Date(t.Year(), t.Month(), t.Day(), 0, 0, 0, 0, t.Location()) }, func(t time.Time) time.Time { return t.AddDate(0, 0, 1) }, "2 Jan"},
	{3, func(t time.Time) time.Time { return time.Date(t.Year(), t.Month(), 1, 0, 0, 0, 0, t.Location()) }, func(t time.Time) time.Time { return t.AddDate(0, 1, 0) }, "Jan 2006"},
	{4, func(t time.Time) time.Time {
		return time.Date(t.Year(), t.Month()-(t.Month()-1)%3, 1, 0, 0, 0, 0, t.Location())
	}, func(t time.Time) time.Time { return t.AddDate(0, 3, 0) }, "Jan 2006"},
}

// unitRank is the coarseness of a frequency's unit.
func unitRank(u calendar.Unit) int {
	switch u {
	case calendar.Minute:
		return 0
	case calendar.Hour:
		return 1
	case calendar.Day, calendar.Week:
		return 2
	case calendar.Month:
		return 3
	}
	return 4 // quarters and years: marked at years
}

// Ticks returns the marks between min and max.
func (tt timeTicker) Ticks(min, max float64) []plot.Tick {
	if math.IsNaN(min) || math.IsNaN(max) || max < min || math.Abs(min) > 1e15 || math.Abs(max) > 1e15 {
		return nil
	}
	loc := tt.loc
	if loc == nil {
		loc = time.UTC
	}
	lo := time.Unix(int64(math.Ceil(min)), 0).In(loc)
	hi := time.Unix(int64(math.Floor(max)), 0).In(loc)
	rank := unitRank(tt.freq.Unit)
	for _, u := range turns {
		if u.rank <= rank {
			continue
		}
		var ticks []plot.Tick
		for t := u.floor(lo); !t.After(hi); t = u.next(t) {
			if t.Before(lo) {
				continue
			}
			ticks = append(ticks, plot.Tick{Value: float64(t.Unix()), Label: t.Format(u.layout)})
			if len(ticks) > maxTicks {
				break
			}
		}
		if len(ticks) <= maxTicks && len(ticks) >= 2 {
			return ticks
		}
	}
	// Years, every k-th.
	span := hi.Year() - lo.Year() + 1
	k := yearStep(span)
	var ticks []plot.Tick
	first := lo.Year()
	if r := first % k; r != 0 {
		first += k - r
	}
	for y := first; y <= hi.Year(); y += k {
		t := time.Date(y, 1, 1, 0, 0, 0, 0, loc)
		if t.Before(lo) {
			continue
		}
		ticks = append(ticks, plot.Tick{Value: float64(t.Unix()), Label: strconv.Itoa(y)})
	}
	if len(ticks) < 2 { // a short axis: mark its ends
		layout := "2 Jan 2006"
		switch tt.freq.Unit {
		case calendar.Minute, calendar.Hour:
			layout = "2 Jan 15:04"
		case calendar.Month, calendar.Quarter:
			layout = "Jan 2006"
		case calendar.Year:
			layout = "2006"
		}
		ticks = []plot.Tick{{Value: float64(lo.Unix()), Label: lo.Format(layout)}}
		if hi.After(lo) {
			ticks = append(ticks, plot.Tick{Value: float64(hi.Unix()), Label: hi.Format(layout)})
		}
	}
	return ticks
}

// blankTicker keeps another ticker's marks but not their labels, for the
// upper panels of a stack that share the bottom one's labels.
type blankTicker struct{ plot.Ticker }

// Ticks returns the marks with empty labels (drawn as minor marks).
func (b blankTicker) Ticks(min, max float64) []plot.Tick {
	ts := b.Ticker.Ticks(min, max)
	for i := range ts {
		ts[i].Label = ""
	}
	return ts
}

// stepTicker marks the steps ahead 1..n, every k-th when there are many.
type stepTicker struct{ n int }

// Ticks returns the marks between min and max.
func (s stepTicker) Ticks(min, max float64) []plot.Tick {
	k := 1
	for s.n/k > 12 {
		k++
	}
	var ts []plot.Tick
	for h := 1; h <= s.n; h++ {
		if float64(h) < min || float64(h) > max {
			continue
		}
		label := ""
		if h == 1 || h%k == 0 {
			label = strconv.Itoa(h)
		}
		ts = append(ts, plot.Tick{Value: float64(h), Label: label})
	}
	return ts
}

// yearStep is the smallest of 1, 2, 5, 10, 20, 50, ... years that marks
// a span of years at most maxTicks times.
func yearStep(span int) int {
	for p := 1; ; p *= 10 {
		for _, m := range []int{1, 2, 5} {
			if span/(m*p) < maxTicks {
				return m * p
			}
		}
	}
}

// numTicker marks a value axis where the plotting package's default
// ticker does, with labels that carry only the decimals their spacing
// needs (no "475.00"), in exponent form when very large or small.
type numTicker struct{}

// Ticks returns the marks between min and max.
func (numTicker) Ticks(min, max float64) []plot.Tick {
	if !(max > min) || math.IsInf(max-min, 0) {
		return nil
	}
	ts := plot.DefaultTicks{}.Ticks(min, max)
	var major []int
	for i, t := range ts {
		if t.Label != "" {
			major = append(major, i)
		}
	}
	step, big := math.Inf(1), 0.0
	for k, i := range major {
		big = math.Max(big, math.Abs(ts[i].Value))
		if k > 0 {
			step = math.Min(step, ts[i].Value-ts[major[k-1]].Value)
		}
	}
	dec := 0
	if step > 0 && step < 1 {
		dec = int(math.Ceil(-math.Log10(step) - 1e-9))
	}
	for _, i := range major {
		v := ts[i].Value
		switch {
		case big >= 1e7 || (big > 0 && big < 1e-3) || dec > 6:
			ts[i].Label = strconv.FormatFloat(v, 'g', 3, 64)
		default:
			ts[i].Label = strconv.FormatFloat(v, 'f', dec, 64)
		}
		if ts[i].Label == "-0" {
			ts[i].Label = "0"
		}
	}
	return ts
}
