package m3data

import (
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// Series is one M3 series split as in the competition.
type Series struct {
	ID          string
	Train, Test []float64
}

// Dir returns the directory holding the M3 files.
func Dir() (string, error) {
	if d := os.Getenv("ALMANAC_M3_DIR"); d != "" {
		return d, nil
	}
	wd, err := os.Getwd()
	if err != nil {
		return "", err
	}
	for d := wd; ; d = filepath.Dir(d) {
		if _, err := os.Stat(filepath.Join(d, "go.mod")); err == nil {
			return filepath.Join(d, "..", "shared", "data", "m3"), nil
		}
		if filepath.Dir(d) == d {
			return "", fmt.Errorf("m3data: no go.mod above %s", wd)
		}
	}
}

// Load reads one category file (m3_yearly.csv, m3_quarterly.csv,
// m3_monthly.csv, m3_other.csv), series in file order. When the data are
// not available it skips the test, except under CI (CI set in the
// environment), where the shared folder is always present and a missing
// file is a failure.
func Load(tb testing.TB, file string) []Series {
	tb.Helper()
	dir, err := Dir()
	if err == nil {
		var fh *os.File
		if fh, err = os.Open(filepath.Join(dir, file)); err == nil {
			defer fh.Close()
			out, err := parse(fh, file)
			if err != nil {
				tb.Fatal(err)
			}
			return out
		}
	}
	if os.Getenv("CI") != "" {
		tb.Fatalf("M3 data not available under CI: %v", err)
	}
	tb.Skipf("M3 data not available (%v); set ALMANAC_M3_DIR or place the shared data folder beside the checkout", err)
	return nil
}

// Read reads one category file from dir, series in file order, for
// programs (the speed program) that run outside a test.
func Read(dir, file string) ([]Series, error) {
	fh, err := os.Open(filepath.Join(dir, file))
	if err != nil {
		return nil, fmt.Errorf("m3data: %w", err)
	}
	defer fh.Close()
	return parse(fh, file)
}

func parse(fh *os.File, file string) ([]Series, error) {
	rows, err := csv.NewReader(fh).ReadAll()
	if err != nil {
		return nil, fmt.Errorf("m3data: %s: %w", file, err)
	}
	if len(rows) < 2 {
		return nil, fmt.Errorf("m3data: %s: no rows", file)
	}
	var out []Series
	index := map[string]int{}
	for line, r := range rows[1:] {
		if len(r) < 5 {
			return nil, fmt.Errorf("m3data: %s line %d: %d columns, want 5", file, line+2, len(r))
		}
		v, err := strconv.ParseFloat(r[3], 64)
		if err != nil {
			return nil, fmt.Errorf("m3data: %s line %d: %w", file, line+2, err)
		}
		k, ok := index[r[0]]
		if !ok {
			k = len(out)
			index[r[0]] = k
			out = append(out, Series{ID: r[0]})
		}
		switch r[4] {
		case "train":
			out[k].Train = append(out[k].Train, v)
		case "test":
			out[k].Test = append(out[k].Test, v)
		default:
			return nil, fmt.Errorf("m3data: %s line %d: unknown part %q", file, line+2, r[4])
		}
	}
	return out, nil
}
