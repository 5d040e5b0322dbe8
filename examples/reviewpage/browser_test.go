package main

import (
	"bytes"
	"context"
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

// chromium returns the path of a Chromium (or Chrome) binary: the
// ALMANAC_CHROMIUM variable when set, else the first of the usual names on
// PATH. Outside CI the test is skipped when there is none; under CI (the
// variable CI set) it fails, as .ci/run installs the Debian package
// chromium.
func chromium(t *testing.T) string {
	t.Helper()
	if p := os.Getenv("ALMANAC_CHROMIUM"); p != "" {
		return p
	}
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome", "google-chrome-stable"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	if os.Getenv("CI") != "" {
		t.Fatal("no chromium binary on PATH under CI; .ci/run installs the Debian package chromium")
	}
	t.Skip("no chromium binary on PATH (install the Debian package chromium, or set ALMANAC_CHROMIUM)")
	return ""
}

// console collects what the page says on its console, its uncaught
// exceptions and the browser's log entries of level warning or error
// (a blocked resource, a script error).
type console struct {
	mu       sync.Mutex
	problems []string
}

func (c *console) listen(ev any) {
	c.mu.Lock()
	defer c.mu.Unlock()
	switch ev := ev.(type) {
	case *runtime.EventConsoleAPICalled:
		var args []string
		for _, a := range ev.Args {
			args = append(args, string(a.Value)+a.Description)
		}
		c.problems = append(c.problems, fmt.Sprintf("console.%s: %s", ev.Type, strings.Join(args, " ")))
	case *runtime.EventExceptionThrown:
		d := ev.ExceptionDetails
		text := d.Text
		if d.Exception != nil {
			text += " " + d.Exception.Description
		}
		c.problems = append(c.problems, fmt.Sprintf("exception at %d:%d: %s", d.LineNumber+1, d.ColumnNumber+1, text))
	case *cdplog.EventEntryAdded:
		if e := ev.Entry; e.Level == cdplog.EntryLevelError || e.Level == cdplog.EntryLevelWarning {
			c.problems = append(c.problems, fmt.Sprintf("log %s (%s): %s %s", e.Level, e.Source, e.Text, e.URL))
		}
	}
}

func (c *console) check(t *testing.T, when string) {
	t.Helper()
	c.mu.Lock()
	defer c.mu.Unlock()
	for _, p := range c.problems {
		t.Errorf("%s: %s", when, p)
	}
	c.problems = nil
}

// row is what the test reads of a summary row.
type row struct {
	Key, Flags string
	Error      string // data-v of the backtest error cell
	Hidden     bool
}

// readRows returns the summary rows in the order the table shows them.
const readRows = `Array.prototype.map.call(document.querySelectorAll("#summary tbody tr"), function (r) {
  var err = r.cells[Array.prototype.indexOf.call(document.querySelectorAll("#summary thead th"), document.querySelector("#summary thead th[data-col=error]"))];
  return { Key: r.cells[1].getAttribute("data-v"), Flags: r.getAttribute("data-flags"), Error: err.getAttribute("data-v"), Hidden: r.hidden };
})`

func visible(rows []row) []string {
	var out []string
	for _, r := range rows {
		if !r.Hidden {
			out = append(out, r.Key)
		}
	}
	return out
}

// TestReviewPageInBrowser opens the review page in headless Chromium and
// checks what a planner relies on: it loads with nothing on the console,
// every series' chart is drawn with a size, sorting reorders the rows,
// the filters hide and show them, and a screenshot can be taken (written
// to the test's temporary directory).
func TestReviewPageInBrowser(t *testing.T) {
	bin := chromium(t)
	dir := t.TempDir()
	path, err := write(context.Background(), dir)
	if err != nil {
		t.Fatal(err)
	}
	r, err := build(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	series := len(r.Series)

	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	// This machine's network is closed: without these flags Chromium
	// waits on refused connections (updates, sync, QUIC probes).
	actx, cancelAlloc := chromedp.NewExecAllocator(ctx,
		chromedp.ExecPath(bin),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true),
		chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.UserDataDir(filepath.Join(dir, "chromium-profile")),
		chromedp.WindowSize(1280, 900),
	)
	defer cancelAlloc()
	var con console
	tab, cancelTab := chromedp.NewContext(actx, chromedp.WithListener(con.listen))
	defer cancelTab()

	start := time.Now()
	if err := chromedp.Do(tab); err != nil { // starts the browser
		t.Fatalf("starting %s: %v", bin, err)
	}
	if _, err := chromedp.Call(tab, cdplog.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	if err := chromedp.Do(tab,
		chromedp.Navigate("file://"+filepath.ToSlash(path)),
		chromedp.WaitReady(chromedp.CSS("#summary tbody tr")),
	); err != nil {
		t.Fatal(err)
	}
	t.Logf("browser started and page loaded in %v", time.Since(start).Round(time.Millisecond))
	con.check(t, "loading")

	// Every series has a chart with a size.
	sizes, err := chromedp.Run(tab, chromedp.Evaluate[[][2]float64](`Array.prototype.map.call(document.querySelectorAll("section.series svg.chart"), function (s) {
  var b = s.getBoundingClientRect(); return [b.width, b.height];
})`))
	if err != nil {
		t.Fatal(err)
	}
	if len(sizes) != series {
		t.Errorf("%d charts for %d series", len(sizes), series)
	}
	for i, s := range sizes {
		if !(s[0] > 100 && s[1] > 50) {
			t.Errorf("chart %d is drawn %v × %v", i+1, s[0], s[1])
		}
	}

	rows := func() []row {
		t.Helper()
		rs, err := chromedp.Run(tab, chromedp.Evaluate[[]row](readRows))
		if err != nil {
			t.Fatal(err)
		}
		if len(rs) != series {
			t.Fatalf("%d rows for %d series", len(rs), series)
		}
		return rs
	}
	initial := visible(rows())
	if len(initial) != series {
		t.Fatalf("%d of %d rows visible before any filter", len(initial), series)
	}

	// Sorting by backtest error: ascending on the first click, rows with
	// no value last; descending on the second.
	click := func(sel string) {
		t.Helper()
		if err := chromedp.Do(tab, chromedp.Click(chromedp.CSS(sel))); err != nil {
			t.Fatal(err)
		}
	}
	sortedBy := func(rs []row, dir float64) {
		t.Helper()
		prev, seenEmpty := 0.0, false
		for k, r := range rs {
			if r.Error == "" {
				seenEmpty = true
				continue
			}
			if seenEmpty {
				t.Errorf("row %d (%s) has a value after rows without one", k+1, r.Key)
			}
			v, err := strconv.ParseFloat(r.Error, 64)
			if err != nil {
				t.Fatalf("row %s: data-v %q", r.Key, r.Error)
			}
			if k > 0 && rs[k-1].Error != "" && dir*(v-prev) < 0 {
				t.Errorf("rows %s then %s are out of order (%v, %v)", rs[k-1].Key, r.Key, prev, v)
			}
			prev = v
		}
	}
	click(`#summary th[data-col=error] button`)
	asc := rows()
	sortedBy(asc, 1)
	if slices.Equal(visible(asc), initial) {
		t.Error("sorting by backtest error left the rows in their order")
	}
	click(`#summary th[data-col=error] button`)
	desc := rows()
	sortedBy(desc, -1)
	if slices.Equal(visible(desc), visible(asc)) {
		t.Error("a second click left the order unchanged")
	}
	click(`#summary th[data-col=n] button`)
	if got := visible(rows()); !slices.Equal(got, initial) {
		t.Errorf("sorting by # gives %v, want the input order %v", got, initial)
	}

	// Filtering by typing: only the rows whose key, model or method hold
	// the text stay, and their sections with them.
	if err := chromedp.Do(tab, chromedp.SendKeys(chromedp.CSS("#find"), "shovel")); err != nil {
		t.Fatal(err)
	}
	if got := visible(rows()); !slices.Equal(got, []string{"snow shovels"}) {
		t.Errorf("after typing \"shovel\" the rows shown are %v", got)
	}
	shownSections, err := chromedp.Run(tab, chromedp.Evaluate[int](`document.querySelectorAll("section.series:not([hidden])").length`))
	if err != nil {
		t.Fatal(err)
	}
	if shownSections != 1 {
		t.Errorf("%d series sections shown beside one row", shownSections)
	}
	counter, err := chromedp.Run(tab, chromedp.Text(chromedp.ID("shown")))
	if err != nil {
		t.Fatal(err)
	}
	if want := fmt.Sprintf("1 of %d shown", series); strings.TrimSpace(counter) != want {
		t.Errorf("counter %q, want %q", counter, want)
	}
	// Clear the box as a user would (select all, delete).
	if err := chromedp.Do(tab, chromedp.Evaluate[chromedp.Void](`(function () { var f = document.getElementById("find"); f.value = ""; f.dispatchEvent(new Event("input")); })()`)); err != nil {
		t.Fatal(err)
	}
	if got := visible(rows()); len(got) != series {
		t.Errorf("after clearing the box %d rows are shown", len(got))
	}

	// Filtering by flag: each choice shows exactly the rows carrying it.
	for _, flag := range []string{"failed", "fallback", "bias", "filled", "any", "all"} {
		if err := chromedp.Do(tab, chromedp.SetValue(chromedp.ID("only"), flag),
			chromedp.Evaluate[chromedp.Void](`document.getElementById("only").dispatchEvent(new Event("change"))`)); err != nil {
			t.Fatal(err)
		}
		rs := rows()
		var want []string
		for _, r := range rs {
			has := slices.Contains(strings.Fields(r.Flags), flag) || flag == "all" || (flag == "any" && r.Flags != "")
			if has {
				want = append(want, r.Key)
			}
		}
		got := visible(rs)
		if !slices.Equal(got, want) {
			t.Errorf("show %q: rows %v, want %v", flag, got, want)
		}
		if flag != "all" && (len(got) == 0 || len(got) == series) {
			t.Errorf("show %q: %d of %d rows; the demo data should give some but not all", flag, len(got), series)
		}
	}

	// A screenshot of the whole page.
	shot, err := chromedp.Run(tab, chromedp.FullScreenshot(100))
	if err != nil {
		t.Fatal(err)
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(shot))
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	if cfg.Width < 800 || cfg.Height < 2000 {
		t.Errorf("screenshot of the whole page is %d × %d", cfg.Width, cfg.Height)
	}
	shotPath := filepath.Join(dir, "review.png")
	if err := os.WriteFile(shotPath, shot, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot %d × %d written to %s", cfg.Width, cfg.Height, shotPath)
	con.check(t, "using the page")
}
