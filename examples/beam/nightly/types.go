package nightly

import (
	"bytes"
	"encoding/csv"
	"hash/fnv"
	"math"
	"strconv"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// The element types below travel between the pipeline's stages; Beam
// encodes them field by field (float64 as its exact bits), so nothing
// between reading a value and fitting a model changes it.

// Obs is one data row of a series, keyed by the series key.
type Obs struct {
	File string // file the row came from
	Line int64  // line number in that file (1 = header)
	// Sec and Nsec are the row's time (Unix seconds and nanoseconds, UTC)
	// when Bad is false.
	Sec, Nsec int64
	Value     float64 // NaN for a missing-value token
	// Bad marks a row that was rejected (its dead-letter record is written
	// by the reader); it is kept so that a series all of whose rows are bad
	// is still accounted for.
	Bad bool
}

// Place is one row of the hierarchy file: the parents of a series from
// its hierarchy's root down, separated by "/".
type Place struct {
	File   string
	Line   int64
	Within string
	Bad    bool // rejected row (reported by the reader)
}

// SeriesRec is one assembled series on its way to the stage that
// forecasts its hierarchy (or the series alone).
type SeriesRec struct {
	Key    string
	Within string // "" for a series outside any hierarchy
	// Sec, Nsec, Unit and N give the first time and the frequency.
	Sec, Nsec int64
	Unit, N   int
	Values    []float64
	// Failed marks a series that was rejected while being assembled (its
	// status and dead-letter records are already written). It travels on
	// so that the aggregates above it can say what they leave out.
	Failed bool
	Reason string
}

func (r SeriesRec) start() time.Time { return time.Unix(r.Sec, r.Nsec).UTC() }

func (r SeriesRec) freq() calendar.Frequency {
	return calendar.Frequency{Unit: calendar.Unit(r.Unit), N: r.N}
}

// Record is one line of one of the output files, already formatted as
// CSV (without the line break). Key is the series the line is about; it
// chooses the shard.
type Record struct {
	Output string
	Key    string
	Line   string
}

// csvLine formats fields as one CSV line, quoted where needed.
func csvLine(fields ...string) string {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write(fields) // writing to a bytes.Buffer cannot fail
	w.Flush()
	return string(bytes.TrimRight(b.Bytes(), "\n"))
}

// formatValue writes v in the shortest form that reads back as the same
// float64 (strconv 'g', -1), and NaN as NA.
func formatValue(v float64) string {
	if math.IsNaN(v) {
		return "NA"
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// formatTime writes a time as a date for daily and coarser data at
// midnight UTC, and as RFC 3339 otherwise (what almanac.ReadCSV reads by
// default).
func formatTime(t time.Time, f calendar.Frequency) string {
	if f.Unit >= calendar.Day {
		if h, m, s := t.Clock(); h == 0 && m == 0 && s == 0 && t.Nanosecond() == 0 {
			return t.Format("2006-01-02")
		}
	}
	return t.Format(time.RFC3339Nano)
}

// shardOf spreads series keys over n shards.
func shardOf(key string, n int) int {
	h := fnv.New32a()
	_, _ = h.Write([]byte(key))
	return int(h.Sum32() % uint32(n))
}
