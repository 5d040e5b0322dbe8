// Command gendata writes invented weekly, daily and hourly series in the
// layout of the shared M3 folder, for scoring forecasting routes with the
// evaluation program where no real catalogue of such series is at hand.
// The series are drawn from the models of package internal/synth (invented
// scenarios: hardware stores, libraries, substations and the like; see
// its documentation); nothing is real data.
//
// Usage:
//
//	go run ./internal/cmd/evaluate/gendata -out /tmp/almanac-synth
//	go run ./internal/cmd/evaluate -data /tmp/almanac-synth -models auto,theta,snaive
//
// Flags: -out DIR (required), -seed N (default 1), -weekly N, -daily N,
// -hourly N (series of each frequency; defaults 150, 120 and 80). The
// same flags write the same files. The files are a few megabytes; they
// are generated, not kept in the repository.
package main

import (
	"flag"
	"fmt"
	"os"

	"github.com/almanac-go/almanac/internal/synth"
)

func main() {
	var cfg synth.Config
	out := flag.String("out", "", "folder to write (created if needed)")
	flag.Uint64Var(&cfg.Seed, "seed", 1, "random seed")
	flag.IntVar(&cfg.Weekly, "weekly", 150, "number of weekly series")
	flag.IntVar(&cfg.Daily, "daily", 120, "number of daily series")
	flag.IntVar(&cfg.Hourly, "hourly", 80, "number of hourly series")
	flag.Parse()
	if *out == "" || cfg.Weekly < 0 || cfg.Daily < 0 || cfg.Hourly < 0 || flag.NArg() > 0 {
		flag.Usage()
		os.Exit(2)
	}
	ss := synth.Generate(cfg)
	if err := synth.WriteDir(*out, ss); err != nil {
		fmt.Fprintln(os.Stderr, "gendata:", err)
		os.Exit(1)
	}
	fmt.Fprintf(os.Stderr, "gendata: %d weekly, %d daily and %d hourly series written to %s\n", cfg.Weekly, cfg.Daily, cfg.Hourly, *out)
}
