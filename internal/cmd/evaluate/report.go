package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"
)

// published holds the sMAPE of methods in the M3 competition, recomputed
// from the competition's submitted forecasts (../shared/data/README.md,
// after Makridakis & Hibon 2000), by category and over all 3,003 series.
var published = []struct {
	name   string
	byCat  map[string]float64
	allPts float64
}{
	{"Naive2", map[string]float64{"yearly": 17.88, "quarterly": 9.95, "monthly": 16.91, "other": 6.30}, 15.47},
	{"single exp. smoothing", map[string]float64{"yearly": 17.82, "quarterly": 9.72, "monthly": 15.32, "other": 6.29}, 14.32},
	{"damped trend", map[string]float64{"yearly": 17.36, "quarterly": 9.36, "monthly": 14.59, "other": 4.61}, 13.65},
	{"Theta", map[string]float64{"yearly": 16.87, "quarterly": 8.96, "monthly": 13.94, "other": 4.41}, 13.08},
	{"best commercial entry", map[string]float64{"yearly": 17.27, "quarterly": 9.82, "monthly": 13.91, "other": 4.60}, 13.24},
}

// report holds the summaries to print.
type report struct {
	d       *dataset
	cols    []string // categories, then "all"
	counts  map[string]int
	horizon map[string]string
	runs    []modelRun
	sums    [][]summary // [run][col]
	// on the series every model forecast, when some model failed on some
	// series (nil otherwise)
	common  [][]summary
	nCommon map[string]int
	subset  int
	showWhy bool
}

func buildReport(d *dataset, idx []int, runs []modelRun, ref []result, subset int) *report {
	rp := &report{d: d, runs: runs, subset: subset, counts: map[string]int{}, horizon: map[string]string{}, nCommon: map[string]int{}}
	byCat := map[string][]int{}
	hs := map[string]map[int]bool{}
	for _, i := range idx {
		c := d.items[i].category
		byCat[c] = append(byCat[c], i)
		if hs[c] == nil {
			hs[c] = map[int]bool{}
		}
		hs[c][len(d.items[i].test)] = true
	}
	for _, c := range d.cats {
		if len(byCat[c]) == 0 {
			continue
		}
		rp.cols = append(rp.cols, c)
		rp.counts[c] = len(byCat[c])
		var h []string
		for k := range hs[c] {
			h = append(h, fmt.Sprint(k))
		}
		rp.horizon[c] = strings.Join(sortedStrings(h), "/")
	}
	rp.cols = append(rp.cols, "all")
	rp.counts["all"] = len(idx)
	for _, r := range runs {
		var row []summary
		for _, c := range rp.cols {
			sel := byCat[c]
			if c == "all" {
				sel = idx
			}
			row = append(row, summarize(d.items, r.res, ref, sel))
		}
		rp.sums = append(rp.sums, row)
	}
	both := common(runs, idx)
	if len(both) < len(idx) && len(runs) > 1 {
		for _, r := range runs {
			var row []summary
			for _, c := range rp.cols {
				var sel []int
				for _, i := range both {
					if c == "all" || d.items[i].category == c {
						sel = append(sel, i)
					}
				}
				rp.nCommon[c] = len(sel)
				row = append(row, summarize(d.items, r.res, ref, sel))
			}
			rp.common = append(rp.common, row)
		}
	}
	return rp
}

func sortedStrings(s []string) []string {
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && (len(s[j]) < len(s[j-1]) || len(s[j]) == len(s[j-1]) && s[j] < s[j-1]); j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
	return s
}

// num formats a measure for the tables: a dash when undefined.
func num(v float64, prec int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return fmt.Sprintf("%.*f", prec, v)
}

func (rp *report) writeText(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "Data: %s, %d series", rp.d.dir, rp.counts["all"])
	var parts []string
	for _, c := range rp.cols[:len(rp.cols)-1] {
		parts = append(parts, fmt.Sprintf("%s %d (h %s)", c, rp.counts[c], rp.horizon[c]))
	}
	fmt.Fprintf(&b, ": %s", strings.Join(parts, ", "))
	if rp.subset > 0 {
		fmt.Fprintf(&b, "; at most %d per category, spread evenly", rp.subset)
	}
	b.WriteString(".\n")
	width := 10
	header := func(title string) {
		fmt.Fprintf(&b, "\n%-34s", title)
		for _, c := range rp.cols {
			fmt.Fprintf(&b, "%*s", width, c)
		}
		b.WriteString("\n")
	}
	block := func(title string, prec int, get func(s summary) float64) {
		header(title)
		for i, r := range rp.runs {
			fmt.Fprintf(&b, "  %-32s", r.e.name)
			for j := range rp.cols {
				fmt.Fprintf(&b, "%*s", width, num(get(rp.sums[i][j]), prec))
			}
			b.WriteString("\n")
		}
	}
	block("sMAPE, %", 2, func(s summary) float64 { return s.smape })
	commonBlock := func(title string, prec int, get func(s summary) float64) {
		if rp.common == nil {
			return
		}
		header(title)
		fmt.Fprintf(&b, "  %-32s", "(series)")
		for _, c := range rp.cols {
			fmt.Fprintf(&b, "%*d", width, rp.nCommon[c])
		}
		b.WriteString("\n")
		for i, r := range rp.runs {
			fmt.Fprintf(&b, "  %-32s", r.e.name)
			for j := range rp.cols {
				fmt.Fprintf(&b, "%*s", width, num(get(rp.common[i][j]), prec))
			}
			b.WriteString("\n")
		}
	}
	if rp.d.isM3() {
		full := rp.subset == 0
		fmt.Fprintf(&b, "  %s\n", "as published for M3 (all series of each category):")
		for _, p := range published {
			fmt.Fprintf(&b, "    %-30s", p.name)
			for _, c := range rp.cols {
				v, ok := p.byCat[c]
				if c == "all" {
					v, ok = p.allPts, full
				}
				if !ok {
					v = math.NaN()
				}
				fmt.Fprintf(&b, "%*s", width, num(v, 2))
			}
			b.WriteString("\n")
		}
	}
	commonBlock("sMAPE, % (series all forecast)", 2, func(s summary) float64 { return s.smape })
	block("MASE", 3, func(s summary) float64 { return s.mase })
	commonBlock("MASE (series all forecast)", 3, func(s summary) float64 { return s.mase })
	block("OWA against Naive2", 3, func(s summary) float64 { return s.owa })
	block("inside the 80% band, %", 1, func(s summary) float64 { return s.in[0] })
	block("inside the 95% band, %", 1, func(s summary) float64 { return s.in[1] })
	block("MSIS of the 80% band", 2, func(s summary) float64 { return s.msis[0] })
	block("MSIS of the 95% band", 2, func(s summary) float64 { return s.msis[1] })
	block("horizon total in 80% band, %", 1, func(s summary) float64 { return s.tot[0] })
	block("horizon total in 95% band, %", 1, func(s summary) float64 { return s.tot[1] })
	block("failed series", 0, func(s summary) float64 { return float64(s.failed) })
	block("seconds, summed over series", 2, func(s summary) float64 { return s.secs })

	rp.writeRoutes(&b)
	b.WriteString("\nRun time per model (wall-clock, process CPU-seconds, workers):\n")
	for _, r := range rp.runs {
		fmt.Fprintf(&b, "  %-32s %8.1f s %8.1f CPU-s  %d\n", r.e.name, r.wall, r.cpu, r.workers)
	}
	rp.writeNotes(&b)
	_, err := io.WriteString(w, b.String())
	return err
}

// writeRoutes counts, for models that report a route (the automatic
// forecaster), the series of each category that took each route.
func (rp *report) writeRoutes(b *strings.Builder) {
	for _, r := range rp.runs {
		count := map[string]map[string]int{}
		var names []string
		for i, res := range r.res {
			if res.err != nil || res.route == "" {
				continue
			}
			if count[res.route] == nil {
				count[res.route] = map[string]int{}
				names = append(names, res.route)
			}
			count[res.route][rp.d.items[i].category]++
			count[res.route]["all"]++
		}
		if len(names) == 0 {
			continue
		}
		slices.Sort(names)
		fmt.Fprintf(b, "\n%-34s", "routes taken by "+r.e.name)
		for _, c := range rp.cols {
			fmt.Fprintf(b, "%10s", c)
		}
		b.WriteString("\n")
		for _, n := range names {
			fmt.Fprintf(b, "  %-32s", n)
			for _, c := range rp.cols {
				fmt.Fprintf(b, "%10d", count[n][c])
			}
			b.WriteString("\n")
		}
	}
}

// writeNotes lists the failed series and what could not be scored.
func (rp *report) writeNotes(b *strings.Builder) {
	first := true
	for _, r := range rp.runs {
		var ids []string
		var examples []string
		for i, res := range r.res {
			if res.err == nil {
				continue
			}
			it := rp.d.items[i]
			ids = append(ids, it.id)
			if rp.showWhy || len(examples) < 3 {
				examples = append(examples, fmt.Sprintf("%s (%s): %v", it.id, it.category, res.err))
			}
		}
		if len(ids) == 0 {
			continue
		}
		if first {
			b.WriteString("\nFailed series:\n")
			first = false
		}
		fmt.Fprintf(b, "  %s, %d: %s\n", r.e.name, len(ids), wrap(strings.Join(ids, " "), 90, "    "))
		for _, e := range examples {
			fmt.Fprintf(b, "    %s\n", e)
		}
		if n := len(ids) - len(examples); n > 0 {
			fmt.Fprintf(b, "    (%d more; -why prints every error)\n", n)
		}
	}
	b.WriteString("\nNot scored:\n")
	none := true
	for j, r := range rp.runs {
		all := rp.sums[j][len(rp.cols)-1]
		scored := all.series - all.failed
		if scored == 0 {
			continue
		}
		var what []string
		if noBand := scored - countBands(r); noBand > 0 {
			what = append(what, fmt.Sprintf("bands on %d series", noBand))
		}
		if untot := scored - all.nTot; untot > 0 {
			what = append(what, fmt.Sprintf("the horizon total on %d series (no sample paths, or a missing test value)", untot))
		}
		if len(what) > 0 {
			none = false
			fmt.Fprintf(b, "  %s: %s\n", r.e.name, strings.Join(what, "; "))
		}
	}
	if none {
		b.WriteString("  nothing\n")
	}
}

// wrap breaks s into lines of at most width characters at spaces,
// indenting the continuation lines.
func wrap(s string, width int, indent string) string {
	var out strings.Builder
	line := 0
	for i, w := range strings.Fields(s) {
		if i > 0 {
			if line+1+len(w) > width {
				out.WriteString("\n" + indent)
				line = 0
			} else {
				out.WriteString(" ")
				line++
			}
		}
		out.WriteString(w)
		line += len(w)
	}
	return out.String()
}

func countBands(r modelRun) int {
	n := 0
	for _, res := range r.res {
		if res.err == nil && res.fit != "" && !strings.HasPrefix(res.note, "no bands") {
			n++
		}
	}
	return n
}

// jsonRow is one line of -json output. Percentages are in percent;
// undefined measures are null.
type jsonRow struct {
	Model      string   `json:"model"`
	Category   string   `json:"category"`
	Series     int      `json:"series"`
	Failed     int      `json:"failed"`
	SMAPE      *float64 `json:"smape"`
	MASE       *float64 `json:"mase"`
	OWA        *float64 `json:"owa"`
	Coverage80 *float64 `json:"coverage80"`
	Coverage95 *float64 `json:"coverage95"`
	MSIS       *float64 `json:"msis"`
	MSIS80     *float64 `json:"msis80"`
	Total80    *float64 `json:"total80"`
	Total95    *float64 `json:"total95"`
	Seconds    float64  `json:"seconds"`
	FailedIDs  []string `json:"failed_series"`
	// On the series every model of the run forecast (present only when
	// some model failed on some series).
	CommonSeries *int     `json:"common_series,omitempty"`
	SMAPECommon  *float64 `json:"smape_common,omitempty"`
	MASECommon   *float64 `json:"mase_common,omitempty"`
}

func ptr(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func (rp *report) writeJSON(w io.Writer) error {
	enc := json.NewEncoder(w)
	for i, r := range rp.runs {
		for j, c := range rp.cols {
			s := rp.sums[i][j]
			row := jsonRow{
				Model: r.e.name, Category: c, Series: s.series, Failed: s.failed,
				SMAPE: ptr(s.smape), MASE: ptr(s.mase), OWA: ptr(s.owa),
				Coverage80: ptr(s.in[0]), Coverage95: ptr(s.in[1]),
				MSIS: ptr(s.msis[1]), MSIS80: ptr(s.msis[0]),
				Total80: ptr(s.tot[0]), Total95: ptr(s.tot[1]),
				Seconds: s.secs, FailedIDs: s.failedIDs,
			}
			if row.FailedIDs == nil {
				row.FailedIDs = []string{}
			}
			if rp.common != nil {
				n := rp.nCommon[c]
				row.CommonSeries = &n
				row.SMAPECommon = ptr(rp.common[i][j].smape)
				row.MASECommon = ptr(rp.common[i][j].mase)
			}
			if err := enc.Encode(row); err != nil {
				return err
			}
		}
	}
	return nil
}

// writeForecasts writes every forecast of every run to a CSV file.
func writeForecasts(name string, d *dataset, idx []int, runs []modelRun) error {
	fh, err := os.Create(name)
	if err != nil {
		return err
	}
	w := csv.NewWriter(fh)
	w.Write([]string{"model", "series", "category", "step", "actual", "point", "lower80", "upper80", "lower95", "upper95"})
	cell := func(xs []float64, j int) string {
		if xs == nil || math.IsNaN(xs[j]) {
			return ""
		}
		return strconv.FormatFloat(xs[j], 'g', -1, 64)
	}
	for _, r := range runs {
		for _, i := range idx {
			it, res := d.items[i], r.res[i]
			for j := range it.test {
				var pt []float64
				if res.err == nil {
					pt = res.point
				}
				w.Write([]string{r.e.name, it.id, it.category, strconv.Itoa(j + 1), cell(it.test, j), cell(pt, j),
					cell(res.lo[0], j), cell(res.hi[0], j), cell(res.lo[1], j), cell(res.hi[1], j)})
			}
		}
	}
	w.Flush()
	if err := w.Error(); err != nil {
		fh.Close()
		return err
	}
	return fh.Close()
}
