// Package synth generates invented weekly, daily and hourly series for
// developing and testing the automatic forecaster and the evaluation
// program, where no public catalogue of such series is at hand. Nothing
// here is real data: every series is drawn from a model written below,
// with structure of the kind weekly, daily and hourly business series
// have — a yearly cycle of 365.25 days (so 365.25/7 weeks), weekday and
// hour-of-day profiles, holidays on moving dates, trends, level shifts,
// gaps and low-volume counts — and with lengths from short to long.
//
// The scenarios (all invented): weekly footfall and sales of a fictional
// chain of hardware stores, weekly prices of a fictional commodity
// exchange, weekly spare-part demand of a fictional tool-hire firm;
// daily visits to fictional municipal libraries and pools, daily repair
// tickets of a fictional utility; hourly electricity load at fictional
// substations and hourly trips of a fictional bike-share scheme.
//
// Generate is deterministic: the same Config gives the same series on
// every platform (math/rand/v2's PCG, seeded per series).
package synth

import (
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// Config says how many series of each frequency to draw.
type Config struct {
	Seed                  uint64
	Weekly, Daily, Hourly int
}

// Series is one generated series with its held-out test part.
type Series struct {
	ID    string
	Freq  string // "weekly", "daily" or "hourly"
	Kind  string // the scenario that produced it
	Start time.Time
	Train []float64 // NaN marks a gap
	Test  []float64
}

// Horizons per frequency: a quarter of weeks, two weeks of days, two days
// of hours (the M4 competition's horizons for these frequencies, common
// practice).
const (
	WeeklyH = 13
	DailyH  = 14
	HourlyH = 48
)

// Generate draws the series of cfg: weekly first, then daily, then
// hourly.
func Generate(cfg Config) []Series {
	var out []Series
	for i := range cfg.Weekly {
		out = append(out, Weekly(cfg.Seed, i))
	}
	for i := range cfg.Daily {
		out = append(out, Daily(cfg.Seed, i))
	}
	for i := range cfg.Hourly {
		out = append(out, Hourly(cfg.Seed, i))
	}
	return out
}

func newRand(seed uint64, stream string, i int) *rand.Rand {
	h := uint64(14695981039346656037)
	for _, c := range []byte(stream) {
		h = (h ^ uint64(c)) * 1099511628211
	}
	return rand.New(rand.NewPCG(seed^h, uint64(i)))
}

func uniform(r *rand.Rand, lo, hi float64) float64 { return lo + (hi-lo)*r.Float64() }

// yearAngle is 2π times the fraction of a 365.25-day year elapsed at t,
// counted from 2000-01-01.
func yearAngle(t time.Time) float64 {
	days := t.Sub(time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)).Hours() / 24
	return 2 * math.Pi * days / 365.25
}

// fourierSeason is a smooth yearly cycle with k harmonics whose
// amplitudes fall off as 1/j, scaled so that its largest harmonic has
// amplitude amp.
type fourierSeason struct{ a, b []float64 }

func newFourierSeason(r *rand.Rand, k int, amp float64) fourierSeason {
	s := fourierSeason{a: make([]float64, k), b: make([]float64, k)}
	for j := range k {
		phase := uniform(r, 0, 2*math.Pi)
		m := amp / float64(j+1) * uniform(r, 0.5, 1)
		s.a[j], s.b[j] = m*math.Cos(phase), m*math.Sin(phase)
	}
	return s
}

func (s fourierSeason) at(theta float64) float64 {
	v := 0.0
	for j := range s.a {
		x := float64(j+1) * theta
		v += s.a[j]*math.Cos(x) + s.b[j]*math.Sin(x)
	}
	return v
}

// holidays of the invented region: New Year's Day, Good Friday, Easter
// Monday, a spring holiday on the last Monday of May, a harvest holiday on
// the fourth Thursday of November, Christmas and the day after.
var region = calendar.Calendar{Holidays: []calendar.Holiday{
	{Name: "new year", Rule: calendar.FixedDate{Month: time.January, Day: 1}},
	{Name: "good friday", Rule: calendar.EasterOffset{Days: -2}},
	{Name: "easter monday", Rule: calendar.EasterOffset{Days: 1}},
	{Name: "spring", Rule: calendar.NthWeekday{Month: time.May, Weekday: time.Monday, N: calendar.Last}},
	{Name: "harvest", Rule: calendar.NthWeekday{Month: time.November, Weekday: time.Thursday, N: 4}},
	{Name: "christmas", Rule: calendar.FixedDate{Month: time.December, Day: 25}},
	{Name: "boxing", Rule: calendar.FixedDate{Month: time.December, Day: 26}},
}}

// holidayNames in a fixed order, for per-series effects.
var holidayNames = []string{"new year", "good friday", "easter monday", "spring", "harvest", "christmas", "boxing"}

// holidaysBetween maps each holiday date in [from, to) to its name.
func holidaysBetween(from, to time.Time) map[time.Time]string {
	occ, err := region.Occurrences(from, to)
	if err != nil {
		panic("synth: " + err.Error()) // the region's rules are valid and after 1583
	}
	out := map[time.Time]string{}
	for _, o := range occ {
		out[o.Date] = o.Name
	}
	return out
}

func day0(t time.Time) time.Time {
	return time.Date(t.Year(), t.Month(), t.Day(), 0, 0, 0, 0, time.UTC)
}

// ar1 is a stationary AR(1) noise source.
type ar1 struct {
	phi, sd, x float64
	r          *rand.Rand
}

func newAR1(r *rand.Rand, phi, sd float64) *ar1 {
	a := &ar1{phi: phi, sd: sd, r: r}
	a.x = sd / math.Sqrt(1-phi*phi) * r.NormFloat64()
	return a
}

func (a *ar1) next() float64 {
	a.x = a.phi*a.x + a.sd*a.r.NormFloat64()
	return a.x
}

// poisson draws a Poisson variate (Knuth's product method for small
// means, a rounded normal for large ones: common practice).
func poisson(r *rand.Rand, mean float64) float64 {
	if mean <= 0 {
		return 0
	}
	if mean > 60 {
		return math.Max(0, math.Round(mean+math.Sqrt(mean)*r.NormFloat64()))
	}
	l, k, p := math.Exp(-mean), 0.0, 1.0
	for {
		p *= r.Float64()
		if p <= l {
			return k
		}
		k++
	}
}

// length draws a training length: classes short, medium and long with
// the given probabilities, uniform inside each class.
func length(r *rand.Rand, classes [][3]float64) int {
	u := r.Float64()
	for _, c := range classes {
		if u < c[0] {
			return int(uniform(r, c[1], c[2]+1))
		}
		u -= c[0]
	}
	c := classes[len(classes)-1]
	return int(uniform(r, c[1], c[2]+1))
}

// punch sets gaps in the training part: with probability pRun one run of
// 1 to maxRun missing values, and with probability pSingle a few isolated
// ones, never touching the last two training values.
func punch(r *rand.Rand, y []float64, pRun float64, maxRun int, pSingle float64) {
	n := len(y)
	if n < 10 {
		return
	}
	if r.Float64() < pRun {
		run := 1 + r.IntN(maxRun)
		at := r.IntN(max(n-run-2, 1))
		for k := at; k < at+run && k < n-2; k++ {
			y[k] = math.NaN()
		}
	}
	if r.Float64() < pSingle {
		for range 1 + r.IntN(3) {
			y[r.IntN(n-2)] = math.NaN()
		}
	}
}

func round(v float64, digits int) float64 {
	p := math.Pow(10, float64(digits))
	return math.Round(v*p) / p
}

func split(id, freq, kind string, start time.Time, y []float64, h int) Series {
	n := len(y) - h
	return Series{ID: id, Freq: freq, Kind: kind, Start: start, Train: y[:n:n], Test: y[n:]}
}

// Weekly draws weekly series i: n weeks of training data (26 to 520,
// short ones included) and WeeklyH weeks of test data, of one of four
// invented kinds:
//
//   - "store": footfall of a hardware store, log-additive: a trend, a
//     yearly cycle on the exact 365.25-day year (2 to 5 harmonics), a
//     holiday effect in the weeks holding a holiday (Easter, Christmas
//     and the other moving dates of the region move between weeks from
//     year to year), a level shift in some, AR(1) noise, gaps in some;
//   - "price": a commodity price, a random walk with drift in logs;
//   - "parts": spare-part demand, Poisson counts with a weak yearly
//     cycle, many of them intermittent (mean below 1.5 a week);
//   - "smooth": an aggregate with a steady trend and a small cycle.
func Weekly(seed uint64, i int) Series {
	r := newRand(seed, "weekly", i)
	n := length(r, [][3]float64{{0.06, 26, 51}, {0.24, 52, 110}, {0.40, 150, 270}, {0.30, 300, 520}})
	total := n + WeeklyH
	year := 2004 + r.IntN(10)
	week := 1 + r.IntN(52)
	w1, _ := calendar.ISOWeekStart(year, week, time.UTC)
	times := make([]time.Time, total)
	for k := range times {
		times[k] = w1.AddDate(0, 0, 7*k)
	}
	hol := holidaysBetween(times[0], times[total-1].AddDate(0, 0, 7))
	holidayIn := func(k int) []string {
		var names []string
		for d := range 7 {
			if name, ok := hol[times[k].AddDate(0, 0, d)]; ok {
				names = append(names, name)
			}
		}
		return names
	}
	y := make([]float64, total)
	id := fmt.Sprintf("W%03d", i+1)
	u := r.Float64()
	switch {
	case u < 0.50:
		kind := "store"
		base := math.Exp(uniform(r, math.Log(200), math.Log(20000)))
		slope := uniform(r, -0.08, 0.15) / 52
		season := newFourierSeason(r, 2+r.IntN(4), uniform(r, 0.05, 0.30))
		effect := map[string]float64{}
		for _, h := range holidayNames {
			effect[h] = uniform(r, -0.35, 0.35)
		}
		effect["christmas"] = uniform(r, -0.6, 0.6)
		shiftAt, shift := -1, 0.0
		if r.Float64() < 0.3 {
			shiftAt = int(uniform(r, 0.3, 0.9) * float64(n))
			shift = uniform(r, -0.3, 0.3)
		}
		noise := newAR1(r, uniform(r, 0.2, 0.7), uniform(r, 0.02, 0.08))
		for k := range y {
			v := slope*float64(k) + season.at(yearAngle(times[k])) + noise.next()
			for _, h := range holidayIn(k) {
				v += effect[h]
			}
			if shiftAt >= 0 && k >= shiftAt {
				v += shift
			}
			y[k] = round(base*math.Exp(v), 0)
		}
		punch(r, y[:n], 0.3, 8, 0.15)
		return split(id, "weekly", kind, times[0], y, WeeklyH)
	case u < 0.75:
		x := uniform(r, math.Log(5), math.Log(2000))
		mu := uniform(r, -0.002, 0.004)
		sd := uniform(r, 0.01, 0.05)
		for k := range y {
			x += mu + sd*r.NormFloat64()
			y[k] = round(math.Exp(x), 2)
		}
		punch(r, y[:n], 0.1, 3, 0.05)
		return split(id, "weekly", "price", times[0], y, WeeklyH)
	case u < 0.90:
		rate := math.Exp(uniform(r, math.Log(0.2), math.Log(12)))
		season := newFourierSeason(r, 1+r.IntN(2), uniform(r, 0, 0.3))
		for k := range y {
			v := season.at(yearAngle(times[k]))
			for _, h := range holidayIn(k) {
				if h == "christmas" {
					v -= 0.7
				}
			}
			y[k] = poisson(r, rate*math.Exp(v))
		}
		return split(id, "weekly", "parts", times[0], y, WeeklyH)
	default:
		level := uniform(r, 5000, 50000)
		slope := level * uniform(r, -0.001, 0.004)
		season := newFourierSeason(r, 1+r.IntN(2), level*uniform(r, 0.01, 0.06))
		noise := newAR1(r, uniform(r, 0.5, 0.9), level*uniform(r, 0.005, 0.02))
		for k := range y {
			y[k] = round(level+slope*float64(k)+season.at(yearAngle(times[k]))+noise.next(), 0)
		}
		punch(r, y[:n], 0.2, 4, 0.1)
		return split(id, "weekly", "smooth", times[0], y, WeeklyH)
	}
}

// Daily draws daily series i: 40 to 1500 days of training data and
// DailyH days of test data, of one of three invented kinds:
//
//   - "visits": visits to a library or pool, log-additive: a weekday
//     profile, a yearly cycle on the 365.25-day year, closures or rushes
//     on holidays, a trend, a level shift in some, AR(1) noise, gaps;
//   - "tickets": repair tickets of a utility, Poisson counts with a
//     weekday profile and a yearly cycle, some of them sparse;
//   - "price": a random walk with drift in logs, no cycle.
func Daily(seed uint64, i int) Series {
	r := newRand(seed, "daily", i)
	n := length(r, [][3]float64{{0.08, 40, 100}, {0.22, 120, 360}, {0.40, 370, 800}, {0.30, 900, 1500}})
	total := n + DailyH
	start := time.Date(2008+r.IntN(8), 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, r.IntN(365))
	times := make([]time.Time, total)
	for k := range times {
		times[k] = start.AddDate(0, 0, k)
	}
	hol := holidaysBetween(times[0], times[total-1].AddDate(0, 0, 1))
	weekday := make([]float64, 7)
	y := make([]float64, total)
	id := fmt.Sprintf("D%03d", i+1)
	u := r.Float64()
	switch {
	case u < 0.60:
		for d := range weekday {
			weekday[d] = uniform(r, -0.15, 0.15)
		}
		weekday[time.Sunday] = uniform(r, -1.2, 0.3)
		weekday[time.Saturday] = uniform(r, -0.6, 0.4)
		base := math.Exp(uniform(r, math.Log(30), math.Log(3000)))
		slope := uniform(r, -0.1, 0.2) / 365.25
		season := newFourierSeason(r, 2+r.IntN(3), uniform(r, 0.05, 0.35))
		closed := uniform(r, -1.5, -0.3)
		shiftAt, shift := -1, 0.0
		if r.Float64() < 0.25 {
			shiftAt = int(uniform(r, 0.3, 0.9) * float64(n))
			shift = uniform(r, -0.3, 0.3)
		}
		noise := newAR1(r, uniform(r, 0.1, 0.6), uniform(r, 0.04, 0.12))
		for k, t := range times {
			v := slope*float64(k) + weekday[t.Weekday()] + season.at(yearAngle(t)) + noise.next()
			if _, ok := hol[t]; ok {
				v += closed
			}
			if shiftAt >= 0 && k >= shiftAt {
				v += shift
			}
			y[k] = round(base*math.Exp(v), 0)
		}
		punch(r, y[:n], 0.35, 10, 0.2)
		return split(id, "daily", "visits", start, y, DailyH)
	case u < 0.85:
		for d := range weekday {
			weekday[d] = uniform(r, -0.2, 0.2)
		}
		weekday[time.Sunday] -= uniform(r, 0, 1)
		rate := math.Exp(uniform(r, math.Log(0.3), math.Log(40)))
		season := newFourierSeason(r, 1+r.IntN(2), uniform(r, 0.05, 0.4))
		for k, t := range times {
			v := weekday[t.Weekday()] + season.at(yearAngle(t))
			if _, ok := hol[t]; ok {
				v -= 0.8
			}
			y[k] = poisson(r, rate*math.Exp(v))
		}
		return split(id, "daily", "tickets", start, y, DailyH)
	default:
		x := uniform(r, math.Log(5), math.Log(500))
		mu := uniform(r, -0.0005, 0.001)
		sd := uniform(r, 0.005, 0.025)
		for k := range y {
			x += mu + sd*r.NormFloat64()
			y[k] = round(math.Exp(x), 2)
		}
		return split(id, "daily", "price", start, y, DailyH)
	}
}

// Hourly draws hourly series i: 1 to 10 weeks of training data (short
// ones have fewer than two weeks, so the weekly cycle cannot be
// estimated from them) and HourlyH hours of test data, of two invented
// kinds:
//
//   - "load": electricity load at a substation: a daily profile with a
//     morning and an evening peak, a different profile at weekends and
//     on holidays, a slowly wandering level (weather), AR(1) noise, gaps;
//   - "trips": bike-share trips, Poisson counts with a commuting profile
//     on weekdays and a leisure profile at weekends.
func Hourly(seed uint64, i int) Series {
	r := newRand(seed, "hourly", i)
	n := 24 * length(r, [][3]float64{{0.15, 6, 13}, {0.45, 21, 42}, {0.40, 50, 70}})
	total := n + HourlyH
	start := time.Date(2012+r.IntN(6), 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, r.IntN(365))
	times := make([]time.Time, total)
	for k := range times {
		times[k] = start.Add(time.Duration(k) * time.Hour)
	}
	hol := holidaysBetween(times[0], times[total-1].AddDate(0, 0, 1))
	offDay := func(t time.Time) bool {
		_, h := hol[day0(t)]
		return h || t.Weekday() == time.Saturday || t.Weekday() == time.Sunday
	}
	bump := func(hour, at, width float64) float64 {
		d := math.Mod(hour-at+36, 24) - 12
		return math.Exp(-d * d / (2 * width * width))
	}
	y := make([]float64, total)
	id := fmt.Sprintf("H%03d", i+1)
	if r.Float64() < 0.65 {
		base := uniform(r, 50, 800)
		am, pm := uniform(r, 0.2, 0.5), uniform(r, 0.3, 0.7)
		amAt, pmAt := uniform(r, 7, 10), uniform(r, 17, 20)
		weekendLevel := uniform(r, 0.7, 0.95)
		wander := newAR1(r, 0.995, uniform(r, 0.003, 0.01))
		noise := newAR1(r, uniform(r, 0.3, 0.8), uniform(r, 0.01, 0.04))
		for k, t := range times {
			hr := float64(t.Hour())
			var v float64
			if offDay(t) {
				v = math.Log(weekendLevel) + 0.6*pm*bump(hr, pmAt+1, 3)
			} else {
				v = am*bump(hr, amAt, 1.5) + pm*bump(hr, pmAt, 2)
			}
			v += -0.3*bump(hr, 3.5, 2.5) + wander.next() + noise.next()
			y[k] = round(base*math.Exp(v), 1)
		}
		punch(r, y[:n], 0.35, 12, 0.2)
		return split(id, "hourly", "load", start, y, HourlyH)
	}
	rate := math.Exp(uniform(r, math.Log(0.5), math.Log(60)))
	for k, t := range times {
		hr := float64(t.Hour())
		var v float64
		if offDay(t) {
			v = 1.2*bump(hr, 14, 3) - 1.5
		} else {
			v = 1.4*bump(hr, 8, 1) + 1.2*bump(hr, 17.5, 1.2) - 1.2
		}
		y[k] = poisson(r, rate*math.Exp(v))
	}
	return split(id, "hourly", "trips", start, y, HourlyH)
}

// WriteDir writes ss to dir in the layout of the shared M3 folder: a
// metadata file synth_series.csv (series, frequency, domain, n_train, h,
// start_year, start_period: the ISO week, day of the year or hour of the
// year of the first observation) and one long-format value file per
// frequency, synth_<frequency>.csv (series, category, index, value,
// part), with an empty value cell for a gap.
func WriteDir(dir string, ss []Series) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	meta := [][]string{{"series", "frequency", "domain", "n_train", "h", "start_year", "start_period"}}
	byFreq := map[string][][]string{}
	var order []string
	for _, s := range ss {
		year, period := s.Start.Year(), 0
		switch s.Freq {
		case "weekly":
			year, period = s.Start.ISOWeek()
		case "daily":
			period = s.Start.YearDay()
		case "hourly":
			period = 24*(s.Start.YearDay()-1) + s.Start.Hour() + 1
		}
		meta = append(meta, []string{s.ID, s.Freq, s.Kind, strconv.Itoa(len(s.Train)), strconv.Itoa(len(s.Test)), strconv.Itoa(year), strconv.Itoa(period)})
		if byFreq[s.Freq] == nil {
			order = append(order, s.Freq)
			byFreq[s.Freq] = [][]string{{"series", "category", "index", "value", "part"}}
		}
		for k, v := range append(append([]float64(nil), s.Train...), s.Test...) {
			part := "train"
			if k >= len(s.Train) {
				part = "test"
			}
			cell := ""
			if !math.IsNaN(v) {
				cell = strconv.FormatFloat(v, 'g', -1, 64)
			}
			byFreq[s.Freq] = append(byFreq[s.Freq], []string{s.ID, s.Kind, strconv.Itoa(k + 1), cell, part})
		}
	}
	if err := writeCSV(filepath.Join(dir, "synth_series.csv"), meta); err != nil {
		return err
	}
	for _, f := range order {
		if err := writeCSV(filepath.Join(dir, "synth_"+f+".csv"), byFreq[f]); err != nil {
			return err
		}
	}
	return nil
}

func writeCSV(name string, rows [][]string) error {
	fh, err := os.Create(name)
	if err != nil {
		return err
	}
	w := csv.NewWriter(fh)
	if err := w.WriteAll(rows); err != nil {
		fh.Close()
		return err
	}
	return fh.Close()
}
