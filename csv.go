package almanac

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/almanac-go/almanac/calendar"
)

// Default column names of the long CSV format: one row per series and
// time, with the series key, the time, and the value.
const (
	DefaultKeyColumn   = "series"
	DefaultTimeColumn  = "period"
	DefaultValueColumn = "value"
)

// DefaultTimeLayouts are the time layouts ReadCSV tries, in order, when
// CSVOptions.Layouts is empty: a date, a date and time with a space, RFC
// 3339 (with an optional fraction of a second), a year and month, and a
// year.
var DefaultTimeLayouts = []string{"2006-01-02", "2006-01-02 15:04", "2006-01-02 15:04:05", time.RFC3339, "2006-01", "2006"}

// CSVOptions configures ReadCSV and the CSV writers. The zero value reads
// and writes the default columns, tries DefaultTimeLayouts in UTC, infers
// the frequency, and reports gaps as errors.
type CSVOptions struct {
	// KeyColumn, TimeColumn and ValueColumn name the header cells of the
	// three columns; empty means DefaultKeyColumn, DefaultTimeColumn and
	// DefaultValueColumn. Other columns are ignored. Names are matched
	// exactly after trimming spaces.
	KeyColumn, TimeColumn, ValueColumn string
	// Layouts are the time layouts (package time syntax) tried in order;
	// empty means DefaultTimeLayouts. The writers use Layouts[0] when set.
	Layouts []string
	// Location is used for times without a zone; nil means UTC.
	Location *time.Location
	// Freq is the frequency of every series. The zero Frequency means
	// infer it: the coarsest spacing (months, then days, then minutes)
	// under which every time of every series is a whole number of steps
	// from its series' first time, with the step the greatest common
	// divisor of those counts (so quarterly dates give Quarterly and
	// 15-minute readings Every(15, Minute)).
	Freq calendar.Frequency
	// RequireOrder makes ReadCSV report a row of a series that is earlier
	// than the row before it (ErrCSVOrder). By default the rows of each
	// series are sorted by time, so input in any order is read.
	RequireOrder bool
	// FillGaps inserts NaN for periods missing between two rows of a
	// series instead of reporting ErrCSVGap. A series may grow to at most
	// 16,777,216 values this way; a larger gap is reported as ErrCSVGap.
	FillGaps bool
	// Comma is the field delimiter; 0 means ','.
	Comma rune
	// Digits is the number of significant digits the writers use for
	// values; 0 means the shortest text that reads back as the same
	// float64. Negative is invalid. ReadCSV ignores it.
	Digits int
}

func (o CSVOptions) columns() (key, tm, val string) {
	key, tm, val = o.KeyColumn, o.TimeColumn, o.ValueColumn
	if key == "" {
		key = DefaultKeyColumn
	}
	if tm == "" {
		tm = DefaultTimeColumn
	}
	if val == "" {
		val = DefaultValueColumn
	}
	return key, tm, val
}

func (o CSVOptions) location() *time.Location {
	if o.Location == nil {
		return time.UTC
	}
	return o.Location
}

// MissingValueText is how every CSV writer of the module writes a missing
// value (NaN). ReadCSV reads it and the other missing-value spellings
// (see ReadCSV).
const MissingValueText = "NaN"

// isMissingToken reports whether a value cell marks a missing value: the
// empty cell and, ignoring case and surrounding spaces, "NA", "N/A",
// "NaN" and "null".
func isMissingToken(s string) bool {
	s = strings.TrimSpace(s)
	return s == "" || strings.EqualFold(s, "NA") || strings.EqualFold(s, "N/A") ||
		strings.EqualFold(s, "NaN") || strings.EqualFold(s, "null")
}

type csvRow struct {
	line int
	t    time.Time
	v    float64
}

type csvGroup struct {
	key  string
	rows []csvRow
}

// ReadCSV reads series in long format from r: a header row, then one row
// per series and time holding the key, the time and the value (columns
// named by opt; see CSVOptions). Rows of different series may be
// interleaved and the rows of a series may come in any order (they are
// sorted by time, unless opt.RequireOrder asks for them in order); the
// series are returned in the order their keys first appear.
//
// Values: plain decimal numbers with an optional sign, fraction and
// exponent (12, -3.5, .5, 2e-3, 1.5E+6), as every CSV reader reads them;
// the forms only Go's strconv accepts (digit separators such as 1_000,
// hexadecimal such as 0x1p3) are rejected. Missing values: an empty value
// cell, or one of the tokens NA, N/A, NaN or null (any case), gives NaN;
// with FillGaps, periods with no row also give NaN.
//
// Nothing is dropped silently: a malformed row, an unparsable time or
// value, an infinite value (Inf, or a number beyond the float64 range such
// as 1e309), a duplicate time, a time off the frequency's grid, a gap
// without FillGaps, or (with RequireOrder) a row earlier than the one
// before it is an error. Errors are *CSVError values naming the line and
// column and unwrapping to ErrCSVSyntax, ErrCSVHeader, ErrCSVValue (with
// ErrNonFinite for an infinite value), ErrCSVTime, ErrCSVDuplicate,
// ErrCSVOrder, ErrCSVGap or ErrCSVIrregular; when several rows are bad the
// first by line is reported (for a duplicate, the later of the two rows).
// Messages quote at most a short prefix of a bad cell. Input with a header
// but no data rows gives an error wrapping ErrEmpty, and a frequency that
// cannot be inferred (no series with two distinct times, or times finer
// than a minute) one wrapping ErrFrequency.
//
// The series are not validated further: a series whose values are all
// missing is returned as read (Series.Validate reports it).
func ReadCSV(r io.Reader, opt CSVOptions) ([]Series, error) {
	if err := checkCSVOptions(opt); err != nil {
		return nil, err
	}
	keyName, timeName, valName := opt.columns()
	cr := csv.NewReader(r)
	cr.ReuseRecord = true
	if opt.Comma != 0 {
		cr.Comma = opt.Comma
	}
	header, err := cr.Read()
	if err == io.EOF {
		return nil, &CSVError{Line: 1, Err: fmt.Errorf("%w: no header row", ErrCSVHeader)}
	}
	if err != nil {
		return nil, csvSyntaxError(err)
	}
	ki, ti, vi := -1, -1, -1
	for i, h := range header {
		h = strings.TrimSpace(h)
		if i == 0 {
			h = strings.TrimPrefix(h, "\ufeff") // byte-order mark
		}
		for _, c := range []struct {
			name string
			idx  *int
		}{{keyName, &ki}, {timeName, &ti}, {valName, &vi}} {
			if h != c.name {
				continue
			}
			if *c.idx >= 0 {
				return nil, &CSVError{Line: 1, Column: c.name, Err: fmt.Errorf("%w: column %q appears twice", ErrCSVHeader, c.name)}
			}
			*c.idx = i
		}
	}
	for _, c := range []struct {
		name string
		idx  int
	}{{keyName, ki}, {timeName, ti}, {valName, vi}} {
		if c.idx < 0 {
			return nil, &CSVError{Line: 1, Column: c.name, Err: fmt.Errorf("%w: no column %q", ErrCSVHeader, c.name)}
		}
	}

	layouts := opt.Layouts
	if len(layouts) == 0 {
		layouts = DefaultTimeLayouts
	}
	loc := opt.location()
	var groups []*csvGroup
	byKey := map[string]*csvGroup{}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvSyntaxError(err)
		}
		line, _ := cr.FieldPos(0)
		t, err := parseCSVTime(rec[ti], layouts, loc)
		if err != nil {
			return nil, &CSVError{Line: line, Column: timeName, Err: err}
		}
		v, err := ParseValue(rec[vi])
		if err != nil {
			return nil, &CSVError{Line: line, Column: valName, Err: err}
		}
		key := rec[ki]
		g := byKey[key]
		if g == nil {
			g = &csvGroup{key: strings.Clone(key)}
			byKey[g.key] = g
			groups = append(groups, g)
		}
		g.rows = append(g.rows, csvRow{line: line, t: t, v: v})
	}
	if len(groups) == 0 {
		return nil, &CSVError{Err: fmt.Errorf("%w: no data rows", ErrEmpty)}
	}
	if !opt.RequireOrder {
		for _, g := range groups {
			sortRows(g.rows)
		}
	}
	freq := opt.Freq
	if freq == (calendar.Frequency{}) {
		if freq, err = inferFrequency(groups); err != nil {
			return nil, err
		}
	}
	out := make([]Series, 0, len(groups))
	var first *CSVError
	for _, g := range groups {
		s, cerr := buildCSVSeries(g, freq, opt.FillGaps, timeName)
		if cerr != nil {
			if first == nil || cerr.Line < first.Line {
				first = cerr
			}
			continue
		}
		out = append(out, s)
	}
	if first != nil {
		return nil, first
	}
	return out, nil
}

// sortRows sorts the rows of one series by time, keeping the input order
// of equal times (so a duplicate is reported at its later line).
func sortRows(rows []csvRow) {
	if slices.IsSortedFunc(rows, func(a, b csvRow) int { return a.t.Compare(b.t) }) {
		return
	}
	slices.SortStableFunc(rows, func(a, b csvRow) int { return a.t.Compare(b.t) })
}

func checkCSVOptions(opt CSVOptions) error {
	if opt.Freq != (calendar.Frequency{}) {
		if err := opt.Freq.Validate(); err != nil {
			return fmt.Errorf("almanac: csv: %w", err)
		}
	}
	if opt.Digits < 0 {
		return fmt.Errorf("almanac: csv: %w: %d digits", ErrInvalid, opt.Digits)
	}
	k, t, v := opt.columns()
	if k == t || k == v || t == v {
		return fmt.Errorf("almanac: csv: %w: column names %q, %q, %q must differ", ErrInvalid, k, t, v)
	}
	return nil
}

func csvSyntaxError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &CSVError{Line: pe.Line, Err: fmt.Errorf("%w: %v", ErrCSVSyntax, pe.Err)}
	}
	return &CSVError{Err: fmt.Errorf("%w: %v", ErrCSVSyntax, err)}
}

func parseCSVTime(s string, layouts []string, loc *time.Location) (time.Time, error) {
	s = strings.TrimSpace(s)
	for _, l := range layouts {
		if t, err := time.ParseInLocation(l, s, loc); err == nil {
			return t, nil
		}
	}
	return time.Time{}, fmt.Errorf("%w: %s matches none of the layouts %q", ErrCSVTime, quoteCell(s), layouts)
}

// maxQuoted is the longest cell quoted whole in an error message; longer
// cells are cut to a prefix and their length given.
const maxQuoted = 40

// quoteCell quotes s for an error message, cutting a long cell to a short
// prefix (on a UTF-8 boundary) followed by its length in bytes, so that a
// huge bad cell does not end up in logs whole.
func quoteCell(s string) string {
	if len(s) <= maxQuoted {
		return strconv.Quote(s)
	}
	cut := maxQuoted - 8
	for cut > 0 && !utf8.RuneStart(s[cut]) {
		cut--
	}
	return fmt.Sprintf("%s… (%d bytes)", strconv.Quote(s[:cut]), len(s))
}

// isDecimal reports whether s is a plain decimal number: an optional
// sign, digits with an optional decimal point (at least one digit), and
// an optional exponent e or E with an optional sign and digits.
func isDecimal(s string) bool {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			exp++
		}
		if exp == 0 {
			return false
		}
	}
	return i == len(s)
}

// isInfinityToken reports whether s spells an infinity (inf, infinity,
// with an optional sign, any case).
func isInfinityToken(s string) bool {
	s = strings.TrimLeft(s, "+-")
	return strings.EqualFold(s, "inf") || strings.EqualFold(s, "infinity")
}

// ParseValue reads one value cell by the rules of ReadCSV: a plain decimal
// number (optional sign, digits with an optional decimal point, optional
// exponent; no digit separators, no hexadecimal) gives its value; an
// empty cell or one of the missing-value tokens NA, N/A, NaN or null (any
// case, surrounding spaces ignored) gives NaN; anything else is an error
// wrapping ErrCSVValue, which also wraps ErrNonFinite for Inf, Infinity
// or a number beyond the float64 range. Programs that read long-format
// data their own way (a pipeline, a service) use it to read values
// exactly as ReadCSV does. Messages quote at most a short prefix of s.
func ParseValue(s string) (float64, error) {
	if isMissingToken(s) {
		return math.NaN(), nil
	}
	t := strings.TrimSpace(s)
	if isInfinityToken(t) {
		return 0, fmt.Errorf("%w: %w: %s", ErrCSVValue, ErrNonFinite, quoteCell(s))
	}
	if !isDecimal(t) {
		return 0, fmt.Errorf("%w: %s is not a decimal number or a missing-value token", ErrCSVValue, quoteCell(s))
	}
	v, err := strconv.ParseFloat(t, 64)
	if math.IsInf(v, 0) {
		return 0, fmt.Errorf("%w: %w: %s is beyond the float64 range", ErrCSVValue, ErrNonFinite, quoteCell(s))
	}
	if err != nil { // cannot happen for a decimal within range
		return 0, fmt.Errorf("%w: %s: %v", ErrCSVValue, quoteCell(s), err)
	}
	return v, nil
}

// inferFrequency finds the coarsest spacing consistent with every row (see
// CSVOptions.Freq), through calendar.Infer.
func inferFrequency(groups []*csvGroup) (calendar.Frequency, error) {
	times := make([][]time.Time, len(groups))
	for i, grp := range groups {
		times[i] = make([]time.Time, len(grp.rows))
		for j, r := range grp.rows {
			times[i][j] = r.t
		}
	}
	f, err := calendar.Infer(times...)
	if err != nil {
		return calendar.Frequency{}, &CSVError{Err: fmt.Errorf("%w: cannot infer it from the times (need a series with two distinct times, spaced by whole minutes, days or months); set CSVOptions.Freq", ErrFrequency)}
	}
	return f, nil
}

// maxCSVFill caps the length of a gap-filled series, so that two far-apart
// dates cannot make ReadCSV allocate without bound.
const maxCSVFill = 1 << 24

// buildCSVSeries places the rows of one series on the frequency's grid.
func buildCSVSeries(g *csvGroup, freq calendar.Frequency, fill bool, timeName string) (Series, *CSVError) {
	key := quoteCell(g.key)
	start := g.rows[0].t
	vals := make([]float64, 0, len(g.rows))
	vals = append(vals, g.rows[0].v)
	prev, prevLine := 0, g.rows[0].line
	for _, r := range g.rows[1:] {
		idx, err := freq.Between(start, r.t)
		switch {
		case err != nil:
			return Series{}, &CSVError{Line: r.line, Column: timeName, Err: fmt.Errorf("%w: series %s: %v is not a whole number of %v steps from its first time %v", ErrCSVIrregular, key, r.t, freq, start)}
		case idx == prev:
			line, other := max(r.line, prevLine), min(r.line, prevLine)
			return Series{}, &CSVError{Line: line, Column: timeName, Err: fmt.Errorf("%w: series %s: %v already given on line %d", ErrCSVDuplicate, key, r.t, other)}
		case idx < prev:
			return Series{}, &CSVError{Line: r.line, Column: timeName, Err: fmt.Errorf("%w: series %s: %v comes after %v (line %d)", ErrCSVOrder, key, r.t, freq.Add(start, prev), prevLine)}
		case idx-prev-1 > maxCSVFill-len(vals):
			return Series{}, &CSVError{Line: r.line, Column: timeName, Err: fmt.Errorf("%w: series %s: %d %v steps missing before %v, more than the %d values a series read from CSV may hold", ErrCSVGap, key, idx-prev-1, freq, r.t, maxCSVFill)}
		case idx > prev+1 && !fill:
			return Series{}, &CSVError{Line: r.line, Column: timeName, Err: fmt.Errorf("%w: series %s: %d %v steps missing before %v (set CSVOptions.FillGaps to fill with NaN)", ErrCSVGap, key, idx-prev-1, freq, r.t)}
		}
		for range idx - prev - 1 {
			vals = append(vals, math.NaN())
		}
		vals = append(vals, r.v)
		prev, prevLine = idx, r.line
	}
	return Series{Key: g.key, Start: start, Freq: freq, Values: slices.Clip(vals)}, nil
}

// formatCSVTime writes t with layout, or when layout is "" in the
// shortest form ReadCSV reads back as the same time: for monthly,
// quarterly and yearly data (and multiples) on the first of a month at
// midnight in loc, the year and month ("2026-01"), or the year alone for
// yearly data in January ("2026"); for daily and coarser data at midnight
// in loc, the date; otherwise RFC 3339.
func formatCSVTime(t time.Time, freq calendar.Frequency, layout string, loc *time.Location) string {
	if layout != "" {
		return t.Format(layout)
	}
	if freq.Unit >= calendar.Day && t.Location() == loc {
		if h, m, s := t.Clock(); h == 0 && m == 0 && s == 0 && t.Nanosecond() == 0 {
			if freq.Unit >= calendar.Month && t.Day() == 1 {
				if freq.Unit == calendar.Year && t.Month() == time.January {
					return t.Format("2006")
				}
				return t.Format("2006-01")
			}
			return t.Format("2006-01-02")
		}
	}
	return t.Format(time.RFC3339Nano)
}

func formatCSVValue(v float64, digits int) string {
	if math.IsNaN(v) {
		return MissingValueText
	}
	if digits == 0 {
		digits = -1
	}
	return strconv.FormatFloat(v, 'g', digits, 64)
}

func (o CSVOptions) writeLayout() string {
	if len(o.Layouts) > 0 {
		return o.Layouts[0]
	}
	return ""
}

func newCSVWriter(w io.Writer, opt CSVOptions) *csv.Writer {
	cw := csv.NewWriter(w)
	if opt.Comma != 0 {
		cw.Comma = opt.Comma
	}
	return cw
}

// WriteSeriesCSV writes ys to w in the long format ReadCSV reads (same
// column names and options), one row per observation, missing values as
// MissingValueText (NaN). Times use opt.Layouts[0] when given, else the
// shortest form that reads back as the same time: the year and month
// ("2026-01") for monthly, quarterly and yearly data on the first of a
// month, the year alone ("2026") for yearly data in January, a date for
// other daily and coarser data at midnight in opt.Location (UTC when nil),
// and RFC 3339 otherwise. ReadCSV with the same options reads the series
// back unchanged.
//
// Special cases: invalid options give an error wrapping ErrInvalid or
// ErrFrequency, and so does a series with an invalid frequency (its times
// cannot be written); a series with no observations gives one wrapping
// ErrEmpty (it would have no row, and so would be missing from the file
// without a trace). Nothing is written then.
func WriteSeriesCSV(w io.Writer, ys []Series, opt CSVOptions) error {
	if err := checkCSVOptions(opt); err != nil {
		return err
	}
	for _, s := range ys {
		if err := s.Freq.Validate(); err != nil {
			return fmt.Errorf("almanac: csv: series %s: %w", quoteCell(s.Key), err)
		}
		if len(s.Values) == 0 {
			return fmt.Errorf("almanac: csv: series %s: %w: a series without observations has no row to write", quoteCell(s.Key), ErrEmpty)
		}
	}
	k, t, v := opt.columns()
	cw := newCSVWriter(w, opt)
	if err := cw.Write([]string{k, t, v}); err != nil {
		return fmt.Errorf("almanac: csv: %w", err)
	}
	layout := opt.writeLayout()
	rec := make([]string, 3)
	for _, s := range ys {
		for i, x := range s.Values {
			rec[0], rec[1], rec[2] = s.Key, formatCSVTime(s.Time(i), s.Freq, layout, opt.location()), formatCSVValue(x, opt.Digits)
			if err := cw.Write(rec); err != nil {
				return fmt.Errorf("almanac: csv: %w", err)
			}
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("almanac: csv: %w", err)
	}
	return nil
}

// Column names of WriteForecastCSV besides the key and time columns.
const (
	ForecastStepColumn   = "step"   // 1-based forecast horizon
	ForecastPointColumn  = "point"  // point forecast
	ForecastStatusColumn = "status" // ForecastOK or ForecastFailed
	ForecastReasonColumn = "reason" // why the series has no forecast; empty when it has one
)

// Values of WriteForecastCSV's status column.
const (
	ForecastOK     = "ok"
	ForecastFailed = "failed"
)

// BandColumns returns the names WriteForecastCSV gives the bounds of the
// interval at level: "band80_low" and "band80_high" for 80.
func BandColumns(level float64) (low, high string) {
	l := strconv.FormatFloat(level, 'g', -1, 64)
	return "band" + l + "_low", "band" + l + "_high"
}

// WriteForecastCSV writes the forecasts of a batch to w in long format,
// one or more rows for every element of fcs, in order, so that no series
// of the batch is missing from the file:
//
//   - a forecast gives one row per step with the key, the time (columns
//     named as in opt, times written as WriteSeriesCSV writes them),
//     ForecastStepColumn, ForecastPointColumn, for every level present in
//     any forecast (ascending) the two BandColumns, ForecastStatusColumn
//     "ok" and an empty ForecastReasonColumn;
//   - a failed series (Err set, or a forecast without any step) gives one
//     row with its key, empty time and step, MissingValueText (NaN) for
//     the point and the bounds, status "failed", and the error message as
//     the reason.
//
// A bound that a forecast does not carry is written as MissingValueText.
// A job reading the file tells ok rows from failed ones by the status
// column, and counts the series of the batch by their keys.
//
// Special cases: invalid options (including a key or time column named
// like one of the other columns) give an error wrapping ErrInvalid or
// ErrFrequency, and so does a forecast with an invalid frequency (its
// times cannot be written), before anything is written.
func WriteForecastCSV(w io.Writer, fcs []BatchForecast, opt CSVOptions) error {
	if err := checkCSVOptions(opt); err != nil {
		return err
	}
	k, t, _ := opt.columns()
	var levels []float64
	for _, f := range fcs {
		if f.Err != nil || len(f.Forecast.Mean) == 0 {
			continue
		}
		if err := f.Forecast.Freq.Validate(); err != nil {
			return fmt.Errorf("almanac: csv: forecast %s: %w", quoteCell(f.Key), err)
		}
		for _, iv := range f.Forecast.Intervals {
			if !slices.Contains(levels, iv.Level) {
				levels = append(levels, iv.Level)
			}
		}
	}
	slices.Sort(levels)
	header := []string{k, t, ForecastStepColumn, ForecastPointColumn}
	for _, l := range levels {
		lo, hi := BandColumns(l)
		header = append(header, lo, hi)
	}
	header = append(header, ForecastStatusColumn, ForecastReasonColumn)
	for i, h := range header {
		if slices.Contains(header[i+1:], h) {
			return fmt.Errorf("almanac: csv: %w: the key or time column is named %q like another forecast column", ErrInvalid, h)
		}
	}
	cw := newCSVWriter(w, opt)
	if err := cw.Write(header); err != nil {
		return fmt.Errorf("almanac: csv: %w", err)
	}
	layout := opt.writeLayout()
	rec := make([]string, len(header))
	last := len(header) - 2
	for _, f := range fcs {
		fc := f.Forecast
		if f.Err != nil || len(fc.Mean) == 0 {
			reason := "no forecast steps"
			if f.Err != nil {
				reason = f.Err.Error()
			}
			rec[0], rec[1], rec[2] = f.Key, "", ""
			for j := 3; j < last; j++ {
				rec[j] = MissingValueText
			}
			rec[last], rec[last+1] = ForecastFailed, reason
			if err := cw.Write(rec); err != nil {
				return fmt.Errorf("almanac: csv: %w", err)
			}
			continue
		}
		for h, m := range fc.Mean {
			rec[0], rec[1] = f.Key, formatCSVTime(fc.Time(h), fc.Freq, layout, opt.location())
			rec[2], rec[3] = strconv.Itoa(h+1), formatCSVValue(m, opt.Digits)
			for j, l := range levels {
				lo, hi := MissingValueText, MissingValueText
				for _, iv := range fc.Intervals {
					if iv.Level == l && h < len(iv.Lower) && h < len(iv.Upper) {
						lo, hi = formatCSVValue(iv.Lower[h], opt.Digits), formatCSVValue(iv.Upper[h], opt.Digits)
						break
					}
				}
				rec[4+2*j], rec[5+2*j] = lo, hi
			}
			rec[last], rec[last+1] = ForecastOK, ""
			if err := cw.Write(rec); err != nil {
				return fmt.Errorf("almanac: csv: %w", err)
			}
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("almanac: csv: %w", err)
	}
	return nil
}
