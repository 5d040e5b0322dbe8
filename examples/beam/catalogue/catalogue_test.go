package catalogue_test

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/examples/beam/catalogue"
)

func TestGenerate(t *testing.T) {
	opt := catalogue.Options{Stores: 7, Departments: 3, Lines: 4, Months: 30, Seed: 5}
	a, err := catalogue.Generate(opt)
	if err != nil {
		t.Fatal(err)
	}
	t.Run("size and keys", func(t *testing.T) {
		if len(a) != 7*3*4 {
			t.Fatalf("%d lines, want 84", len(a))
		}
		seen := map[string]bool{}
		for _, ln := range a {
			if seen[ln.Key] {
				t.Errorf("key %s twice", ln.Key)
			}
			seen[ln.Key] = true
			if len(ln.Values) != 30 {
				t.Errorf("%s: %d months", ln.Key, len(ln.Values))
			}
			for _, v := range ln.Values {
				if v < 0 || v != math.Round(v) {
					t.Errorf("%s: value %v is not a whole number of units", ln.Key, v)
				}
			}
		}
	})
	t.Run("deterministic", func(t *testing.T) {
		b, _ := catalogue.Generate(opt)
		for i := range a {
			if a[i].Key != b[i].Key || !slices.Equal(a[i].Values, b[i].Values) {
				t.Fatalf("line %d differs between two runs", i)
			}
		}
		// A store's data do not depend on how many stores follow it.
		fewer, _ := catalogue.Generate(catalogue.Options{Stores: 2, Departments: 3, Lines: 4, Months: 30, Seed: 5})
		for i := range fewer {
			if !slices.Equal(fewer[i].Values, a[i].Values) {
				t.Fatalf("line %s changes with the number of stores", a[i].Key)
			}
		}
	})
	t.Run("bad options", func(t *testing.T) {
		for _, o := range []catalogue.Options{{Stores: -1}, {Departments: 11}, {Lines: 100}, {Stores: 1000}} {
			if _, err := catalogue.Generate(o); !errors.Is(err, catalogue.ErrInvalid) {
				t.Errorf("%+v: %v, want ErrInvalid", o, err)
			}
		}
	})
}

// TestWriteReadsBack checks that the files read back with almanac.ReadCSV
// into exactly the generated series.
func TestWriteReadsBack(t *testing.T) {
	dir := t.TempDir()
	lines, err := catalogue.Write(dir, catalogue.Options{Stores: 3, Departments: 2, Lines: 2, Months: 24, Files: 2})
	if err != nil {
		t.Fatal(err)
	}
	files, _ := filepath.Glob(filepath.Join(dir, catalogue.DataPattern))
	if len(files) != 2 {
		t.Fatalf("%d data files, want 2", len(files))
	}
	got := map[string]almanac.Series{}
	for _, name := range files {
		f, err := os.Open(name)
		if err != nil {
			t.Fatal(err)
		}
		ys, err := almanac.ReadCSV(f, almanac.CSVOptions{})
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		for _, y := range ys {
			got[y.Key] = y
		}
	}
	if len(got) != len(lines) {
		t.Fatalf("read %d series, wrote %d", len(got), len(lines))
	}
	for _, ln := range lines {
		y := got[ln.Key]
		if !y.Start.Equal(ln.Start) || !slices.Equal(y.Values, ln.Values) {
			t.Errorf("%s does not read back as written", ln.Key)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, catalogue.PlacesFile)); err != nil {
		t.Error(err)
	}
}
