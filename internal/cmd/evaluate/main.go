// Command evaluate scores forecasting models on a data set laid out like
// the M3 competition folder: it fits each model to the training part of
// every series on all cores, forecasts the held-out test part and prints,
// per frequency category and over all series, the accuracy of the point
// forecasts and of the 80% and 95% bands.
//
// Usage:
//
//	go run ./internal/cmd/evaluate -data ../shared/data/m3 -models auto,combo,ets,arima,theta,naive2
//	go run ./internal/cmd/evaluate -data DIR -models theta,snaive -subset 20 -json
//
// Flags:
//
//	-data DIR      the data folder (default ../shared/data/m3)
//	-models LIST   comma-separated model names; -list shows them
//	-subset N      score at most N series of each category, spread evenly
//	               through it (0: all)
//	-json          one JSON object per line per model and category
//	               (category "all" included) instead of the tables
//	-workers N     series fitted at once (0: GOMAXPROCS)
//	-why           print the error of every failed series
//	-forecasts F   also write every forecast to the CSV file F, one row
//	               per model, series and step (columns model, series,
//	               category, step, actual, point, lower80, upper80,
//	               lower95, upper95; empty where a model failed or gave
//	               no bands), for studying combinations offline
//	-list          list the model names and exit
//
// # Data
//
// The folder holds one metadata file, a .csv whose header has the columns
// series, frequency, n_train and h (optionally domain, start_year and
// start_period), and value files in long format with the columns series,
// index (1-based), value and part ("train" or "test"). The frequency is
// yearly, quarterly, monthly, weekly, daily, hourly or other (M3's
// undated series, read as non-seasonal). start_period counts months,
// quarters, ISO weeks, days or hours from the start of start_year; both
// may be 0 when the dates are unknown. An empty value cell is a missing
// observation.
//
// # Measures
//
// sMAPE is the M3 definition, 200·|y − f|/(|y| + |f|) in percent
// (Makridakis & Hibon 2000). MASE divides absolute errors by the mean
// absolute seasonal-naive error of the training part with the M4
// competition's periods (12 monthly, 4 quarterly, 24 hourly, 1
// otherwise; Hyndman & Koehler 2006). OWA is M4's ½·(sMAPE/sMAPE_Naive2
// + MASE/MASE_Naive2), computed on the series both the model and Naive2
// forecast. Coverage is the share of outcomes inside the central 80% and
// 95% bands; MSIS is M4's scaled interval score (Gneiting & Raftery
// 2007), given for both levels. The total over each series' horizon is
// compared with the central band of the totals of 1000 sample paths (the
// forecast's own paths, or drawn from the fitted model, seeded by the
// series' position), for models that give paths. Every measure of a row
// averages over all the (series, step) points that enter it, as the
// published M3 table does for all 3,003 series. Missing test values are
// left out.
//
// Each model is first fitted to every series, then (for a model whose
// fits share information across the batch) the fits are pooled, then
// every series is forecast and scored. The automatic forecaster ("auto")
// pools the out-of-sample errors behind its calibrated bands across the
// scored series of the same frequency and route (accuracy.PoolPilots), as
// a catalogue run would; "auto-raw" is the same forecaster with its
// calibration switched off.
//
// A series whose fit or forecast fails, or whose forecast or band holds a
// NaN or an infinity, is counted as failed and listed; the measures of
// that model cover the other series. The results do not depend on the
// number of workers: each series is fitted on its own and stored by its
// position. Times are the sum over series of the time to fit and
// forecast each (about what one core would need) and, per model, the
// wall-clock and the process's CPU time; they vary with the machine's
// load, the scores do not.
//
// When the folder is the M3 data (its metadata file is m3_series.csv),
// the published sMAPE of the competition's benchmarks and of Theta are
// printed beside ours (../shared/data/README.md).
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"runtime"
	"sync"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/almanac-go/almanac"
)

func main() {
	if err := run(context.Background(), os.Args[1:], os.Stdout, os.Stderr); err != nil {
		if !errors.Is(err, flag.ErrHelp) {
			fmt.Fprintln(os.Stderr, err)
		}
		os.Exit(2)
	}
}

// options are the parsed flags.
type options struct {
	data    string
	models  []entry
	subset  int
	json    bool
	workers int
	why     bool
	dump    string
}

func parseFlags(args []string, stderr io.Writer) (*options, error) {
	fs := flag.NewFlagSet("evaluate", flag.ContinueOnError)
	fs.SetOutput(stderr)
	o := &options{}
	var models string
	var list bool
	fs.StringVar(&o.data, "data", "../shared/data/m3", "data folder laid out like the M3 folder")
	fs.StringVar(&models, "models", "auto,combo,ets,arima,theta,naive2", "comma-separated model names (see -list)")
	fs.IntVar(&o.subset, "subset", 0, "score at most `N` series of each category, spread evenly (0: all)")
	fs.BoolVar(&o.json, "json", false, "print one JSON object per line per model and category")
	fs.IntVar(&o.workers, "workers", 0, "series fitted at once (0: GOMAXPROCS)")
	fs.BoolVar(&list, "list", false, "list the model names and exit")
	fs.StringVar(&o.dump, "forecasts", "", "also write every forecast to `FILE` (CSV: model, series, category, step, actual, point, lower and upper bounds)")
	fs.BoolVar(&o.why, "why", false, "print the error of every failed series (default: three per model)")
	if err := fs.Parse(args); err != nil {
		return nil, err
	}
	if fs.NArg() > 0 {
		return nil, fmt.Errorf("evaluate: unexpected arguments %q", fs.Args())
	}
	if list {
		for _, e := range registry() {
			fmt.Fprintf(stderr, "  %-8s %s\n", e.name, e.about)
		}
		return nil, flag.ErrHelp
	}
	if o.subset < 0 || o.workers < 0 {
		return nil, fmt.Errorf("evaluate: -subset and -workers must not be negative")
	}
	var err error
	if o.models, err = pickModels(models); err != nil {
		return nil, err
	}
	return o, nil
}

// run is the program; main only maps its error to an exit status.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	o, err := parseFlags(args, stderr)
	if err != nil {
		return err
	}
	d, err := readDir(o.data)
	if err != nil {
		return err
	}
	idx := pick(d, o.subset)
	if len(idx) == 0 {
		return fmt.Errorf("evaluate: %w: no series to score", errData)
	}
	workers := o.workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	var runs []modelRun
	var ref []result
	for _, e := range o.models {
		mr := evaluateModel(ctx, e, d.items, idx, workers, stderr)
		if err := ctx.Err(); err != nil {
			return err
		}
		runs = append(runs, mr)
		if e.name == "naive2" {
			ref = mr.res
		}
	}
	if ref == nil {
		// OWA needs Naive2 on the same series even when it is not shown.
		for _, e := range registry() {
			if e.name == "naive2" {
				ref = evaluateModel(ctx, e, d.items, idx, workers, stderr).res
			}
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if o.dump != "" {
		if err := writeForecasts(o.dump, d, idx, runs); err != nil {
			return err
		}
	}
	rep := buildReport(d, idx, runs, ref, o.subset)
	rep.showWhy = o.why
	if o.json {
		return rep.writeJSON(stdout)
	}
	return rep.writeText(stdout)
}

// pick returns the positions of the series to score: all of them, or at
// most n per category spread evenly through the category.
func pick(d *dataset, n int) []int {
	byCat := map[string][]int{}
	for i, it := range d.items {
		byCat[it.category] = append(byCat[it.category], i)
	}
	var out []int
	for _, c := range d.cats {
		all := byCat[c]
		if n == 0 || n >= len(all) {
			out = append(out, all...)
			continue
		}
		for k := range n {
			out = append(out, all[(2*k+1)*len(all)/(2*n)])
		}
	}
	return out
}

// modelRun is one model's results on the chosen series.
type modelRun struct {
	e       entry
	res     []result // by position in the data set; only the chosen ones are set
	wall    float64
	cpu     float64
	workers int
}

// evaluateModel fits e.model to every chosen series on a pool of workers
// and stores each result at the series' position.
func evaluateModel(ctx context.Context, e entry, items []item, idx []int, workers int, stderr io.Writer) modelRun {
	mr := modelRun{e: e, res: make([]result, len(items)), workers: min(workers, len(idx))}
	cpu0 := cpuSeconds()
	t0 := time.Now()
	var next, done, failed atomic.Int64
	stop := make(chan struct{})
	var tick sync.WaitGroup
	tick.Go(func() {
		t := time.NewTicker(5 * time.Second)
		defer t.Stop()
		for {
			select {
			case <-stop:
				return
			case <-t.C:
				fmt.Fprintf(stderr, "evaluate: %s: %d/%d series fitted, %.0f s\n", e.name, done.Load(), len(idx), time.Since(t0).Seconds())
			}
		}
	})
	// Fit every series, then (for a model that shares information across
	// a batch) pool, then forecast and score every series.
	fits := make([]almanac.BatchResult, len(idx))
	secs := make([]float64, len(idx))
	var wg sync.WaitGroup
	for range mr.workers {
		wg.Go(func() {
			for {
				k := int(next.Add(1) - 1)
				if k >= len(idx) || ctx.Err() != nil {
					return
				}
				it := items[idx[k]]
				f, s, err := fitOne(ctx, e.model, it)
				fits[k], secs[k] = almanac.BatchResult{Key: it.id, Fitted: f, Err: err}, s
				done.Add(1)
			}
		})
	}
	wg.Wait()
	if e.pool != nil && ctx.Err() == nil {
		pooled, err := e.pool(fits)
		if err == nil && len(pooled) == len(fits) {
			fits = pooled
		} else {
			fmt.Fprintf(stderr, "evaluate: %s: pooling across the batch failed, each series keeps its own: %v\n", e.name, err)
		}
	}
	next.Store(0)
	for range mr.workers {
		wg.Go(func() {
			for {
				k := int(next.Add(1) - 1)
				if k >= len(idx) || ctx.Err() != nil {
					return
				}
				i := idx[k]
				var r result
				if fits[k].Err != nil {
					r = result{err: fits[k].Err}
				} else {
					r = scoreFit(fits[k].Fitted, secs[k], items[i], uint64(i))
				}
				mr.res[i] = r
				if r.err != nil {
					failed.Add(1)
				}
			}
		})
	}
	wg.Wait()
	close(stop)
	tick.Wait()
	mr.wall = time.Since(t0).Seconds()
	mr.cpu = cpuSeconds() - cpu0
	fmt.Fprintf(stderr, "evaluate: %s: %d series in %.1f s wall-clock, %.1f CPU-seconds, %d failed\n", e.name, len(idx), mr.wall, mr.cpu, failed.Load())
	return mr
}

// cpuSeconds is the user and system CPU time of the process so far.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	tv := func(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }
	return tv(ru.Utime) + tv(ru.Stime)
}
