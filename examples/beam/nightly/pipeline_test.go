package nightly_test

import (
	"context"
	"encoding/csv"
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/examples/beam/catalogue"
	"github.com/almanac-go/almanac/examples/beam/nightly"
	"github.com/almanac-go/almanac/reconcile"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"

	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem/local"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"
)

func TestMain(m *testing.M) {
	beam.Init()
	os.Exit(m.Run())
}

// The pipeline's settings in the test, and the same settings spelled out
// for the library.
const (
	testHorizon = 6
	testPaths   = 200
	testSeed    = 7
	testOrigins = 1
)

var (
	testLevels = []float64{80, 95}
	// testModel is what nightly.NewModel("", testSeed) builds: the
	// automatic forecaster, the pipeline's default model.
	testModel almanac.Model = accuracy.Pilot{Seed: testSeed}
	// testSpec is what the pipeline passes to reconcile.FromFits with
	// Reconcile "mint", NonNegative, testPaths and testSeed.
	testSpec = reconcile.Spec{Method: reconcile.MethodMinTShrink, NonNegative: true, Paths: testPaths, Seed: testSeed}
)

// faultRows are deliberately broken data rows (series, period, value);
// they go into their own file beside the generated ones. The comments
// give what each should cause.
var faultRows = [][]string{
	{"Z99-TST-BADVAL", "2021-10", "12..5"}, // bad-value row; its series has a gap
	{"Z99-TST-INF", "2021-08", "+Inf"},     // non-finite row; gap
	{"Z99-TST-BADTIME", "2021-13", "40"},   // bad-period row; gap (2021-12 ... 2022-01 rows present, so the dropped row's month is missing)
	{"Z99-TST-DUP", "2021-05", "99"},       // a second row for a period: duplicate-period
	{"", "2021-01", "5"},                   // empty-key row
	{"Z99-TST-OK"},                         // malformed row (one field); the series itself is fine
	{"Z98-TST-SHORT", "2021-01", "10"},     // two rows in all: forecast by the automatic forecaster's last fallback (the
	{"Z98-TST-SHORT", "2021-02", "11"},     // naive method), but too short to backtest or to reconcile its tree Z98
	{"Z97-TST-ALLNA", "2021-01", "NA"},     // every value missing: all-missing; its tree Z97 has nothing to forecast
	{"Z97-TST-ALLNA", "2021-02", "NA"},     //
	{"Z97-TST-ALLNA", "2021-03", "NA"},     //
	{"Q-UNPLACED", "2021-01", "3"},         // not in the hierarchy: unknown-node (more rows below)
	{"Z99-TST-BADPLACE", "2021-01", "3"},   // its hierarchy row is bad: bad-place
}

// faultPlaces are hierarchy rows (series, within) beside the generated
// ones.
var faultPlaces = [][]string{
	{"Z99-TST-OK", "Z99/TST"},
	{"Z99-TST-BADVAL", "Z99/TST"},
	{"Z99-TST-INF", "Z99/TST"},
	{"Z99-TST-BADTIME", "Z99/TST"},
	{"Z99-TST-DUP", "Z99/TST"},
	{"Z99-TST-NODATA", "Z99/TST"}, // placed, no data: skipped
	{"Z98-TST-SHORT", "Z98/TST"},
	{"Z97-TST-ALLNA", "Z97/TST"},
	{"Z99-TST-BADPLACE", "Z99//TST"}, // bad-place row
}

// wantDead are the dead-letter rows expected (series, reason), beside
// none for the generated series.
var wantDead = []string{
	"Z99-TST-BADVAL bad-value", "Z99-TST-BADVAL gap",
	"Z99-TST-INF non-finite", "Z99-TST-INF gap",
	"Z99-TST-BADTIME bad-period", "Z99-TST-BADTIME gap",
	"Z99-TST-DUP duplicate-period",
	" empty-key",
	"Z99-TST-OK malformed-row",
	"Z98-TST-SHORT backtest-failed", "Z98/TST backtest-failed", "Z98 backtest-failed",
	"Z97-TST-ALLNA all-missing",
	"Q-UNPLACED unknown-node",
	"Z99-TST-BADPLACE bad-place", "Z99-TST-BADPLACE bad-place",
}

// writeFaults writes the fault files into dir: full histories
// for the fault series (copies of a generated line's values), with the
// broken rows replacing or joining them.
func writeFaults(t *testing.T, dir string, base []float64) {
	t.Helper()
	start := time.Date(2021, time.January, 1, 0, 0, 0, 0, time.UTC)
	var rows [][]string
	full := func(key string, skip int) {
		for i, v := range base {
			if i == skip {
				continue
			}
			rows = append(rows, []string{key, start.AddDate(0, i, 0).Format("2006-01"), strconv.FormatFloat(v, 'g', -1, 64)})
		}
	}
	full("Z99-TST-OK", -1)
	full("Z99-TST-BADVAL", 9)   // 2021-10 comes as a bad row
	full("Z99-TST-INF", 7)      // 2021-08
	full("Z99-TST-BADTIME", 12) // 2022-01 comes as "2021-13"
	full("Z99-TST-DUP", -1)
	full("Q-UNPLACED", 0)
	full("Z99-TST-BADPLACE", 0)
	rows = append(rows, faultRows...)
	writeCSV(t, filepath.Join(dir, "sales-faults.csv"), []string{"series", "period", "value"}, rows)
	writeCSV(t, filepath.Join(dir, "places-faults.csv"), []string{"series", "within"}, faultPlaces)
}

func writeCSV(t *testing.T, name string, header []string, rows [][]string) {
	t.Helper()
	f, err := os.Create(name)
	if err != nil {
		t.Fatal(err)
	}
	w := csv.NewWriter(f)
	w.Write(header)
	w.WriteAll(rows)
	if err := w.Error(); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
}

// readShards reads every shard of an output into rows keyed by header
// name.
func readShards(t *testing.T, dir, output string) []map[string]string {
	t.Helper()
	files, err := filepath.Glob(filepath.Join(dir, output+"-*-of-*.csv"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no %s files in %s (%v)", output, dir, err)
	}
	var out []map[string]string
	for _, name := range files {
		f, err := os.Open(name)
		if err != nil {
			t.Fatal(err)
		}
		recs, err := csv.NewReader(f).ReadAll()
		f.Close()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for _, r := range recs[1:] {
			m := map[string]string{}
			for i, h := range recs[0] {
				m[h] = r[i]
			}
			out = append(out, m)
		}
	}
	return out
}

// node is one series of a hierarchy as the library sees it.
type node struct {
	name   string
	series almanac.Series
}

// directTree builds a hierarchy the documented way (nightly.Aggregate's
// rule, written out again here): for each bottom series in key order,
// the aggregates on its path not yet linked, then the series; aggregate
// values are sums over h.Bottoms in order.
func directTree(t *testing.T, bottoms []catalogue.Line) (*reconcile.Hierarchy, []node) {
	t.Helper()
	slices.SortFunc(bottoms, func(a, b catalogue.Line) int { return strings.Compare(a.Key, b.Key) })
	seen := map[string]bool{}
	var links []reconcile.Link
	vals := map[string][]float64{}
	for _, b := range bottoms {
		parts := strings.Split(b.Within, "/")
		for k := range parts {
			name := strings.Join(parts[:k+1], "/")
			if seen[name] {
				continue
			}
			seen[name] = true
			parent := ""
			if k > 0 {
				parent = strings.Join(parts[:k], "/")
			}
			links = append(links, reconcile.Link{Name: name, Parent: parent})
		}
		links = append(links, reconcile.Link{Name: b.Key, Parent: b.Within})
		vals[b.Key] = b.Values
	}
	h, err := reconcile.NewHierarchy(links...)
	if err != nil {
		t.Fatal(err)
	}
	names := h.Names()
	n, m := h.Len(), h.NumBottom()
	nodes := make([]node, n)
	for i, name := range names {
		v := vals[name]
		if i < n-m {
			v = make([]float64, len(bottoms[0].Values))
			for _, j := range h.Bottoms(i) {
				for k, x := range vals[names[n-m+j]] {
					v[k] += x
				}
			}
		}
		nodes[i] = node{name, almanac.Series{Key: name, Start: bottoms[0].Start, Freq: calendar.Monthly, Values: v}}
	}
	return h, nodes
}

// sameBits compares a forecast written by the pipeline with one computed
// here, value by value, bit by bit.
func sameBits(t *testing.T, key, kind string, rows []map[string]string, fc almanac.Forecast) {
	t.Helper()
	if len(rows) != len(fc.Mean) {
		t.Errorf("%s %s: %d rows, want %d", key, kind, len(rows), len(fc.Mean))
		return
	}
	check := func(step int, col, text string, want float64) {
		got, err := strconv.ParseFloat(text, 64)
		if err != nil || math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("%s %s step %d %s: pipeline wrote %q, library gives %v (%x)", key, kind, step, col, text, want, math.Float64bits(want))
		}
	}
	for h, r := range rows {
		if r["step"] != strconv.Itoa(h+1) || r["period"] != fc.Time(h).Format("2006-01-02") {
			t.Errorf("%s %s row %d: step %s period %s, want %d %s", key, kind, h, r["step"], r["period"], h+1, fc.Time(h).Format("2006-01-02"))
		}
		check(h+1, "point", r["point"], fc.Mean[h])
		for _, l := range testLevels {
			lo, hi := almanac.BandColumns(l)
			lower, upper, err := fc.Bounds(l)
			if err != nil {
				t.Fatalf("%s: %v%% band: %v", key, l, err)
			}
			check(h+1, lo, r[lo], lower[h])
			check(h+1, hi, r[hi], upper[h])
		}
	}
}

// bandsWord is what the status file should say of the bands of f
// (nightly.StatusHeader): the source of an accuracy.Pilot fit's
// calibrated bands and the number of error trajectories.
func bandsWord(t *testing.T, f almanac.Fitted) string {
	t.Helper()
	pf, ok := f.(*accuracy.PilotFit)
	if !ok {
		return nightly.BandsModel
	}
	rep := pf.Report()
	switch c := rep.Calibration; {
	case !rep.Calibrated, c.Source == accuracy.BandsFromModel:
		return nightly.BandsModel
	case c.Source == accuracy.BandsFromPooledErrors:
		return "pooled errors (" + strconv.Itoa(c.Pooled) + ")"
	default:
		return "own errors (" + strconv.Itoa(c.Own) + ")"
	}
}

// TestPipelineMatchesLibrary runs the pipeline in-process (Beam's prism
// runner) on a small generated catalogue with broken rows added, and
// checks that every forecast is bit for bit what the library computes
// directly for the same series, that every broken row and failed series
// is in the dead-letter output with its reason, and that every series is
// accounted for in the status output and the counters.
func TestPipelineMatchesLibrary(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in"), filepath.Join(dir, "out")
	// 72 months: 4 calibration origins per series (accuracy.Calibrated's
	// defaults for monthly data), so that a store's 7 nodes pool 28 error
	// trajectories, enough for calibrated bands, and the fault tree's 3
	// nodes too few (model bands).
	lines, err := catalogue.Write(in, catalogue.Options{Stores: 2, Departments: 2, Lines: 2, Months: 72, Files: 2, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	writeFaults(t, in, lines[0].Values)

	p, s := beam.NewPipelineWithRoot()
	err = nightly.Build(s, nightly.Options{
		Input: filepath.Join(in, "sales-*.csv"), Hierarchy: filepath.Join(in, "places*.csv"), Output: out,
		Horizon: testHorizon, Levels: testLevels, Backtest: testOrigins,
		Reconcile: "mint", NonNegative: true, Paths: testPaths, Seed: testSeed, Shards: 3,
	})
	if err != nil {
		t.Fatal(err)
	}
	res, err := beam.Run(context.Background(), "prism", p)
	if err != nil {
		t.Fatalf("pipeline failed: %v", err)
	}

	forecasts := map[string][]map[string]string{} // "key kind" -> rows in step order
	for _, r := range readShards(t, out, nightly.OutputForecasts) {
		k := r["series"] + " " + r["kind"]
		forecasts[k] = append(forecasts[k], r)
	}
	for _, rows := range forecasts {
		slices.SortFunc(rows, func(a, b map[string]string) int {
			x, _ := strconv.Atoi(a["step"])
			y, _ := strconv.Atoi(b["step"])
			return x - y
		})
	}

	// The library, directly: the generated trees and the fault trees Z99,
	// whose only usable series is Z99-TST-OK, and Z98 (two observations).
	trees := map[string][]catalogue.Line{}
	for _, ln := range lines {
		root, _, _ := strings.Cut(ln.Within, "/")
		trees[root] = append(trees[root], ln)
	}
	trees["Z99"] = []catalogue.Line{{Key: "Z99-TST-OK", Within: "Z99/TST", Start: lines[0].Start, Values: lines[0].Values}}
	trees["Z98"] = []catalogue.Line{{Key: "Z98-TST-SHORT", Within: "Z98/TST", Start: lines[0].Start, Values: []float64{10, 11}}}
	ctx := context.Background()
	wantForecast := map[string]bool{} // series with a base forecast
	reconciled := map[string]bool{}   // trees reconciled
	wantBands := map[string]string{}  // node -> bands column
	for root, bottoms := range trees {
		// Every node fitted, then the calibration errors pooled in the
		// hierarchy's node order (the README's first program on one
		// hierarchy: almanac.BatchFit, accuracy.PoolPilots).
		h, nodes := directTree(t, bottoms)
		ys := make([]almanac.Series, len(nodes))
		for i, nd := range nodes {
			ys[i] = nd.series
		}
		res, err := almanac.BatchFit(ctx, testModel, ys, almanac.BatchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if res, err = accuracy.PoolPilots(res, accuracy.PoolOptions{}); err != nil {
			t.Fatal(err)
		}
		fits := make([]almanac.Fitted, len(nodes))
		for i, nd := range nodes {
			if res[i].Err != nil {
				t.Fatalf("%s: %v", nd.name, res[i].Err)
			}
			f := res[i].Fitted
			fc, err := f.Forecast(testHorizon, testLevels...)
			if err != nil {
				t.Fatalf("%s: %v", nd.name, err)
			}
			sameBits(t, nd.name, "base", forecasts[nd.name+" base"], fc)
			fits[i] = f
			wantForecast[nd.name] = true
			wantBands[nd.name] = bandsWord(t, f)
		}
		rec, err := reconcile.FromFits(ctx, h, fits, testHorizon, testSpec, testLevels...)
		if err != nil {
			t.Logf("tree %s: the library does not reconcile it either: %v", root, err)
			for _, nd := range nodes {
				if rows := forecasts[nd.name+" reconciled"]; len(rows) > 0 {
					t.Errorf("%s: %d reconciled rows for a tree the library cannot reconcile", nd.name, len(rows))
				}
			}
			continue
		}
		reconciled[root] = true
		for i, nd := range nodes {
			sameBits(t, nd.name, "reconciled", forecasts[nd.name+" reconciled"], rec[i])
		}
	}
	for k := range forecasts {
		if key, _, _ := strings.Cut(k, " "); !wantForecast[key] {
			t.Errorf("forecast rows for %s, which the library does not forecast", k)
		}
	}
	if len(reconciled) < 2 {
		t.Errorf("only %d trees reconciled by the library; the generated ones should be", len(reconciled))
	}

	// Dead letters: exactly the broken rows and failed series (and the
	// tree Z99 if it cannot be reconciled).
	var gotDead []string
	for _, r := range readShards(t, out, nightly.OutputDeadLetter) {
		if r["source"] == nightly.SourceTree {
			if _, ok := trees[r["series"]]; !ok || reconciled[r["series"]] {
				t.Errorf("unexpected dead-letter row for tree %s: %v", r["series"], r)
			}
			continue
		}
		gotDead = append(gotDead, r["series"]+" "+r["reason"])
		if r["detail"] == "" {
			t.Errorf("dead-letter row without detail: %v", r)
		}
		if r["source"] != nightly.SourceSeries && r["line"] == "" {
			t.Errorf("dead-letter row of file %s without a line number: %v", r["source"], r)
		}
	}
	want := slices.Clone(wantDead)
	slices.Sort(want)
	slices.Sort(gotDead)
	if !slices.Equal(gotDead, want) {
		t.Errorf("dead-letter rows (series reason):\n got %q\nwant %q", gotDead, want)
	}

	// Status: every series named anywhere exactly once, in the right state.
	states := map[string]string{}
	bandSources := map[string]int{}
	for _, r := range readShards(t, out, nightly.OutputStatus) {
		k := r["role"] + " " + r["series"]
		if _, dup := states[k]; dup {
			t.Errorf("two status rows for %s", k)
		}
		states[k] = r["state"] + " " + r["reason"]
		if w, ok := wantBands[r["series"]]; ok && r["bands"] != w {
			t.Errorf("bands of %s: %q, want %q", k, r["bands"], w)
		}
		if r["bands"] != "" {
			bandSources[r["bands"]]++
		}
	}
	// The generated stores pool enough errors for calibrated bands; the
	// fault tree (3 nodes) does not.
	if len(bandSources) < 2 {
		t.Errorf("bands of the forecasts: %v; want pooled errors and model bands", bandSources)
	}
	wantState := map[string]string{
		"input Z99-TST-BADVAL":   "failed gap",
		"input Z99-TST-INF":      "failed gap",
		"input Z99-TST-BADTIME":  "failed gap",
		"input Z99-TST-DUP":      "failed duplicate-period",
		"input Z97-TST-ALLNA":    "failed all-missing",
		"input Q-UNPLACED":       "failed unknown-node",
		"input Z99-TST-BADPLACE": "failed bad-place",
		"input Z99-TST-NODATA":   "skipped no-data",
		"aggregate Z97":          "skipped no-members",
		"aggregate Z97/TST":      "skipped no-members",
	}
	for key := range wantForecast {
		role := "input"
		if !strings.Contains(key, "-") {
			role = "aggregate"
		}
		root, _, _ := strings.Cut(key, "/")
		root, _, _ = strings.Cut(root, "-")
		if reconciled[root] {
			wantState[role+" "+key] = "reconciled "
		} else {
			wantState[role+" "+key] = "forecast reconcile-failed"
		}
	}
	for k, w := range wantState {
		if got, ok := states[k]; !ok {
			t.Errorf("no status row for %s", k)
		} else if got != w {
			t.Errorf("status of %s: %q, want %q", k, got, w)
		}
	}
	for k := range states {
		if _, ok := wantState[k]; !ok {
			t.Errorf("unexpected status row %s: %s", k, states[k])
		}
	}

	// Counters.
	counters := map[string]int64{}
	for _, c := range res.Metrics().AllMetrics().Counters() {
		if c.Key.Namespace == "almanac" {
			counters[c.Key.Name] += c.Committed
		}
	}
	inputsForecast := 0
	for k := range wantForecast {
		if strings.Contains(k, "-") {
			inputsForecast++
		}
	}
	wantCounters := map[string]int64{
		"series_forecast":                int64(inputsForecast),
		"series_skipped":                 1,
		"series_failed_gap":              3,
		"series_failed_duplicate-period": 1,
		"series_failed_all-missing":      1,
		"backtests_failed":               3,
		"series_failed_unknown-node":     1,
		"series_failed_bad-place":        1,
		"aggregates_forecast":            int64(len(wantForecast) - inputsForecast),
		"aggregates_skipped":             2,
		"rows_rejected_bad-value":        1,
		"rows_rejected_non-finite":       1,
		"rows_rejected_bad-period":       1,
		"rows_rejected_empty-key":        1,
		"rows_rejected_malformed-row":    1,
		"rows_rejected_bad-place":        1,
		"trees_reconciled":               int64(len(reconciled)),
		"trees_not_reconciled":           int64(len(trees) - len(reconciled)),
	}
	for name, w := range wantCounters {
		if counters[name] != w {
			t.Errorf("counter %s = %d, want %d", name, counters[name], w)
		}
	}
	for name, v := range counters {
		if _, ok := wantCounters[name]; !ok && v != 0 {
			t.Errorf("unexpected counter %s = %d", name, v)
		}
	}

	// Accuracy: one row per candidate for every series forecast, the
	// model's scores as accuracy.Backtest gives them for the input series.
	acc := map[string]map[string]string{}
	for _, r := range readShards(t, out, nightly.OutputAccuracy) {
		acc[r["series"]+" "+r["candidate"]] = r
	}
	backtested := len(wantForecast) - 3 // not the three nodes of Z98
	if want := 3 * backtested; len(acc) != want {
		t.Errorf("%d accuracy rows, want %d (3 candidates × %d series)", len(acc), want, backtested)
	}
	bt := accuracy.Backtest{Horizon: testHorizon, Origins: testOrigins, Levels: testLevels}
	for _, ln := range trees["N01"] {
		c, err := bt.Run(ctx, almanac.Series{Key: ln.Key, Start: ln.Start, Freq: calendar.Monthly, Values: ln.Values}, accuracy.Candidate{Name: nightly.DefaultModel, Model: testModel})
		if err != nil {
			t.Fatal(err)
		}
		for _, run := range c.Runs {
			r := acc[ln.Key+" "+run.Name]
			if r == nil {
				t.Errorf("no accuracy row for %s %s", ln.Key, run.Name)
				continue
			}
			for col, v := range map[string]float64{"mase": run.Overall.MASE, "rmsse": run.Overall.RMSSE, "mae": run.Overall.MAE} {
				if got, err := strconv.ParseFloat(r[col], 64); err != nil || math.Float64bits(got) != math.Float64bits(v) {
					t.Errorf("%s %s %s: pipeline %q, library %v", ln.Key, run.Name, col, r[col], v)
				}
			}
		}
	}
	if t.Failed() {
		t.Logf("counters: %v", counters)
	}
}

// TestBuildRejectsBadOptions checks that options the pipeline cannot use
// are reported before anything runs.
func TestBuildRejectsBadOptions(t *testing.T) {
	for _, tc := range []struct {
		name string
		opt  nightly.Options
	}{
		{"no input", nightly.Options{Output: "x"}},
		{"unknown model", nightly.Options{Input: "x", Output: "y", Model: "crystal-ball"}},
		{"bad level", nightly.Options{Input: "x", Output: "y", Levels: []float64{120}}},
		{"negative horizon", nightly.Options{Input: "x", Output: "y", Horizon: -1}},
		{"unknown reconciliation", nightly.Options{Input: "x", Output: "y", Reconcile: "guess"}},
		{"negative paths", nightly.Options{Input: "x", Output: "y", Paths: -5}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, s := beam.NewPipelineWithRoot()
			if err := nightly.Build(s, tc.opt); !errors.Is(err, nightly.ErrOption) {
				t.Errorf("Build: %v, want an error wrapping ErrOption", err)
			}
		})
	}
}

// TestPipelineWithoutHierarchy runs the pipeline with no hierarchy file:
// every series is forecast in its bucket, bit for bit as the library
// forecasts the bucket's series (almanac.BatchFit and
// accuracy.PoolPilots on the bucket, in key order), and nothing is
// reconciled.
func TestPipelineWithoutHierarchy(t *testing.T) {
	dir := t.TempDir()
	in, out := filepath.Join(dir, "in"), filepath.Join(dir, "out")
	lines, err := catalogue.Write(in, catalogue.Options{Stores: 2, Departments: 1, Lines: 4, Months: 72, Seed: 11})
	if err != nil {
		t.Fatal(err)
	}
	const buckets = 2
	p, s := beam.NewPipelineWithRoot()
	if err := nightly.Build(s, nightly.Options{Input: filepath.Join(in, catalogue.DataPattern), Output: out,
		Horizon: testHorizon, Levels: testLevels, Seed: testSeed, Buckets: buckets}); err != nil {
		t.Fatal(err)
	}
	res, err := beam.Run(context.Background(), "prism", p)
	if err != nil {
		t.Fatalf("pipeline failed: %v", err)
	}
	rows := map[string][]map[string]string{}
	for _, r := range readShards(t, out, nightly.OutputForecasts) {
		if r["kind"] != nightly.KindBase {
			t.Errorf("%s: %s rows without a hierarchy", r["series"], r["kind"])
		}
		rows[r["series"]] = append(rows[r["series"]], r)
	}
	// The library, bucket by bucket.
	byBucket := make([][]almanac.Series, buckets)
	for _, ln := range lines {
		b := nightly.BucketOf(ln.Key, buckets)
		byBucket[b] = append(byBucket[b], almanac.Series{Key: ln.Key, Start: ln.Start, Freq: calendar.Monthly, Values: ln.Values})
	}
	wantBands := map[string]string{}
	for _, ys := range byBucket {
		slices.SortFunc(ys, func(a, b almanac.Series) int { return strings.Compare(a.Key, b.Key) })
		fits, err := almanac.BatchFit(context.Background(), testModel, ys, almanac.BatchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if fits, err = accuracy.PoolPilots(fits, accuracy.PoolOptions{}); err != nil {
			t.Fatal(err)
		}
		for i, y := range ys {
			if fits[i].Err != nil {
				t.Fatalf("%s: %v", y.Key, fits[i].Err)
			}
			fc, err := fits[i].Fitted.Forecast(testHorizon, testLevels...)
			if err != nil {
				t.Fatal(err)
			}
			rs := rows[y.Key]
			slices.SortFunc(rs, func(a, b map[string]string) int { return strings.Compare(a["period"], b["period"]) })
			sameBits(t, y.Key, "base", rs, fc)
			wantBands[y.Key] = bandsWord(t, fits[i].Fitted)
		}
	}
	if len(rows) != len(lines) {
		t.Errorf("forecasts for %d series, want %d", len(rows), len(lines))
	}
	for _, r := range readShards(t, out, nightly.OutputStatus) {
		if r["state"] != nightly.StateForecast || r["tree"] != "" || r["role"] != nightly.RoleInput {
			t.Errorf("status %v, want an input forecast outside any tree", r)
		}
		if r["bands"] != wantBands[r["series"]] {
			t.Errorf("bands of %s: %q, want %q", r["series"], r["bands"], wantBands[r["series"]])
		}
	}
	var forecast int64
	for _, c := range res.Metrics().AllMetrics().Counters() {
		if c.Key.Namespace == "almanac" && c.Key.Name == "series_forecast" {
			forecast += c.Committed
		}
	}
	if forecast != int64(len(lines)) {
		t.Errorf("series_forecast = %d, want %d", forecast, len(lines))
	}
}
