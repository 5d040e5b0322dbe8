package accuracy

import (
	"html"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// The chart of one series on the review page, written by hand as SVG: the
// history (a line broken at missing values), the one-step fit (dashed),
// the forecast with its bands (widest lightest), filled values as rings,
// and a thin line where the forecast begins.

// Chart geometry, in SVG user units (CSS pixels at full size).
const (
	chartW, chartH = 960, 300
	plotL, plotR   = 70, 946 // plot area, left and right
	plotT, plotB   = 34, 268 // plot area, top and bottom
)

// chartInput is what one chart draws, already validated.
type chartInput struct {
	title   string
	y       almanac.Series // history, NaN = missing
	fitted  []float64      // nil or len(y)
	shown   int            // observations of history drawn (the latest)
	fc      *almanac.Forecast
	off     int // index of the forecast's first step on the history's axis
	bands   []band
	repairs []int     // history indices of filled values
	filled  []float64 // their values
}

// yRange is the span of the values drawn.
type yRange struct{ lo, hi float64 }

func (r *yRange) add(vs ...float64) {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		r.lo, r.hi = math.Min(r.lo, v), math.Max(r.hi, v)
	}
}

// svgNum formats a coordinate with one decimal.
func svgNum(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }

// drawChart returns the chart as an SVG element.
func drawChart(in chartInput) string {
	n := in.y.Len()
	first := max(0, n-in.shown)
	last := n - 1 // last index on the axis
	if in.fc != nil {
		last = max(last, in.off+len(in.fc.Mean)-1)
	}
	var sb strings.Builder
	sb.WriteString(`<svg class="chart" xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ` + strconv.Itoa(chartW) + " " + strconv.Itoa(chartH) + `" width="` + strconv.Itoa(chartW) + `" height="` + strconv.Itoa(chartH) + `" role="img" aria-label="` + html.EscapeString(in.title) + `">`)
	sb.WriteString("<title>" + html.EscapeString(in.title) + "</title>")
	if n == 0 || first > last {
		sb.WriteString(`<text class="empty" x="` + strconv.Itoa(chartW/2) + `" y="` + strconv.Itoa(chartH/2) + `" text-anchor="middle">no data to draw</text></svg>`)
		return sb.String()
	}

	rg := yRange{lo: math.Inf(1), hi: math.Inf(-1)}
	rg.add(in.y.Values[first:]...)
	if in.fitted != nil {
		rg.add(in.fitted[first:]...)
	}
	if in.fc != nil {
		rg.add(in.fc.Mean...)
		for _, b := range in.bands {
			rg.add(b.lower...)
			rg.add(b.upper...)
		}
	}
	for k, i := range in.repairs {
		if i >= first {
			rg.add(in.filled[k])
		}
	}
	if math.IsInf(rg.lo, 0) { // nothing observed in the window
		sb.WriteString(`<text class="empty" x="` + strconv.Itoa(chartW/2) + `" y="` + strconv.Itoa(chartH/2) + `" text-anchor="middle">no observed values to draw</text></svg>`)
		return sb.String()
	}
	ticks, lo, hi := niceTicks(rg.lo, rg.hi)

	// Positions. Halves keep the spans finite near the float64 limit.
	xspan := float64(last - first)
	px := func(i int) float64 {
		if xspan == 0 {
			return (plotL + plotR) / 2
		}
		return plotL + float64(i-first)/xspan*(plotR-plotL)
	}
	yspan := hi/2 - lo/2
	py := func(v float64) float64 {
		return plotB - (v/2-lo/2)/yspan*(plotB-plotT)
	}

	// Grid and axes.
	sb.WriteString(`<g class="grid">`)
	labels := tickLabels(ticks)
	for k, t := range ticks {
		y := svgNum(py(t))
		sb.WriteString(`<line x1="` + strconv.Itoa(plotL) + `" x2="` + strconv.Itoa(plotR) + `" y1="` + y + `" y2="` + y + `"/>`)
		sb.WriteString(`<text class="ylab" x="` + strconv.Itoa(plotL-6) + `" y="` + y + `" text-anchor="end" dominant-baseline="middle">` + labels[k] + `</text>`)
	}
	freq := in.y.Freq
	for _, tk := range timeTicks(in.y.Start, freq, first, last) {
		x := svgNum(px(tk.i))
		sb.WriteString(`<line class="xt" x1="` + x + `" x2="` + x + `" y1="` + strconv.Itoa(plotB) + `" y2="` + strconv.Itoa(plotB+4) + `"/>`)
		sb.WriteString(`<text class="xlab" x="` + x + `" y="` + strconv.Itoa(plotB+17) + `" text-anchor="middle">` + html.EscapeString(tk.label) + `</text>`)
	}
	sb.WriteString(`<line class="axis" x1="` + strconv.Itoa(plotL) + `" x2="` + strconv.Itoa(plotR) + `" y1="` + strconv.Itoa(plotB) + `" y2="` + strconv.Itoa(plotB) + `"/>`)
	sb.WriteString(`</g>`)

	// Bands, widest first, each in its own opaque tint (b0 the
	// narrowest and darkest), so every region shows the colour of the
	// narrowest band holding it.
	var bandItems []legendItem
	if in.fc != nil {
		for k, b := range in.bands {
			cls := "band b" + strconv.Itoa(min(len(in.bands)-1-k, 3))
			if len(b.lower) == 1 {
				x := px(in.off)
				sb.WriteString(`<rect class="` + cls + `" x="` + svgNum(x-4) + `" width="8" y="` + svgNum(py(b.upper[0])) + `" height="` + svgNum(math.Max(py(b.lower[0])-py(b.upper[0]), 0.5)) + `"/>`)
			} else {
				sb.WriteString(`<polygon class="` + cls + `" points="`)
				for h, v := range b.upper {
					sb.WriteString(svgNum(px(in.off+h)) + "," + svgNum(py(v)) + " ")
				}
				for h := len(b.lower) - 1; h >= 0; h-- {
					sb.WriteString(svgNum(px(in.off+h)) + "," + svgNum(py(b.lower[h])))
					if h > 0 {
						sb.WriteByte(' ')
					}
				}
				sb.WriteString(`"/>`)
			}
			// Listed narrowest first, as read from the line outwards.
			bandItems = append([]legendItem{{cls, pct(b.level) + " band"}}, bandItems...)
		}
		x := svgNum(px(in.off))
		sb.WriteString(`<line class="origin" x1="` + x + `" x2="` + x + `" y1="` + strconv.Itoa(plotT) + `" y2="` + strconv.Itoa(plotB) + `"/>`)
	}
	legend := []legendItem{{"hist", "history"}}
	// History, broken at missing values.
	writeLine(&sb, "hist", in.y.Values, first, 0, px, py)
	if in.fitted != nil {
		writeLine(&sb, "fit", in.fitted, first, 0, px, py)
		legend = append(legend, legendItem{"fit", "one-step fit"})
	}
	if in.fc != nil {
		mean := in.fc.Mean
		start := in.off
		// Join the forecast to the last observation when it follows it.
		if in.off == n && !math.IsNaN(in.y.Values[n-1]) {
			mean = append([]float64{in.y.Values[n-1]}, mean...)
			start = n - 1
		}
		writeLine(&sb, "fc", mean, 0, start, px, py)
		legend = append(legend, legendItem{"fc", "forecast"})
	}
	legend = append(legend, bandItems...)
	drawn := false
	for k, i := range in.repairs {
		if i < first {
			continue
		}
		drawn = true
		sb.WriteString(`<circle class="filled" cx="` + svgNum(px(i)) + `" cy="` + svgNum(py(in.filled[k])) + `" r="4"><title>filled: ` + html.EscapeString(in.y.Time(i).Format(time.DateOnly)) + ` ` + formatValue(in.filled[k]) + `</title></circle>`)
	}
	if drawn {
		legend = append(legend, legendItem{"filled", "filled value"})
	}
	writeLegend(&sb, legend)
	sb.WriteString("</svg>")
	return sb.String()
}

// writeLine writes vs[from:] as polylines of the given class, vs[k] at
// axis index base+k, broken where a value is NaN. A lone value between
// gaps is a dot.
func writeLine(sb *strings.Builder, cls string, vs []float64, from, base int, px func(int) float64, py func(float64) float64) {
	var seg []int
	flush := func() {
		switch len(seg) {
		case 0:
		case 1:
			k := seg[0]
			sb.WriteString(`<circle class="` + cls + ` dot" cx="` + svgNum(px(base+k)) + `" cy="` + svgNum(py(vs[k])) + `" r="1.8"/>`)
		default:
			sb.WriteString(`<polyline class="` + cls + `" points="`)
			for j, k := range seg {
				if j > 0 {
					sb.WriteByte(' ')
				}
				sb.WriteString(svgNum(px(base+k)) + "," + svgNum(py(vs[k])))
			}
			sb.WriteString(`"/>`)
		}
		seg = seg[:0]
	}
	for k := from; k < len(vs); k++ {
		if math.IsNaN(vs[k]) {
			flush()
			continue
		}
		seg = append(seg, k)
	}
	flush()
}

type legendItem struct{ cls, text string }

// writeLegend writes the legend along the top of the chart.
func writeLegend(sb *strings.Builder, items []legendItem) {
	x := float64(plotL)
	const y = 16
	sb.WriteString(`<g class="legend">`)
	for _, it := range items {
		switch {
		case strings.HasPrefix(it.cls, "band"):
			sb.WriteString(`<rect class="` + it.cls + `" x="` + svgNum(x) + `" y="` + strconv.Itoa(y-6) + `" width="18" height="12"/>`)
		case it.cls == "filled":
			sb.WriteString(`<circle class="filled" cx="` + svgNum(x+9) + `" cy="` + strconv.Itoa(y) + `" r="4"/>`)
		default:
			sb.WriteString(`<line class="` + it.cls + `" x1="` + svgNum(x) + `" x2="` + svgNum(x+18) + `" y1="` + strconv.Itoa(y) + `" y2="` + strconv.Itoa(y) + `"/>`)
		}
		sb.WriteString(`<text x="` + svgNum(x+24) + `" y="` + strconv.Itoa(y) + `" dominant-baseline="middle">` + html.EscapeString(it.text) + `</text>`)
		// About 6.5 units a character at the legend's font size.
		x += 24 + 6.5*float64(len([]rune(it.text))) + 16
	}
	sb.WriteString(`</g>`)
}

// niceTicks returns about five round values covering [lo, hi], and the
// range to draw (from the lowest tick to the highest). A flat range is
// widened. Every value stays finite, even next to the float64 limit.
func niceTicks(lo, hi float64) (ticks []float64, from, to float64) {
	if lo == hi {
		pad := math.Max(math.Abs(lo)*0.1, 1)
		lo, hi = lo-pad, hi+pad // ±10% of a finite value stays finite
		if math.IsInf(lo, 0) || math.IsInf(hi, 0) {
			lo, hi = math.Max(lo, -math.MaxFloat64), math.Min(hi, math.MaxFloat64)
		}
	}
	raw := (hi/2 - lo/2) / 2.5 // (hi − lo)/5 without overflow
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	if math.IsInf(step, 0) || step == 0 || math.IsNaN(step) {
		return []float64{lo, hi}, lo, hi
	}
	k0 := math.Floor(lo / step)
	k1 := math.Ceil(hi / step)
	from, to = k0*step, k1*step
	if math.IsInf(from, 0) || math.IsInf(to, 0) || k1-k0 > 12 {
		return []float64{lo, hi}, lo, hi
	}
	for k := k0; k <= k1; k++ {
		ticks = append(ticks, k*step)
	}
	return ticks, from, to
}

// tickLabels formats the axis values with as many decimals as their step
// needs, or in exponent form when they are very large or very small.
func tickLabels(ticks []float64) []string {
	out := make([]string, len(ticks))
	big := 0.0
	for _, t := range ticks {
		big = math.Max(big, math.Abs(t))
	}
	step := math.Inf(1)
	for k := 1; k < len(ticks); k++ {
		step = math.Min(step, ticks[k]/2-ticks[k-1]/2)
	}
	step *= 2
	dec := 0
	if step < 1 && step > 0 {
		dec = int(math.Ceil(-math.Log10(step) - 1e-9))
	}
	for k, t := range ticks {
		switch {
		case big >= 1e7 || (big > 0 && big < 1e-3) || dec > 6:
			out[k] = strconv.FormatFloat(t, 'g', 3, 64)
		default:
			out[k] = groupThousands(strconv.FormatFloat(t, 'f', dec, 64))
		}
		if out[k] == "-0" {
			out[k] = "0"
		}
	}
	return out
}

// groupThousands puts thin spaces between groups of three digits of the
// integer part of a formatted number of at least five digits.
func groupThousands(s string) string {
	sign := ""
	if strings.HasPrefix(s, "-") {
		sign, s = "-", s[1:]
	}
	intPart, frac := s, ""
	if i := strings.IndexByte(s, '.'); i >= 0 {
		intPart, frac = s[:i], s[i:]
	}
	if len(intPart) < 5 {
		return sign + s
	}
	var b strings.Builder
	for i, c := range intPart {
		if i > 0 && (len(intPart)-i)%3 == 0 {
			b.WriteString("\u2009")
		}
		b.WriteRune(c)
	}
	return sign + b.String() + frac
}

// formatValue formats a data value for text: four significant digits at
// most, no exponent for ordinary sizes.
func formatValue(v float64) string {
	switch {
	case math.IsNaN(v):
		return "missing"
	case v != 0 && (math.Abs(v) >= 1e9 || math.Abs(v) < 1e-3):
		return strconv.FormatFloat(v, 'g', 4, 64)
	case math.Abs(v) >= 100:
		return groupThousands(strconv.FormatFloat(v, 'f', 0, 64))
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// timeTick is one label on the time axis.
type timeTick struct {
	i     int
	label string
}

// timeLayout is how a single time is labelled at frequency f.
func timeLayout(f calendar.Frequency) string {
	switch f.Unit {
	case calendar.Year:
		return "2006"
	case calendar.Month, calendar.Quarter:
		return "Jan 2006"
	case calendar.Minute, calendar.Hour:
		return "2 Jan 15:04"
	}
	return "2 Jan 2006"
}

// timeTicks labels the axis indices first..last (times start + i
// periods) at the turn of each hour, day, month, quarter or year — the
// finest unit coarser than the frequency with at most eight turns on the
// axis — thinned to at most eight when even years are too many. An axis
// with fewer than two turns is labelled at its ends.
func timeTicks(start time.Time, freq calendar.Frequency, first, last int) []timeTick {
	type unit struct {
		rank   int // coarseness, comparable with the frequency's
		key    func(time.Time) int
		layout string
	}
	units := []unit{
		{1, func(t time.Time) int { return t.Year()*24*366 + t.YearDay()*24 + t.Hour() }, "15:04"},
		{2, func(t time.Time) int { return t.Year()*366 + t.YearDay() }, "2 Jan"},
		{3, func(t time.Time) int { return t.Year()*12 + int(t.Month()) }, "Jan 2006"},
		{4, func(t time.Time) int { return t.Year()*4 + (int(t.Month())-1)/3 }, "Jan 2006"},
		{5, func(t time.Time) int { return t.Year() }, "2006"},
	}
	rank := map[calendar.Unit]int{calendar.Minute: 0, calendar.Hour: 1, calendar.Day: 2, calendar.Week: 2, calendar.Month: 3, calendar.Quarter: 4, calendar.Year: 4}[freq.Unit]
	const most = 8
	var best []timeTick
	for _, u := range units {
		if u.rank <= rank {
			continue
		}
		var ts []timeTick
		prev := 0
		for i := first; i <= last; i++ {
			t := freq.Add(start, i)
			k := u.key(t)
			if i > first && k != prev {
				ts = append(ts, timeTick{i, t.Format(u.layout)})
			}
			prev = k
		}
		best = ts
		if len(ts) <= most {
			break
		}
	}
	if len(best) > most {
		every := (len(best) + most - 1) / most
		thin := best[:0:0]
		for k := 0; k < len(best); k += every {
			thin = append(thin, best[k])
		}
		best = thin
	}
	if len(best) < 2 { // a short axis: label its ends
		layout := timeLayout(freq)
		best = []timeTick{{first, freq.Add(start, first).Format(layout)}}
		if last > first {
			best = append(best, timeTick{last, freq.Add(start, last).Format(layout)})
		}
	}
	return best
}
