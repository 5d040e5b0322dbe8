package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// errData marks a folder that is not laid out as the program expects.
var errData = errors.New("bad data folder")

// item is one series of the data set, split into its training and test
// parts.
type item struct {
	id       string
	category string // the frequency category from the metadata ("yearly", ...)
	domain   string
	train    almanac.Series
	test     []float64
	m        int // seasonal period of the MASE and MSIS scale (M4's choice)
}

// category describes one frequency category: how its series are dated
// and scaled.
type category struct {
	name string
	freq calendar.Frequency
	// scale is the period of the seasonal naive errors that scale MASE
	// and MSIS: 12 monthly, 4 quarterly, 24 hourly, 1 otherwise, the
	// M4 competition's choice (see published.md, "Forecast-competition
	// definitions").
	scale int
	order int // position in printed tables
}

// categories lists the frequency names the metadata may use. "other" is
// the M3 category of series without a stated frequency; it is read as a
// non-seasonal series on a yearly grid, as the competitions treat it
// (period 1).
var categories = map[string]category{
	"yearly":    {name: "yearly", freq: calendar.Yearly, scale: 1, order: 0},
	"quarterly": {name: "quarterly", freq: calendar.Quarterly, scale: 4, order: 1},
	"monthly":   {name: "monthly", freq: calendar.Monthly, scale: 12, order: 2},
	"weekly":    {name: "weekly", freq: calendar.Weekly, scale: 1, order: 3},
	"daily":     {name: "daily", freq: calendar.Daily, scale: 1, order: 4},
	"hourly":    {name: "hourly", freq: calendar.Hourly, scale: 24, order: 5},
	"other":     {name: "other", freq: calendar.Yearly, scale: 1, order: 6},
}

// meta is one row of the metadata file.
type meta struct {
	id, freq, domain string
	nTrain, h        int
	startYear        int
	startPeriod      int
	line             int
}

// dataset is a folder read in full.
type dataset struct {
	dir      string
	metaFile string
	items    []item   // in metadata order
	cats     []string // categories present, in table order
}

// isM3 reports whether the folder is the M3 competition data, so that
// the published figures can be printed beside ours.
func (d *dataset) isM3() bool {
	return filepath.Base(d.metaFile) == "m3_series.csv"
}

// readDir reads a folder laid out like the shared M3 folder: one
// metadata file whose header starts with "series,frequency" (columns
// series, frequency, n_train and h required; domain, start_year and
// start_period optional) and any number of value files in long format
// with the columns series, index, value and part ("train" or "test"; a
// category column is allowed and not used). An empty value cell, "NA" or
// "NaN" is a missing observation.
func readDir(dir string) (*dataset, error) {
	files, err := filepath.Glob(filepath.Join(dir, "*.csv"))
	if err != nil {
		return nil, err
	}
	slices.Sort(files)
	if len(files) == 0 {
		return nil, fmt.Errorf("evaluate: %w: no .csv files in %s", errData, dir)
	}
	d := &dataset{dir: dir}
	var metas []meta
	type valueFile struct {
		name string
		rows [][]string
		cols map[string]int
	}
	var values []valueFile
	for _, f := range files {
		rows, err := readCSV(f)
		if err != nil {
			return nil, err
		}
		if len(rows) == 0 {
			continue
		}
		cols := map[string]int{}
		for i, c := range rows[0] {
			cols[strings.TrimSpace(strings.ToLower(c))] = i
		}
		_, hasFreq := cols["frequency"]
		_, hasValue := cols["value"]
		switch {
		case hasFreq && !hasValue:
			if d.metaFile != "" {
				return nil, fmt.Errorf("evaluate: %w: two metadata files, %s and %s", errData, filepath.Base(d.metaFile), filepath.Base(f))
			}
			d.metaFile = f
			if metas, err = parseMeta(f, rows, cols); err != nil {
				return nil, err
			}
		case hasValue:
			values = append(values, valueFile{name: f, rows: rows, cols: cols})
		}
	}
	if d.metaFile == "" {
		return nil, fmt.Errorf("evaluate: %w: no metadata file (a .csv whose header has series and frequency columns) in %s", errData, dir)
	}
	type acc struct {
		train, test []float64
		next        int // next index expected
		file        string
	}
	byID := make(map[string]*acc, len(metas))
	for _, m := range metas {
		byID[m.id] = &acc{next: 1}
	}
	for _, vf := range values {
		need := []string{"series", "index", "value", "part"}
		for _, c := range need {
			if _, ok := vf.cols[c]; !ok {
				return nil, fmt.Errorf("evaluate: %w: %s has no %q column", errData, filepath.Base(vf.name), c)
			}
		}
		cs, ci, cv, cp := vf.cols["series"], vf.cols["index"], vf.cols["value"], vf.cols["part"]
		for ln, r := range vf.rows[1:] {
			where := fmt.Sprintf("%s line %d", filepath.Base(vf.name), ln+2)
			id := r[cs]
			a, ok := byID[id]
			if !ok {
				return nil, fmt.Errorf("evaluate: %w: %s: series %q is not in %s", errData, where, id, filepath.Base(d.metaFile))
			}
			if a.file != "" && a.file != vf.name {
				return nil, fmt.Errorf("evaluate: %w: %s: series %q also appears in %s", errData, where, id, filepath.Base(a.file))
			}
			a.file = vf.name
			idx, err := strconv.Atoi(strings.TrimSpace(r[ci]))
			if err != nil || idx != a.next {
				return nil, fmt.Errorf("evaluate: %w: %s: series %q: index %q, expected %d (rows must be in order, 1-based, without holes; mark a missing value by an empty value cell)", errData, where, id, r[ci], a.next)
			}
			a.next++
			v, err := parseValue(r[cv])
			if err != nil {
				return nil, fmt.Errorf("evaluate: %w: %s: %v", errData, where, err)
			}
			switch strings.TrimSpace(r[cp]) {
			case "train":
				if len(a.test) > 0 {
					return nil, fmt.Errorf("evaluate: %w: %s: series %q: a training value after the test part began", errData, where, id)
				}
				a.train = append(a.train, v)
			case "test":
				a.test = append(a.test, v)
			default:
				return nil, fmt.Errorf("evaluate: %w: %s: part %q, want train or test", errData, where, r[cp])
			}
		}
	}
	present := map[string]bool{}
	for _, m := range metas {
		a := byID[m.id]
		if a.file == "" {
			return nil, fmt.Errorf("evaluate: %w: series %q (%s line %d) has no values in any file", errData, m.id, filepath.Base(d.metaFile), m.line)
		}
		if len(a.train) != m.nTrain || len(a.test) != m.h {
			return nil, fmt.Errorf("evaluate: %w: series %q has %d training and %d test values; the metadata says %d and %d", errData, m.id, len(a.train), len(a.test), m.nTrain, m.h)
		}
		cat := categories[m.freq]
		start, err := startTime(cat, m.startYear, m.startPeriod)
		if err != nil {
			return nil, fmt.Errorf("evaluate: %w: series %q: %v", errData, m.id, err)
		}
		d.items = append(d.items, item{
			id: m.id, category: m.freq, domain: m.domain, m: cat.scale, test: a.test,
			train: almanac.Series{Key: m.id, Start: start, Freq: cat.freq, Values: a.train},
		})
		present[m.freq] = true
	}
	for c := range present {
		d.cats = append(d.cats, c)
	}
	slices.SortFunc(d.cats, func(a, b string) int { return categories[a].order - categories[b].order })
	return d, nil
}

func readCSV(name string) ([][]string, error) {
	fh, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer fh.Close()
	r := csv.NewReader(fh)
	r.ReuseRecord = false
	var rows [][]string
	for {
		rec, err := r.Read()
		if err == io.EOF {
			return rows, nil
		}
		if err != nil {
			return nil, fmt.Errorf("evaluate: %w: %s: %v", errData, filepath.Base(name), err)
		}
		rows = append(rows, rec)
	}
}

func parseMeta(name string, rows [][]string, cols map[string]int) ([]meta, error) {
	for _, c := range []string{"series", "frequency", "n_train", "h"} {
		if _, ok := cols[c]; !ok {
			return nil, fmt.Errorf("evaluate: %w: %s has no %q column", errData, filepath.Base(name), c)
		}
	}
	get := func(r []string, c string) string {
		if i, ok := cols[c]; ok {
			return strings.TrimSpace(r[i])
		}
		return ""
	}
	atoi := func(r []string, c string, line int, min int) (int, error) {
		s := get(r, c)
		if s == "" {
			return 0, nil
		}
		v, err := strconv.Atoi(s)
		if err != nil || v < min {
			return 0, fmt.Errorf("evaluate: %w: %s line %d: %s %q", errData, filepath.Base(name), line, c, s)
		}
		return v, nil
	}
	seen := map[string]bool{}
	var out []meta
	for ln, r := range rows[1:] {
		line := ln + 2
		m := meta{id: get(r, "series"), freq: strings.ToLower(get(r, "frequency")), domain: get(r, "domain"), line: line}
		if m.id == "" || seen[m.id] {
			return nil, fmt.Errorf("evaluate: %w: %s line %d: missing or repeated series id %q", errData, filepath.Base(name), line, m.id)
		}
		seen[m.id] = true
		if _, ok := categories[m.freq]; !ok {
			return nil, fmt.Errorf("evaluate: %w: %s line %d: unknown frequency %q (want yearly, quarterly, monthly, weekly, daily, hourly or other)", errData, filepath.Base(name), line, m.freq)
		}
		var err error
		if m.nTrain, err = atoi(r, "n_train", line, 1); err != nil {
			return nil, err
		}
		if m.h, err = atoi(r, "h", line, 1); err != nil {
			return nil, err
		}
		if m.nTrain < 1 || m.h < 1 {
			return nil, fmt.Errorf("evaluate: %w: %s line %d: n_train and h must be at least 1", errData, filepath.Base(name), line)
		}
		if m.startYear, err = atoi(r, "start_year", line, 0); err != nil {
			return nil, err
		}
		if m.startPeriod, err = atoi(r, "start_period", line, 0); err != nil {
			return nil, err
		}
		out = append(out, m)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("evaluate: %w: %s lists no series", errData, filepath.Base(name))
	}
	return out, nil
}

func parseValue(s string) (float64, error) {
	s = strings.TrimSpace(s)
	switch strings.ToLower(s) {
	case "", "na", "nan":
		return math.NaN(), nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, fmt.Errorf("value %q is not a finite number", s)
	}
	return v, nil
}

// defaultYear dates series whose start is unknown (start_year 0).
const defaultYear = 2000

// startTime returns the time of a series' first observation from the
// metadata's start_year and start_period: the period'th month, quarter,
// ISO week, day or hour counted from the start of the year (1-based; a
// count beyond the year runs on into the next, as in M3's N1071, dated
// quarter 9 of 1984). A year of 0 means the date is unknown and the
// series starts at the first period of 2000; a period of 0 means the
// first period of the year.
func startTime(c category, year, period int) (time.Time, error) {
	if year == 0 {
		year, period = defaultYear, 1
	}
	if period == 0 {
		period = 1
	}
	k := period - 1
	switch c.freq.Unit {
	case calendar.Year:
		return time.Date(year, 1, 1, 0, 0, 0, 0, time.UTC), nil
	case calendar.Quarter:
		return time.Date(year, time.Month(3*k+1), 1, 0, 0, 0, 0, time.UTC), nil
	case calendar.Month:
		return time.Date(year, time.Month(k+1), 1, 0, 0, 0, 0, time.UTC), nil
	case calendar.Week:
		w1, err := calendar.ISOWeekStart(year, 1, time.UTC)
		return w1.AddDate(0, 0, 7*k), err
	case calendar.Day:
		return time.Date(year, 1, 1+k, 0, 0, 0, 0, time.UTC), nil
	case calendar.Hour:
		return time.Date(year, 1, 1, k, 0, 0, 0, time.UTC), nil
	}
	return time.Time{}, fmt.Errorf("frequency %v has no dating rule", c.freq)
}
