package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/almanac-go/almanac/internal/m3data"
)

// TestWorkloads runs every workload once on small inputs (three M3
// series, a 240-value hourly series, ten years of weekly CO2) and checks
// the output line: every field present and sensible. The M3 data and the
// weekly CO2 record come from the shared data folder (skipped outside CI
// when it is absent, as internal/m3data does).
func TestWorkloads(t *testing.T) {
	m3data.Load(t, "m3_other.csv") // skips when the shared data are absent
	dir, err := m3data.Dir()
	if err != nil {
		t.Fatal(err)
	}
	cfg, err := resolve(dir, "", "")
	if err != nil {
		t.Fatal(err)
	}
	cfg.tiny = true
	for _, w := range workloads {
		t.Run(w.name, func(t *testing.T) {
			res, err := measure(w, cfg, timing{repeats: 1, seriesRepeats: 1})
			if err != nil {
				t.Fatal(err)
			}
			if res.Workload != w.name || res.N <= 0 || !(res.NsPerOp > 0) || !(res.WallNsPerOp > 0) ||
				res.AllocsPerOp < 0 || res.Repeats != 1 || res.OpsPerRepeat < 1 || res.Check == "" || res.GOMAXPROCS < 1 {
				t.Errorf("implausible result %+v", res)
			}
			if res.PerSeriesMaxKey != "" && !(res.PerSeriesMaxNs >= res.PerSeriesMedianNs) {
				t.Errorf("slowest series %v ns below the median %v ns", res.PerSeriesMaxNs, res.PerSeriesMedianNs)
			}
			for _, v := range []float64{res.NsPerOp, res.WallNsPerOp, res.AllocsPerOp, res.BytesPerOp, res.PerSeriesMaxNs} {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Errorf("non-finite field in %+v", res)
				}
			}
		})
	}
}

// TestRun checks the command line: -list, an unknown workload, one
// workload's JSON line, and -inputs.
func TestRun(t *testing.T) {
	var out, errOut bytes.Buffer
	if err := run([]string{"-list"}, &out, &errOut); err != nil {
		t.Fatal(err)
	}
	if got := strings.Count(out.String(), "\n"); got != len(workloads) {
		t.Errorf("-list printed %d lines, want %d", got, len(workloads))
	}
	if err := run([]string{"-workloads", "no-such"}, &out, &errOut); err == nil || !strings.Contains(err.Error(), "unknown workload") {
		t.Errorf("unknown workload: %v", err)
	}
	out.Reset()
	if err := run([]string{"-workloads", "airline-fit", "-repeats", "1", "-min-time", "0"}, &out, &errOut); err != nil {
		t.Fatal(err)
	}
	var line map[string]any
	if err := json.Unmarshal(out.Bytes(), &line); err != nil {
		t.Fatalf("%v in %q", err, out.String())
	}
	for _, k := range []string{"workload", "n", "ns_per_op", "allocs_per_op", "check"} {
		if _, ok := line[k]; !ok {
			t.Errorf("no %q in %s", k, out.String())
		}
	}
	// The check field carries the log-likelihood of the airline model on
	// log AirPassengers: R 4.2's arima gives 244.6995 (reference fixture
	// arima/testdata/reference/airpassengers_log_airline.json, method
	// "ML"), which arima's reference test checks to the fixture's
	// tolerance; here only the leading digits.
	if c, _ := line["check"].(string); !strings.HasPrefix(c, "ARIMA(0,1,1)×(0,1,1)_12 loglik 244.") {
		t.Errorf("check %q", c)
	}

	m3data.Load(t, "m3_other.csv")
	dir, err := m3data.Dir()
	if err != nil {
		t.Fatal(err)
	}
	in := t.TempDir()
	if err := run([]string{"-data", dir, "-inputs", in}, &out, &errOut); err != nil {
		t.Fatal(err)
	}
	for name, n := range map[string]int{"airpassengers.csv": 144, "co2_monthly.csv": 468, "co2_weekly_filled.csv": 2284} {
		b, err := os.ReadFile(filepath.Join(in, name))
		if err != nil {
			t.Fatal(err)
		}
		if got := strings.Count(string(b), "\n") - 1; got != n {
			t.Errorf("%s: %d values, want %d", name, got, n)
		}
		if strings.Contains(string(b), "NaN") {
			t.Errorf("%s has missing values", name)
		}
	}
}

// TestInterpolate: gaps are filled on the straight line between their
// neighbours; missing values at the ends are refused.
func TestInterpolate(t *testing.T) {
	v := []float64{1, math.NaN(), math.NaN(), 4, 5, math.NaN(), 7}
	if err := interpolate(v); err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{1, 2, 3, 4, 5, 6, 7} {
		if math.Abs(v[i]-want) > 1e-15 {
			t.Errorf("v[%d] = %v, want %v", i, v[i], want)
		}
	}
	for _, bad := range [][]float64{{math.NaN(), 1}, {1, math.NaN()}} {
		if interpolate(bad) == nil {
			t.Errorf("%v accepted", bad)
		}
	}
}
