// Command speed times named workloads of the library and prints one JSON
// line per workload, for the README's speed table and for comparisons with
// the reference software (the scripts in reference/).
//
// Run it from the repository root:
//
//	go run ./internal/cmd/speed                         # every workload
//	go run ./internal/cmd/speed -workloads airline-fit,stl-monthly -repeats 9
//	go run ./internal/cmd/speed -list                   # the workloads and what they time
//
// Each line has the fields
//
//	workload        the workload's name
//	n               its size: observations, or series for a catalogue
//	ns_per_op       CPU time (user + system, of the whole process) per
//	                operation in nanoseconds, the median over -repeats
//	                repeats; a catalogue's operation is one series
//	wall_ns_per_op  the same in wall-clock time
//	allocs_per_op   heap allocations per operation (bytes_per_op: bytes)
//	repeats         repeats timed; ops_per_repeat: operations in each
//	check           a summary of the result (a log-likelihood, a model),
//	                so that runs and other software can be compared
//	load1           the one-minute load average when the workload started
//	                (Linux; -1 elsewhere)
//
// and, for the catalogue workloads (one operation per series of a data
// set), per_series_max_ns and per_series_max_key (the slowest series,
// CPU time, the median of its repeats) and per_series_median_ns. A
// catalogue's repeats default to 1 (-series-repeats).
//
// CPU time is reported rather than wall time because the development
// machines are shared: on a busy machine the wall time of a single-thread
// computation includes the time other processes hold the core, its CPU
// time much less so (it is still inflated by contention for caches and
// memory bandwidth). On an idle machine the two agree. With -cpu 1 (the
// default, GOMAXPROCS = 1) the process runs the workload on one thread
// plus the garbage collector's share.
//
// Inputs: R's AirPassengers and co2 are built in (data.go); the M3 data
// and the weekly CO2 record are read from the shared data folder (-data,
// -co2; by default ../shared/data beside the module root, or
// ALMANAC_M3_DIR); the quickstart hierarchy from
// examples/quickstart/data/garden_supplies.csv (-quickstart). -inputs DIR
// writes the inputs of the workloads the reference scripts repeat
// (reference/timings.R, reference/timings.py) as one-column CSV files, so
// that they time the same data.
package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
)

func main() {
	if err := run(os.Args[1:], os.Stdout, os.Stderr); err != nil {
		fmt.Fprintln(os.Stderr, "speed:", err)
		os.Exit(1)
	}
}

// config holds what the workloads read.
type config struct {
	m3Dir      string // folder of the M3 category files
	co2Weekly  string // the weekly CO2 record (CSV date,co2)
	quickstart string // the quickstart's garden_supplies.csv
	tiny       bool   // small inputs (the test)
}

func run(args []string, stdout, stderr io.Writer) error {
	fs := flag.NewFlagSet("speed", flag.ContinueOnError)
	fs.SetOutput(stderr)
	names := fs.String("workloads", "", "comma-separated workloads to run (default: all; see -list)")
	repeats := fs.Int("repeats", 5, "timed repeats of each workload (the median is reported)")
	seriesRepeats := fs.Int("series-repeats", 1, "timed repeats of the catalogue workloads (passes over the data set)")
	cpu := fs.Int("cpu", 1, "GOMAXPROCS while timing")
	minTime := fs.Float64("min-time", 0.25, "CPU seconds each repeat of a single-operation workload runs at least")
	dataDir := fs.String("data", "", "folder of the M3 files (default: ALMANAC_M3_DIR, else ../shared/data/m3 beside the module root)")
	co2 := fs.String("co2", "", "the weekly CO2 CSV (default: co2_weekly.csv beside the M3 folder)")
	quick := fs.String("quickstart", "", "the quickstart's garden_supplies.csv (default: examples/quickstart/data/ under the module root)")
	inputs := fs.String("inputs", "", "write the reference workloads' inputs as CSV files into this folder and exit")
	list := fs.Bool("list", false, "list the workloads and exit")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return fmt.Errorf("unexpected arguments %q", fs.Args())
	}
	if *list {
		for _, w := range workloads {
			fmt.Fprintf(stdout, "%-18s %s\n", w.name, w.about)
		}
		return nil
	}
	cfg, err := resolve(*dataDir, *co2, *quick)
	if err != nil {
		return err
	}
	if *inputs != "" {
		return writeInputs(cfg, *inputs)
	}
	if *repeats < 1 || *seriesRepeats < 1 || *cpu < 1 || !(*minTime >= 0) {
		return fmt.Errorf("-repeats, -series-repeats and -cpu must be at least 1, -min-time not negative")
	}
	chosen, err := pick(*names)
	if err != nil {
		return err
	}
	prev := runtime.GOMAXPROCS(*cpu)
	defer runtime.GOMAXPROCS(prev)
	enc := json.NewEncoder(stdout)
	for _, w := range chosen {
		res, err := measure(w, cfg, timing{repeats: *repeats, seriesRepeats: *seriesRepeats, minTime: *minTime})
		if err != nil {
			return fmt.Errorf("%s: %w", w.name, err)
		}
		if err := enc.Encode(res); err != nil {
			return err
		}
	}
	return nil
}

// pick returns the workloads named in the comma list (all when empty),
// in the list's order.
func pick(list string) ([]workload, error) {
	if strings.TrimSpace(list) == "" {
		return workloads, nil
	}
	var out []workload
	for _, name := range strings.Split(list, ",") {
		name = strings.TrimSpace(name)
		i := slices.IndexFunc(workloads, func(w workload) bool { return w.name == name })
		if i < 0 {
			var known []string
			for _, w := range workloads {
				known = append(known, w.name)
			}
			return nil, fmt.Errorf("unknown workload %q (known: %s)", name, strings.Join(known, ", "))
		}
		out = append(out, workloads[i])
	}
	return out, nil
}

// resolve fills in the default input locations.
func resolve(m3, co2, quick string) (config, error) {
	root, rootErr := moduleRoot()
	if m3 == "" {
		m3 = os.Getenv("ALMANAC_M3_DIR")
	}
	if m3 == "" {
		if rootErr != nil {
			return config{}, rootErr
		}
		m3 = filepath.Join(root, "..", "shared", "data", "m3")
	}
	if co2 == "" {
		co2 = filepath.Join(m3, "..", "co2_weekly.csv")
	}
	if quick == "" {
		if rootErr != nil {
			return config{}, rootErr
		}
		quick = filepath.Join(root, "examples", "quickstart", "data", "garden_supplies.csv")
	}
	return config{m3Dir: m3, co2Weekly: co2, quickstart: quick}, nil
}

// moduleRoot returns the nearest directory at or above the working
// directory that holds a go.mod.
func moduleRoot() (string, error) {
	wd, err := os.Getwd()
	if err != nil {
		return "", err
	}
	for d := wd; ; d = filepath.Dir(d) {
		if _, err := os.Stat(filepath.Join(d, "go.mod")); err == nil {
			return d, nil
		}
		if filepath.Dir(d) == d {
			return "", fmt.Errorf("no go.mod at or above %s: run from the repository, or give -data and -quickstart", wd)
		}
	}
}
