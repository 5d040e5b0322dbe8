// Command beam runs almanac's nightly forecasting job as an Apache Beam
// pipeline: it reads long-format CSV files of many series (and
// optionally a file placing each series in a hierarchy), forecasts every
// series, reconciles every hierarchy on one worker, and writes forecasts
// with bands, backtest accuracy, a status row for every series and a
// dead-letter file for every rejected row and failed series.
//
// With -generate N it first writes an invented catalogue of Tallow &
// Finch Hardware (a fictional chain of hardware stores) of about N
// monthly series, with its store / department / product-line hierarchy,
// and runs on that:
//
//	go -C examples/beam run . -generate 20000 -work /tmp/tallow
//
// The pipeline runs on Beam's in-process runner (prism) by default; the
// same binary submits it to a Flink or Spark cluster through Beam's
// portable job service (see the README).
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/almanac-go/almanac/examples/beam/catalogue"
	"github.com/almanac-go/almanac/examples/beam/nightly"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners"

	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/core/runtime/exec/optimized"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem/local"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/flink"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/spark"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/universal"
)

var (
	input       = flag.String("input", "", "file pattern of the long-format data files (columns series, period, value)")
	hierarchy   = flag.String("hierarchy", "", "file pattern of the files placing each series in a hierarchy (columns series, within); empty for none")
	output      = flag.String("output", "", "directory for the output files (default: WORK/out with -generate)")
	model       = flag.String("model", nightly.DefaultModel, "forecasting model: "+strings.Join(nightly.ModelNames(), ", "))
	horizon     = flag.Int("horizon", 12, "periods to forecast")
	levels      = flag.String("levels", "80,95", "prediction band levels, percentages, comma-separated")
	backtest    = flag.Int("backtest", 0, "rolling origins of each series' backtest against the benchmarks (0: none)")
	method      = flag.String("reconcile", nightly.ReconcileMinT, "reconciliation: mint, mint-sample, wls, structural, ols, bottom-up or none")
	nonNegative = flag.Bool("nonnegative", true, "keep reconciled bottom-level forecasts at or above zero")
	paths       = flag.Int("paths", 0, "joint sample paths per hierarchy (0: the library's default, 1000)")
	seed        = flag.Uint64("seed", 1, "seed of the random streams behind the bands and the reconciliation (and of -generate)")
	ownErrors   = flag.Bool("own-errors", false, "calibrate each series' bands on its own errors only (default: pool the errors of each hierarchy or bucket)")
	fillGaps    = flag.Bool("fill-gaps", false, "fill missing periods inside a series with missing values instead of failing it")
	shards      = flag.Int("shards", 4, "files per output")
	workers     = flag.Int("fit-workers", 0, "goroutines fitting the series of one group (0: GOMAXPROCS)")
	buckets     = flag.Int("buckets", nightly.DefaultBuckets, "groups the series outside any hierarchy are dealt into")
	generate    = flag.Int("generate", 0, "first write an invented catalogue of about this many series to WORK and run on it")
	work        = flag.String("work", "", "directory for the generated catalogue (with -generate)")
)

func main() {
	flag.Parse()
	beam.Init()
	if err := run(context.Background()); err != nil {
		fmt.Fprintln(os.Stderr, "beam:", err)
		os.Exit(1)
	}
}

func run(ctx context.Context) error {
	opt := nightly.Options{
		Input: *input, Hierarchy: *hierarchy, Output: *output,
		Model: *model, Horizon: *horizon, Backtest: *backtest,
		Reconcile: *method, NonNegative: *nonNegative, Paths: *paths, Seed: *seed,
		OwnErrors: *ownErrors, FillGaps: *fillGaps, Shards: *shards, Workers: *workers, Buckets: *buckets,
	}
	for _, f := range strings.Split(*levels, ",") {
		if f = strings.TrimSpace(f); f == "" {
			continue
		}
		l, err := strconv.ParseFloat(f, 64)
		if err != nil {
			return fmt.Errorf("-levels: %w", err)
		}
		opt.Levels = append(opt.Levels, l)
	}
	if *generate > 0 {
		if *work == "" {
			return errors.New("-generate needs -work DIR")
		}
		in := filepath.Join(*work, "in")
		stores := max(1, (*generate+99)/100) // 10 departments × 10 lines each
		lines, err := catalogue.Write(in, catalogue.Options{Stores: stores, Seed: *seed})
		if err != nil {
			return err
		}
		fmt.Printf("wrote %d series of %d stores to %s\n", len(lines), stores, in)
		opt.Input = filepath.Join(in, catalogue.DataPattern)
		opt.Hierarchy = filepath.Join(in, catalogue.PlacesFile)
		if opt.Output == "" {
			opt.Output = filepath.Join(*work, "out")
		}
	}
	if opt.Output != "" && !strings.Contains(opt.Output, "://") {
		// Shards of an earlier run with another shard count would be mixed in.
		for _, o := range nightly.Outputs {
			old, _ := filepath.Glob(filepath.Join(opt.Output, o+"-*-of-*.csv"))
			for _, f := range old {
				if err := os.Remove(f); err != nil {
					return err
				}
			}
		}
	}
	p, s := beam.NewPipelineWithRoot()
	if err := nightly.Build(s, opt); err != nil {
		return err
	}
	runner := *runners.Runner
	if runner == "" {
		runner = "prism"
	}
	began := time.Now()
	res, err := beam.Run(ctx, runner, p)
	if err != nil {
		return err
	}
	fmt.Printf("pipeline finished on %s in %.1f s; outputs in %s\n", runner, time.Since(began).Seconds(), opt.Output)
	if res != nil {
		var rows []string
		for _, c := range res.Metrics().AllMetrics().Counters() {
			if c.Key.Namespace == "almanac" {
				rows = append(rows, fmt.Sprintf("  %-36s %d", c.Key.Name, c.Committed))
			}
		}
		slices.Sort(rows)
		fmt.Println("counters:")
		fmt.Println(strings.Join(rows, "\n"))
	}
	return nil
}
