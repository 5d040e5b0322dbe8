// Package catalogue generates the invented sales catalogue the Beam
// pipeline example runs on: monthly unit sales of the product lines of
// Tallow & Finch Hardware, a fictional chain of hardware stores, written
// as long-format CSV files with a file that places every product line in
// its store's hierarchy (store / department / product line).
//
// Everything is invented: the chain, its stores, departments, lines and
// numbers. The data are a deterministic function of Options (the seed
// included), so a test can regenerate exactly what a pipeline read.
package catalogue

import (
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"time"
)

// ErrInvalid reports options that cannot make a catalogue.
var ErrInvalid = errors.New("catalogue: invalid options")

// Column names of the files Write makes. The data files hold one row per
// product line and month; the places file one row per product line.
const (
	KeyColumn    = "series" // product line key, e.g. "N03-PNT-07"
	PeriodColumn = "period" // month, "2021-01"
	ValueColumn  = "value"  // units sold
	WithinColumn = "within" // the line's parents from the store down: "N03/PNT"
)

// Departments are the codes and names of the departments every store has,
// in the order Options.Departments takes them; their seasonal profiles
// (below) are invented.
var Departments = []struct{ Code, Name string }{
	{"PNT", "paint and decorating"},
	{"GDN", "garden and outdoor"},
	{"TLS", "hand and power tools"},
	{"PLB", "plumbing"},
	{"ELC", "electrical"},
	{"LBR", "timber and sheet goods"},
	{"FST", "fixings and fasteners"},
	{"HTG", "heating and ventilation"},
	{"LGT", "lighting"},
	{"KBA", "kitchen and bath"},
}

// regions name the store codes' first letter.
var regions = []string{"N", "S", "E", "W", "C"}

// Options sizes the catalogue. The zero value gives 20,000 series: 200
// stores × 10 departments × 10 product lines, 60 months from January
// 2021, seed 1.
type Options struct {
	Stores      int       // number of stores; 0 means 200
	Departments int       // departments per store (1 to 10); 0 means 10
	Lines       int       // product lines per department; 0 means 10
	Months      int       // months of history; 0 means 60
	Start       time.Time // first month; zero means January 2021
	Seed        uint64    // random seed; 0 means 1
	Files       int       // data files to spread the stores over; 0 means 5
}

func (o Options) withDefaults() (Options, error) {
	def := func(p *int, d int) {
		if *p == 0 {
			*p = d
		}
	}
	def(&o.Stores, 200)
	def(&o.Departments, len(Departments))
	def(&o.Lines, 10)
	def(&o.Months, 60)
	def(&o.Files, 5)
	if o.Seed == 0 {
		o.Seed = 1
	}
	if o.Start.IsZero() {
		o.Start = time.Date(2021, time.January, 1, 0, 0, 0, 0, time.UTC)
	}
	switch {
	case o.Stores < 0 || o.Lines < 0 || o.Months < 0 || o.Files < 0:
		return o, fmt.Errorf("%w: negative size in %+v", ErrInvalid, o)
	case o.Departments < 0 || o.Departments > len(Departments):
		return o, fmt.Errorf("%w: %d departments (1 to %d)", ErrInvalid, o.Departments, len(Departments))
	case o.Stores > 999 || o.Lines > 99:
		return o, fmt.Errorf("%w: at most 999 stores and 99 lines per department", ErrInvalid)
	}
	o.Files = min(o.Files, o.Stores)
	return o, nil
}

// Line is one generated product line.
type Line struct {
	Key    string    // e.g. "N03-PNT-07"
	Within string    // its parents from the root: "N03/PNT"
	Start  time.Time // first month
	Values []float64 // units sold each month
}

// Store returns the code of store i (0-based): region letter and number,
// e.g. "N03".
func Store(i int) string { return fmt.Sprintf("%s%02d", regions[i%len(regions)], i/len(regions)+1) }

// Generate returns the catalogue's product lines, store by store,
// department by department, line by line.
func Generate(opt Options) ([]Line, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	out := make([]Line, 0, opt.Stores*opt.Departments*opt.Lines)
	for s := range opt.Stores {
		store := Store(s)
		// One stream per store, so a store's data do not depend on how
		// many stores come before it.
		rng := rand.New(rand.NewPCG(opt.Seed, uint64(s)+1))
		size := math.Exp(rng.NormFloat64() * 0.4) // store footfall relative to the chain
		growth := 0.002 * rng.NormFloat64()       // monthly drift of the store
		for d := range opt.Departments {
			dep := Departments[d]
			for l := range opt.Lines {
				key := fmt.Sprintf("%s-%s-%02d", store, dep.Code, l+1)
				out = append(out, Line{
					Key:    key,
					Within: store + "/" + dep.Code,
					Start:  opt.Start,
					Values: lineSales(rng, d, size, growth, opt.Months, opt.Start),
				})
			}
		}
	}
	return out, nil
}

// lineSales draws one product line's monthly units: a level, the store's
// drift plus the line's own trend, the department's seasonal profile of
// varying strength, and multiplicative noise; rounded to whole units, at
// least zero.
func lineSales(rng *rand.Rand, dep int, size, growth float64, months int, start time.Time) []float64 {
	level := size * math.Exp(3.5+rng.NormFloat64()*0.8)
	trend := growth + 0.004*rng.NormFloat64()
	strength := 0.1 + 0.5*rng.Float64()
	noise := 0.05 + 0.15*rng.Float64()
	phase := int(start.Month()) - 1
	ys := make([]float64, months)
	for t := range ys {
		m := (phase + t) % 12
		season := 1 + strength*profile(dep, m)
		v := level * math.Exp(trend*float64(t)) * season * math.Exp(noise*rng.NormFloat64())
		ys[t] = math.Max(0, math.Round(v))
	}
	return ys
}

// profile is a department's seasonal shape in month m (0 = January),
// between about -1 and 1.
func profile(dep, m int) float64 {
	angle := 2 * math.Pi * float64(m) / 12
	switch Departments[dep].Code {
	case "GDN": // spring and early summer
		return math.Cos(angle - 2*math.Pi*4.5/12)
	case "HTG": // winter
		return math.Cos(angle)
	case "PNT", "LBR": // spring projects, a smaller autumn peak
		return 0.7*math.Cos(angle-2*math.Pi*4/12) + 0.3*math.Cos(2*angle-2*math.Pi*9/12)
	case "LGT": // darker months
		return 0.6 * math.Cos(angle-2*math.Pi*11/12)
	default: // mild summer lift
		return 0.4 * math.Cos(angle-2*math.Pi*6/12)
	}
}

// Files names what Write makes in its directory: the data files match
// DataPattern, the places file is PlacesFile.
const (
	DataPattern = "sales-*.csv"
	PlacesFile  = "places.csv"
)

// Write generates the catalogue and writes it to dir (created if needed):
// Options.Files data files "sales-NN.csv" with the columns KeyColumn,
// PeriodColumn and ValueColumn (stores dealt to the files in turn, values
// written with strconv 'g' -1 so they read back exactly), and PlacesFile
// with KeyColumn and WithinColumn. It returns the lines written.
func Write(dir string, opt Options) ([]Line, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	lines, err := Generate(opt)
	if err != nil {
		return nil, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	perStore := opt.Departments * opt.Lines
	for f := range opt.Files {
		var rows [][]string
		for s := f; s < opt.Stores; s += opt.Files {
			for _, ln := range lines[s*perStore : (s+1)*perStore] {
				for t, v := range ln.Values {
					rows = append(rows, []string{ln.Key, ln.Start.AddDate(0, t, 0).Format("2006-01"), strconv.FormatFloat(v, 'g', -1, 64)})
				}
			}
		}
		name := filepath.Join(dir, fmt.Sprintf("sales-%02d.csv", f+1))
		if err := writeCSV(name, []string{KeyColumn, PeriodColumn, ValueColumn}, rows); err != nil {
			return nil, err
		}
	}
	places := make([][]string, len(lines))
	for i, ln := range lines {
		places[i] = []string{ln.Key, ln.Within}
	}
	if err := writeCSV(filepath.Join(dir, PlacesFile), []string{KeyColumn, WithinColumn}, places); err != nil {
		return nil, err
	}
	return lines, nil
}

func writeCSV(name string, header []string, rows [][]string) (err error) {
	f, err := os.Create(name)
	if err != nil {
		return err
	}
	defer func() {
		if cerr := f.Close(); err == nil {
			err = cerr
		}
	}()
	w := csv.NewWriter(f)
	if err := w.Write(header); err != nil {
		return err
	}
	if err := w.WriteAll(rows); err != nil {
		return err
	}
	return w.Error()
}
