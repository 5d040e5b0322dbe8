package nightly

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/almanac-go/almanac"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/fileio"
)

// Reasons a row is rejected (the reason column of the dead-letter file).
const (
	ReasonUnreadable = "unreadable-file" // the file could not be opened or read
	ReasonHeader     = "bad-header"      // a required column is missing or doubled; the file is ignored
	ReasonMalformed  = "malformed-row"   // not valid CSV, or too few fields
	ReasonEmptyKey   = "empty-key"       // no series key
	ReasonBadTime    = "bad-period"      // the period matches none of the layouts
	ReasonBadValue   = "bad-value"       // the value is not a number or a missing-value token
	ReasonNonFinite  = "non-finite"      // the value is ±Inf or beyond the float64 range
	ReasonBadPlace   = "bad-place"       // the hierarchy path is empty or has an empty part
)

// columns finds the named columns in a header row; it reports the first
// missing or doubled one.
func columns(header []string, names ...string) ([]int, error) {
	idx := make([]int, len(names))
	for i := range idx {
		idx[i] = -1
	}
	for i, h := range header {
		h = strings.TrimSpace(h)
		if i == 0 {
			h = strings.TrimPrefix(h, "\ufeff") // byte-order mark
		}
		for j, n := range names {
			if h != n {
				continue
			}
			if idx[j] >= 0 {
				return nil, fmt.Errorf("column %q appears twice", n)
			}
			idx[j] = i
		}
	}
	for j, n := range names {
		if idx[j] < 0 {
			return nil, fmt.Errorf("no column %q in the header %q", n, header)
		}
	}
	return idx, nil
}

// readCSV reads a CSV file with a header naming the given columns,
// calling row for every record (idx holds the columns' positions; short
// is non-empty when the record lacks some of them) and dead for what
// cannot be read at all. It never returns an error: a file that
// cannot be opened or whose header lacks a column is one dead-letter
// record.
func readCSV(ctx context.Context, file fileio.ReadableFile, names []string, row func(idx []int, rec []string, line int64, short string), dead func(Record)) {
	path := file.Metadata.Path
	fileDead := func(line int64, reason, detail string) {
		rejectRow(ctx, reason)
		dead(deadRecord(path, line, "", reason, detail))
	}
	rc, err := file.Open(ctx)
	if err != nil {
		fileDead(0, ReasonUnreadable, err.Error())
		return
	}
	defer rc.Close()
	cr := csv.NewReader(rc)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	header, err := cr.Read()
	if err == io.EOF {
		fileDead(1, ReasonHeader, "empty file: no header row")
		return
	}
	if err != nil {
		fileDead(1, ReasonHeader, "header row: "+err.Error())
		return
	}
	idx, err := columns(header, names...)
	if err != nil {
		fileDead(1, ReasonHeader, err.Error()+"; the file is ignored")
		return
	}
	need := 0
	for _, i := range idx {
		need = max(need, i+1)
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			return
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				fileDead(int64(pe.Line), ReasonMalformed, pe.Err.Error())
				continue
			}
			fileDead(0, ReasonUnreadable, "reading stopped: "+err.Error())
			return
		}
		line, _ := cr.FieldPos(0)
		short := ""
		if len(rec) < need {
			short = fmt.Sprintf("%d fields, the header has %d", len(rec), len(header))
		}
		row(idx, rec, int64(line), short)
	}
}

// rejectRow counts a rejected row under its reason.
func rejectRow(ctx context.Context, reason string) {
	beam.NewCounter(counterNamespace, "rows_rejected_"+reason).Inc(ctx, 1)
}

// readDataFn reads one long-format data file into observations keyed by
// series.
type readDataFn struct {
	KeyColumn, PeriodColumn, ValueColumn string
}

// ProcessElement emits every row of file as an Obs under its series key,
// and a dead-letter record for every row it rejects (a rejected row with
// a key is also emitted, marked Bad, so its series is accounted for).
func (f *readDataFn) ProcessElement(ctx context.Context, file fileio.ReadableFile, emit func(string, Obs), dead func(Record)) {
	path := file.Metadata.Path
	readCSV(ctx, file, []string{f.KeyColumn, f.PeriodColumn, f.ValueColumn}, func(idx []int, rec []string, line int64, short string) {
		key := field(rec, idx[0])
		bad := func(reason, detail string) {
			rejectRow(ctx, reason)
			dead(deadRecord(path, line, key, reason, detail))
			if key != "" {
				emit(key, Obs{File: path, Line: line, Bad: true})
			}
		}
		if short != "" {
			bad(ReasonMalformed, short)
			return
		}
		if key == "" {
			bad(ReasonEmptyKey, "the series key is empty")
			return
		}
		t, err := parseTime(rec[idx[1]])
		if err != nil {
			bad(ReasonBadTime, err.Error())
			return
		}
		v, reason, err := parseValue(rec[idx[2]])
		if err != nil {
			bad(reason, err.Error())
			return
		}
		emit(key, Obs{File: path, Line: line, Sec: t.Unix(), Nsec: int64(t.Nanosecond()), Value: v})
	}, dead)
}

// parseTime reads a period with almanac.DefaultTimeLayouts, in UTC.
func parseTime(s string) (time.Time, error) {
	s = strings.TrimSpace(s)
	for _, l := range almanac.DefaultTimeLayouts {
		if t, err := time.ParseInLocation(l, s, time.UTC); err == nil {
			return t, nil
		}
	}
	return time.Time{}, fmt.Errorf("period %s matches none of the layouts %q", quote(s), almanac.DefaultTimeLayouts)
}

// parseValue reads a value with almanac.ParseValue, as ReadCSV does: a plain decimal
// number (optional sign, digits with an optional decimal point, optional
// exponent; no hexadecimal, no digit separators), or one of the
// missing-value tokens (empty, NA, N/A, NaN, null, any case), which give
// NaN. Inf, Infinity and numbers beyond the float64 range are
// ReasonNonFinite, anything else ReasonBadValue.
func parseValue(s string) (float64, string, error) {
	v, err := almanac.ParseValue(s)
	switch {
	case err == nil:
		return v, "", nil
	case errors.Is(err, almanac.ErrNonFinite):
		return 0, ReasonNonFinite, err
	default:
		return 0, ReasonBadValue, err
	}
}

// quote quotes a cell for a message, cut to a short prefix when long so
// that a huge bad cell does not fill the dead-letter file.
func quote(s string) string {
	const keep = 40
	if len(s) <= keep {
		return strconv.Quote(s)
	}
	cut := keep - 8
	for cut > 0 && !utf8.RuneStart(s[cut]) {
		cut--
	}
	return fmt.Sprintf("%s… (%d bytes)", strconv.Quote(s[:cut]), len(s))
}

// readPlacesFn reads the hierarchy file: one row per series naming its
// parents from the root down ("N03/PNT").
type readPlacesFn struct {
	KeyColumn, WithinColumn string
}

// ProcessElement emits every row as a Place under its series key, and a
// dead-letter record for every row it rejects.
func (f *readPlacesFn) ProcessElement(ctx context.Context, file fileio.ReadableFile, emit func(string, Place), dead func(Record)) {
	path := file.Metadata.Path
	readCSV(ctx, file, []string{f.KeyColumn, f.WithinColumn}, func(idx []int, rec []string, line int64, short string) {
		key := field(rec, idx[0])
		within := strings.TrimSpace(field(rec, idx[1]))
		if short != "" {
			rejectRow(ctx, ReasonMalformed)
			dead(deadRecord(path, line, key, ReasonMalformed, short))
			if key != "" {
				emit(key, Place{File: path, Line: line, Bad: true})
			}
			return
		}
		if key == "" {
			rejectRow(ctx, ReasonEmptyKey)
			dead(deadRecord(path, line, key, ReasonEmptyKey, "the series key is empty"))
			return
		}
		if err := checkWithin(within); err != nil {
			rejectRow(ctx, ReasonBadPlace)
			dead(deadRecord(path, line, key, ReasonBadPlace, err.Error()))
			emit(key, Place{File: path, Line: line, Bad: true})
			return
		}
		emit(key, Place{File: path, Line: line, Within: strings.Clone(within)})
	}, dead)
}

// field returns a copy of rec[i], or "" when the record is too short.
func field(rec []string, i int) string {
	if i >= len(rec) {
		return ""
	}
	return strings.Clone(rec[i])
}

// PathSeparator separates the parts of a hierarchy path.
const PathSeparator = "/"

func checkWithin(within string) error {
	if within == "" {
		return errors.New("empty hierarchy path")
	}
	for _, p := range strings.Split(within, PathSeparator) {
		if strings.TrimSpace(p) == "" {
			return fmt.Errorf("hierarchy path %q has an empty part", within)
		}
	}
	return nil
}
