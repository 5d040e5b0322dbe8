package nightly_test

import (
	"context"
	"flag"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/examples/beam/catalogue"
	"github.com/almanac-go/almanac/examples/beam/nightly"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"
)

var benchSeries = flag.Int("catalogue-series", 2000, "series in the benchmarks' generated catalogue (a multiple of 100)")

// cpuSeconds is the process's user and system CPU time so far.
func cpuSeconds(b *testing.B) float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		b.Fatal(err)
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano()).Seconds()
}

// benchCatalogue writes the benchmark catalogue (Tallow & Finch
// Hardware, -catalogue-series series of 60 months) once per benchmark.
func benchCatalogue(b *testing.B) (dir string, series int) {
	b.Helper()
	dir = b.TempDir()
	lines, err := catalogue.Write(filepath.Join(dir, "in"), catalogue.Options{Stores: max(1, *benchSeries/100)})
	if err != nil {
		b.Fatal(err)
	}
	return dir, len(lines)
}

// report adds series per second (wall) and CPU seconds per run.
func report(b *testing.B, series int, cpu0 float64) {
	b.ReportMetric(float64(series*b.N)/b.Elapsed().Seconds(), "series/s")
	b.ReportMetric((cpuSeconds(b)-cpu0)/float64(b.N), "cpu-s/op")
}

// BenchmarkPipeline runs the whole pipeline on Beam's in-process prism
// runner: reading the CSV files, assembling, forecasting 12 months with
// 80% and 95% bands by the default model (the automatic forecaster
// accuracy.Pilot, its calibration errors pooled per group), and writing
// the outputs. "flat" forecasts every series on its own (no
// hierarchy file: the work BenchmarkBatchFit does); "reconciled" adds the
// store / department hierarchy: the aggregates are forecast too and each
// store is reconciled (MinT, 1000 joint sample paths).
func BenchmarkPipeline(b *testing.B) {
	dir, n := benchCatalogue(b)
	in := filepath.Join(dir, "in")
	for _, bc := range []struct {
		name      string
		hierarchy string
	}{
		{"flat", ""},
		{"reconciled", filepath.Join(in, catalogue.PlacesFile)},
	} {
		b.Run(bc.name, func(b *testing.B) {
			b.ReportAllocs()
			cpu0 := cpuSeconds(b)
			for b.Loop() {
				p, s := beam.NewPipelineWithRoot()
				err := nightly.Build(s, nightly.Options{
					Input: filepath.Join(in, catalogue.DataPattern), Hierarchy: bc.hierarchy,
					Output: filepath.Join(dir, "out-"+bc.name), NonNegative: true,
				})
				if err != nil {
					b.Fatal(err)
				}
				if _, err := beam.Run(context.Background(), "prism", p); err != nil {
					b.Fatal(err)
				}
			}
			report(b, n, cpu0)
		})
	}
}

// BenchmarkBatchFit does the flat pipeline's work with the library alone,
// on the same catalogue: almanac.ReadCSV on each data file,
// almanac.BatchFit with the default model (accuracy.Pilot) on GOMAXPROCS
// workers, accuracy.PoolPilots over the whole catalogue, almanac.ForecastAll (12 months, 80% and 95%) and
// almanac.WriteForecastCSV.
func BenchmarkBatchFit(b *testing.B) {
	dir, n := benchCatalogue(b)
	files, err := filepath.Glob(filepath.Join(dir, "in", catalogue.DataPattern))
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	cpu0 := cpuSeconds(b)
	for b.Loop() {
		var ys []almanac.Series
		for _, name := range files {
			f, err := os.Open(name)
			if err != nil {
				b.Fatal(err)
			}
			got, err := almanac.ReadCSV(f, almanac.CSVOptions{})
			f.Close()
			if err != nil {
				b.Fatal(err)
			}
			ys = append(ys, got...)
		}
		m, err := nightly.NewModel("", 0)
		if err != nil {
			b.Fatal(err)
		}
		res, err := almanac.BatchFit(context.Background(), m, ys, almanac.BatchOptions{})
		if err != nil {
			b.Fatal(err)
		}
		// The README's first program: pool the calibration errors of the
		// whole catalogue.
		if res, err = nightly.PoolFits(res, false); err != nil {
			b.Fatal(err)
		}
		out, err := os.Create(filepath.Join(dir, "batch-forecasts.csv"))
		if err != nil {
			b.Fatal(err)
		}
		if err := almanac.WriteForecastCSV(out, almanac.ForecastAll(res, 12, 80, 95), almanac.CSVOptions{}); err != nil {
			b.Fatal(err)
		}
		if err := out.Close(); err != nil {
			b.Fatal(err)
		}
	}
	if n == 0 {
		b.Fatal("empty catalogue")
	}
	report(b, n, cpu0)
}
