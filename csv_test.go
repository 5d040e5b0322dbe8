package almanac_test

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
)

func utc(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

func TestReadCSVBasic(t *testing.T) {
	// Two interleaved series, extra column, missing-value tokens.
	in := "region,series,period,value\n" +
		"north,A,2024-01-01,10\n" +
		"north,B,2024-01-01,1.5\n" +
		"north,A,2024-02-01,NA\n" +
		"north,B,2024-02-01,\n" +
		"north,A,2024-03-01,12\n" +
		"north,B,2024-03-01, n/a \n" +
		"north,A,2024-04-01,nan\n" +
		"north,B,2024-04-01,-2e3\n"
	ys, err := almanac.ReadCSV(strings.NewReader(in), almanac.CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(ys) != 2 || ys[0].Key != "A" || ys[1].Key != "B" {
		t.Fatalf("series %v", ys)
	}
	nan := math.NaN()
	numtest.Slice(t, "A", ys[0].Values, []float64{10, nan, 12, nan}, 0, 0)
	numtest.Slice(t, "B", ys[1].Values, []float64{1.5, nan, nan, -2000}, 0, 0)
	for _, y := range ys {
		if !y.Freq.Equal(calendar.Monthly) || !y.Start.Equal(utc(2024, 1, 1)) {
			t.Errorf("%s: freq %v start %v", y.Key, y.Freq, y.Start)
		}
	}
}

func TestReadCSVInferFrequency(t *testing.T) {
	tests := []struct {
		name  string
		times []string
		want  calendar.Frequency
	}{
		{"yearly", []string{"2001", "2002", "2003"}, calendar.Yearly},
		{"quarterly", []string{"2001-01-01", "2001-04-01", "2001-07-01"}, calendar.Quarterly},
		{"monthly by year-month", []string{"2001-11", "2001-12", "2002-01"}, calendar.Monthly},
		{"month ends", []string{"2023-01-31", "2023-02-28", "2023-03-31", "2023-04-30"}, calendar.Monthly},
		{"every 2 months", []string{"2001-01-01", "2001-03-01", "2001-05-01"}, calendar.Every(2, calendar.Month)},
		{"weekly", []string{"2024-01-01", "2024-01-08", "2024-01-15"}, calendar.Weekly},
		{"daily", []string{"2024-02-28", "2024-02-29", "2024-03-01"}, calendar.Daily},
		{"hourly", []string{"2024-01-01 00:00", "2024-01-01 01:00", "2024-01-01 02:00"}, calendar.Hourly},
		{"15 minutes RFC 3339", []string{"2024-01-01T10:00:00Z", "2024-01-01T10:15:00Z", "2024-01-01T10:30:00Z"}, calendar.Every(15, calendar.Minute)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b strings.Builder
			b.WriteString("series,period,value\n")
			for i, s := range tt.times {
				b.WriteString("k," + s + "," + itoa(i) + "\n")
			}
			ys, err := almanac.ReadCSV(strings.NewReader(b.String()), almanac.CSVOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if !ys[0].Freq.Equal(tt.want) || ys[0].Len() != len(tt.times) {
				t.Errorf("freq %v, len %d; want %v, %d", ys[0].Freq, ys[0].Len(), tt.want, len(tt.times))
			}
		})
	}
}

func TestReadCSVOptions(t *testing.T) {
	in := "\ufeffsku;week;units;note\nX1;03.01.2025;4;a\nX1;10.01.2025;5;b\nX1;24.01.2025;7;c\n"
	opt := almanac.CSVOptions{KeyColumn: "sku", TimeColumn: "week", ValueColumn: "units", Layouts: []string{"02.01.2006"}, Comma: ';', FillGaps: true}
	ys, err := almanac.ReadCSV(strings.NewReader(in), opt)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "units", ys[0].Values, []float64{4, 5, math.NaN(), 7}, 0, 0)
	if !ys[0].Freq.Equal(calendar.Weekly) {
		t.Errorf("freq %v", ys[0].Freq)
	}
	// A given frequency is used as is: weekly data read as daily has gaps.
	opt.Freq, opt.FillGaps = calendar.Daily, false
	if _, err := almanac.ReadCSV(strings.NewReader(in), opt); !errors.Is(err, almanac.ErrCSVGap) {
		t.Errorf("weekly data as daily: %v", err)
	}
	// Location for zone-less times.
	ny, err := time.LoadLocation("America/New_York")
	if err != nil {
		t.Fatal(err)
	}
	ys, err = almanac.ReadCSV(strings.NewReader("series,period,value\na,2024-03-09,1\na,2024-03-10,2\na,2024-03-11,3\n"), almanac.CSVOptions{Location: ny})
	if err != nil {
		t.Fatal(err)
	}
	if ys[0].Start.Location() != ny || !ys[0].Freq.Equal(calendar.Daily) {
		t.Errorf("start %v freq %v", ys[0].Start, ys[0].Freq)
	}
}

func TestReadCSVErrors(t *testing.T) {
	h := "series,period,value\n"
	tests := []struct {
		name     string
		in       string
		opt      almanac.CSVOptions
		want     error
		wantLine int
	}{
		{"empty input", "", almanac.CSVOptions{}, almanac.ErrCSVHeader, 1},
		{"header only", h, almanac.CSVOptions{}, almanac.ErrEmpty, 0},
		{"missing column", "series,date,value\na,2024-01-01,1\n", almanac.CSVOptions{}, almanac.ErrCSVHeader, 1},
		{"column twice", "series,period,value,value\n", almanac.CSVOptions{}, almanac.ErrCSVHeader, 1},
		{"field count", h + "a,2024-01-01,1\na,2024-02-01\n", almanac.CSVOptions{}, almanac.ErrCSVSyntax, 3},
		{"bare quote", h + "a,2024-01-01,1\na,2024-02-01,\"2\"x\n", almanac.CSVOptions{}, almanac.ErrCSVSyntax, 3},
		{"bad value", h + "a,2024-01-01,1\na,2024-02-01,12kg\n", almanac.CSVOptions{}, almanac.ErrCSVValue, 3},
		{"infinite value", h + "a,2024-01-01,Inf\n", almanac.CSVOptions{}, almanac.ErrNonFinite, 2},
		{"bad time", h + "a,2024-01-01,1\na,01/02/2024,1\n", almanac.CSVOptions{}, almanac.ErrCSVTime, 3},
		{"duplicate", h + "a,2024-01-01,1\na,2024-02-01,2\na,2024-02-01,3\n", almanac.CSVOptions{}, almanac.ErrCSVDuplicate, 4},
		{"out of order when order is required", h + "a,2024-02-01,1\na,2024-03-01,2\na,2024-01-01,3\n", almanac.CSVOptions{RequireOrder: true}, almanac.ErrCSVOrder, 4},
		{"duplicate out of order", h + "a,2024-03-01,1\na,2024-01-01,2\na,2024-02-01,3\na,2024-01-01,4\n", almanac.CSVOptions{}, almanac.ErrCSVDuplicate, 5},
		// Issue 11: 1e309 was reported as "not a number".
		{"value beyond the float64 range", h + "a,2024-01-01,1e309\n", almanac.CSVOptions{}, almanac.ErrNonFinite, 2},
		{"negative value beyond the range", h + "a,2024-01-01,1\na,2024-02-01,-2.5e400\n", almanac.CSVOptions{}, almanac.ErrNonFinite, 3},
		{"infinity spelled out", h + "a,2024-01-01,-Infinity\n", almanac.CSVOptions{}, almanac.ErrNonFinite, 2},
		// Issue 11: number forms only Go's strconv reads.
		{"digit separators", h + "a,2024-01-01,1_000\n", almanac.CSVOptions{}, almanac.ErrCSVValue, 2},
		{"hexadecimal float", h + "a,2024-01-01,0x1p3\n", almanac.CSVOptions{}, almanac.ErrCSVValue, 2},
		{"hexadecimal integer", h + "a,2024-01-01,0x10\n", almanac.CSVOptions{}, almanac.ErrCSVValue, 2},
		{"exponent without digits", h + "a,2024-01-01,1e\n", almanac.CSVOptions{}, almanac.ErrCSVValue, 2},
		{"lone point", h + "a,2024-01-01,.\n", almanac.CSVOptions{}, almanac.ErrCSVValue, 2},
		{"two points", h + "a,2024-01-01,1.2.3\n", almanac.CSVOptions{}, almanac.ErrCSVValue, 2},
		{"gap", h + "a,2024-01-01,1\na,2024-02-01,2\na,2024-04-01,3\n", almanac.CSVOptions{}, almanac.ErrCSVGap, 4},
		{"first bad line wins", h + "b,2024-01-01,1\na,2024-01-01,1\na,2024-02-01,2\na,2024-02-01,2\nb,2024-02-01,1\nb,2024-01-01,1\n", almanac.CSVOptions{}, almanac.ErrCSVDuplicate, 5},
		{"off the grid", h + "a,2024-01-01,1\na,2024-04-01,2\na,2024-05-15,3\n", almanac.CSVOptions{Freq: calendar.Quarterly}, almanac.ErrCSVIrregular, 4},
		{"cannot infer", h + "a,2024-01-01,1\nb,2024-02-01,2\n", almanac.CSVOptions{}, almanac.ErrFrequency, 0},
		{"unknown frequency option", h + "a,2024-01-01,1\n", almanac.CSVOptions{Freq: calendar.Frequency{Unit: 42}}, almanac.ErrFrequency, -1},
		{"same column names", h, almanac.CSVOptions{KeyColumn: "value"}, almanac.ErrInvalid, -1},
		{"huge gap", h + "a,2000-01-01,1\na,2099-01-01,2\n", almanac.CSVOptions{Freq: calendar.Every(1, calendar.Minute), FillGaps: true}, almanac.ErrCSVGap, 3},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ys, err := almanac.ReadCSV(strings.NewReader(tt.in), tt.opt)
			if !errors.Is(err, tt.want) {
				t.Fatalf("err = %v, want %v", err, tt.want)
			}
			if ys != nil {
				t.Errorf("series returned with an error: %v", ys)
			}
			if !strings.HasPrefix(err.Error(), "almanac: ") {
				t.Errorf("message %q does not start with the package name", err)
			}
			if tt.wantLine < 0 {
				return
			}
			var ce *almanac.CSVError
			if !errors.As(err, &ce) {
				t.Fatalf("%T is not a *CSVError", err)
			}
			if ce.Line != tt.wantLine {
				t.Errorf("line %d, want %d (%v)", ce.Line, tt.wantLine, err)
			}
		})
	}
}

// TestReadCSVNumberForms: the decimal forms other CSV readers accept are
// read; surrounding spaces are ignored.
func TestReadCSVNumberForms(t *testing.T) {
	for _, tt := range []struct {
		cell string
		want float64
	}{
		{"12", 12}, {"-3.5", -3.5}, {".5", 0.5}, {"5.", 5}, {"+3", 3}, {"2e-3", 0.002}, {"1.5E+6", 1.5e6},
		{" 7 ", 7}, {"1e-400", 0}, {"1.7976931348623157e308", math.MaxFloat64}, {"-0", 0},
	} {
		t.Run(tt.cell, func(t *testing.T) {
			ys, err := almanac.ReadCSV(strings.NewReader("series,period,value\na,2024,"+tt.cell+"\na,2025,1\n"), almanac.CSVOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if ys[0].Values[0] != tt.want {
				t.Errorf("read %v, want %v", ys[0].Values[0], tt.want)
			}
		})
	}
}

// TestReadCSVUnordered (issue 11): rows of a series in any order are
// sorted by time; interleaved series keep the order of their first keys.
func TestReadCSVUnordered(t *testing.T) {
	in := "series,period,value\nb,2024-03,30\na,2024-02,2\nb,2024-01,10\na,2024-01,1\nb,2024-02,20\na,2024-04,4\n"
	ys, err := almanac.ReadCSV(strings.NewReader(in), almanac.CSVOptions{FillGaps: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(ys) != 2 || ys[0].Key != "b" || ys[1].Key != "a" {
		t.Fatalf("series %v", ys)
	}
	numtest.Slice(t, "b", ys[0].Values, []float64{10, 20, 30}, 0, 0)
	numtest.Slice(t, "a", ys[1].Values, []float64{1, 2, math.NaN(), 4}, 0, 0)
	if !ys[0].Start.Equal(utc(2024, 1, 1)) || !ys[1].Start.Equal(utc(2024, 1, 1)) {
		t.Errorf("starts %v, %v", ys[0].Start, ys[1].Start)
	}
	if _, err := almanac.ReadCSV(strings.NewReader(in), almanac.CSVOptions{RequireOrder: true}); !errors.Is(err, almanac.ErrCSVOrder) {
		t.Errorf("RequireOrder: err = %v, want ErrCSVOrder", err)
	}
}

// TestReadCSVLongCellQuoted (issue 11): a 10 MB bad cell used to be copied
// into the error message whole; now a short prefix and the length are.
func TestReadCSVLongCellQuoted(t *testing.T) {
	// The reproducer: a 10 MB value cell. The other columns use
	// 64 KB cells (the size does not matter beyond the 40 bytes quoted).
	big, mid := strings.Repeat("x", 10<<20), strings.Repeat("x", 64<<10)
	for _, tt := range []struct {
		name, in string
		want     error
	}{
		{"value", "series,period,value\na,2024-01-01," + big + "\n", almanac.ErrCSVValue},
		{"time", "series,period,value\na," + mid + ",1\n", almanac.ErrCSVTime},
		{"key", "series,period,value\n" + mid + ",2024-01-01,1\n" + mid + ",2024-01-01,2\n", almanac.ErrCSVDuplicate},
		{"multi-byte value", "series,period,value\na,2024-01-01," + strings.Repeat("é", 32<<10) + "\n", almanac.ErrCSVValue},
	} {
		t.Run(tt.name, func(t *testing.T) {
			_, err := almanac.ReadCSV(strings.NewReader(tt.in), almanac.CSVOptions{Freq: calendar.Monthly})
			if !errors.Is(err, tt.want) {
				t.Fatalf("err = %.200v, want %v", err, tt.want)
			}
			msg := err.Error()
			if len(msg) > 400 {
				t.Errorf("message of %d bytes: %.200s…", len(msg), msg)
			}
			if !utf8.ValidString(msg) {
				t.Errorf("message is not valid UTF-8: %q", msg)
			}
			if !strings.Contains(msg, "bytes)") {
				t.Errorf("message %q does not give the cell's length", msg)
			}
		})
	}
}

// TestCSVRoundTripEveryFrequency (issue 11): read → write → read gives the
// same series for every frequency, and times are written in the form
// the frequency reads back ("2026-01" for monthly data read as
// "2026-01", not "2026-01-01").
func TestCSVRoundTripEveryFrequency(t *testing.T) {
	tests := []struct {
		name  string
		times []string
		freq  calendar.Frequency
	}{
		{"yearly", []string{"2024", "2025", "2026"}, calendar.Yearly},
		{"yearly from July", []string{"2024-07", "2025-07", "2026-07"}, calendar.Yearly},
		{"every two years", []string{"2020", "2022", "2024"}, calendar.Every(2, calendar.Year)},
		{"quarterly", []string{"2025-10", "2026-01", "2026-04"}, calendar.Quarterly},
		{"monthly", []string{"2025-11", "2025-12", "2026-01"}, calendar.Monthly},
		{"month ends", []string{"2023-01-31", "2023-02-28", "2023-03-31"}, calendar.Monthly},
		{"every two months", []string{"2026-01", "2026-03", "2026-05"}, calendar.Every(2, calendar.Month)},
		{"weekly", []string{"2024-12-30", "2025-01-06", "2025-01-13"}, calendar.Weekly},
		{"daily", []string{"2024-02-28", "2024-02-29", "2024-03-01"}, calendar.Daily},
		{"hourly", []string{"2024-01-01 22:00", "2024-01-01 23:00", "2024-01-02 00:00"}, calendar.Hourly},
		{"every 15 minutes", []string{"2024-01-01T10:00:00Z", "2024-01-01T10:15:00Z", "2024-01-01T10:30:00Z"}, calendar.Every(15, calendar.Minute)},
		{"every minute", []string{"2024-01-01T10:00:00Z", "2024-01-01T10:01:00Z", "2024-01-01T10:02:00Z"}, calendar.Every(1, calendar.Minute)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var in strings.Builder
			in.WriteString("series,period,value\n")
			for i, tm := range tt.times {
				v := []string{"1.5", "NA", "-2e-300"}[i]
				in.WriteString("k," + tm + "," + v + "\n")
			}
			first, err := almanac.ReadCSV(strings.NewReader(in.String()), almanac.CSVOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if !first[0].Freq.Equal(tt.freq) {
				t.Fatalf("frequency %v, want %v", first[0].Freq, tt.freq)
			}
			var buf bytes.Buffer
			if err := almanac.WriteSeriesCSV(&buf, first, almanac.CSVOptions{}); err != nil {
				t.Fatal(err)
			}
			lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
			if want := "k," + tt.times[0] + ",1.5"; !strings.Contains(tt.name, "hourly") && !strings.Contains(tt.name, "minute") && lines[1] != want {
				t.Errorf("first row %q, want %q", lines[1], want)
			}
			if want := "k," + almanac.MissingValueText; !strings.HasPrefix(lines[2], "k,") || !strings.HasSuffix(lines[2], ","+almanac.MissingValueText) {
				t.Errorf("missing value written as %q, want the %q spelling", lines[2], want)
			}
			again, err := almanac.ReadCSV(&buf, almanac.CSVOptions{})
			if err != nil {
				t.Fatalf("re-reading %q: %v", buf.String(), err)
			}
			if len(again) != 1 || again[0].Key != "k" || !again[0].Start.Equal(first[0].Start) || !again[0].Freq.Equal(first[0].Freq) {
				t.Fatalf("re-read %+v, want %+v", again, first)
			}
			if !bitsEqualNaN(again[0].Values, first[0].Values) {
				t.Fatalf("values %v re-read as %v", first[0].Values, again[0].Values)
			}
		})
	}
}

// TestWriteSeriesCSVRefusesEmpty: a series without observations would
// have no row, and so be missing from the file without a trace.
func TestWriteSeriesCSVRefusesEmpty(t *testing.T) {
	var buf bytes.Buffer
	err := almanac.WriteSeriesCSV(&buf, []almanac.Series{monthly("a", 1), monthly("empty")}, almanac.CSVOptions{})
	if !errors.Is(err, almanac.ErrEmpty) || buf.Len() != 0 {
		t.Errorf("err = %v, wrote %q", err, buf.String())
	}
}

func TestCSVRoundTrip(t *testing.T) {
	nan := math.NaN()
	ys := []almanac.Series{
		{Key: "garden/hoses", Start: utc(2023, 1, 31), Freq: calendar.Monthly, Values: []float64{1, nan, 3.25, 1e-300, -7}},
		{Key: "with,comma \"quoted\"", Start: utc(2023, 1, 1), Freq: calendar.Quarterly, Values: []float64{0.1, 0.2}},
		{Key: "meter", Start: time.Date(2024, 3, 10, 5, 45, 0, 0, time.UTC), Freq: calendar.Every(15, calendar.Minute), Values: []float64{5, 6, 7}},
	}
	for i, y := range ys {
		t.Run(y.Key, func(t *testing.T) {
			var buf bytes.Buffer
			if err := almanac.WriteSeriesCSV(&buf, ys[i:i+1], almanac.CSVOptions{}); err != nil {
				t.Fatal(err)
			}
			got, err := almanac.ReadCSV(&buf, almanac.CSVOptions{FillGaps: true})
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != 1 || got[0].Key != y.Key || !got[0].Start.Equal(y.Start) || !got[0].Freq.Equal(y.Freq) {
				t.Fatalf("read back %+v", got)
			}
			numtest.Slice(t, "values", got[0].Values, y.Values, 0, 0)
		})
	}
}

// TestWriteForecastCSV (issue 11, item 4): every series of the batch is
// in the file, a failed one as a row with status "failed" and its
// reason, so a nightly job can tell 16 missing series from none.
func TestWriteForecastCSV(t *testing.T) {
	y := almanac.Series{Key: "A", Start: utc(2024, 1, 1), Freq: calendar.Monthly, Values: []float64{1, 2, 4}}
	f, err := almanac.Naive{}.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	fa, _ := f.Forecast(2, 95, 80)
	fb, _ := f.Forecast(1)
	var buf bytes.Buffer
	err = almanac.WriteForecastCSV(&buf, []almanac.BatchForecast{
		{Key: "A", Forecast: fa}, {Key: "B", Forecast: fb},
		{Key: "C", Err: fmt.Errorf("almanac: series \"C\": %w, see below", almanac.ErrTooShort)},
		{Key: "D"}, // no error, but no forecast either
	}, almanac.CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	want := []string{
		"series,period,step,point,band80_low,band80_high,band95_low,band95_high,status,reason",
		"A,2024-04,1,4,", "A,2024-05,2,4,",
		"B,2024-04,1,4,NaN,NaN,NaN,NaN,ok,",
		`C,,,NaN,NaN,NaN,NaN,NaN,failed,"almanac: series ""C"": series too short, see below"`,
		"D,,,NaN,NaN,NaN,NaN,NaN,failed,no forecast steps",
	}
	if len(lines) != len(want) {
		t.Fatalf("%d lines, want %d:\n%s", len(lines), len(want), buf.String())
	}
	for i, w := range want {
		if !strings.HasPrefix(lines[i], w) {
			t.Errorf("line %d = %q, want %q…", i, lines[i], w)
		}
	}
	for _, i := range []int{1, 2} {
		if !strings.HasSuffix(lines[i], ",ok,") {
			t.Errorf("line %d = %q, want status ok and no reason", i, lines[i])
		}
	}
	// The file reads back with encoding/csv: one record per line, every
	// key of the batch present.
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	keys := map[string]string{}
	for _, r := range recs[1:] {
		keys[r[0]] = r[len(r)-2]
	}
	if len(keys) != 4 || keys["C"] != almanac.ForecastFailed || keys["A"] != almanac.ForecastOK {
		t.Errorf("keys and statuses %v", keys)
	}
	// All series failed: still one row each.
	buf.Reset()
	if err := almanac.WriteForecastCSV(&buf, []almanac.BatchForecast{{Key: "x", Err: almanac.ErrEmpty}}, almanac.CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	if got := strings.TrimSpace(buf.String()); got != "series,period,step,point,status,reason\nx,,,NaN,failed,empty series" {
		t.Errorf("all failed: %q", got)
	}
}

// TestWriteCSVErrors: the writers refuse what they cannot write in a form
// ReadCSV reads back (an invalid frequency used to write every row with
// the start time) and bad options, writing nothing.
func TestWriteCSVErrors(t *testing.T) {
	good := almanac.Series{Key: "A", Start: utc(2024, 1, 1), Freq: calendar.Monthly, Values: []float64{1, 2}}
	noFreq := almanac.Series{Key: "B", Start: utc(2024, 1, 1), Values: []float64{1, 2}}
	fc := almanac.Forecast{Start: utc(2024, 3, 1), Mean: []float64{3, 4}}
	tests := []struct {
		name  string
		write func(w *bytes.Buffer) error
		want  error
	}{
		{"series without frequency", func(w *bytes.Buffer) error {
			return almanac.WriteSeriesCSV(w, []almanac.Series{good, noFreq}, almanac.CSVOptions{})
		}, almanac.ErrFrequency},
		{"series negative digits", func(w *bytes.Buffer) error {
			return almanac.WriteSeriesCSV(w, []almanac.Series{good}, almanac.CSVOptions{Digits: -1})
		}, almanac.ErrInvalid},
		{"forecast without frequency", func(w *bytes.Buffer) error {
			return almanac.WriteForecastCSV(w, []almanac.BatchForecast{{Key: "A", Forecast: fc}}, almanac.CSVOptions{})
		}, almanac.ErrFrequency},
		{"forecast same column names", func(w *bytes.Buffer) error {
			return almanac.WriteForecastCSV(w, nil, almanac.CSVOptions{KeyColumn: "x", TimeColumn: "x"})
		}, almanac.ErrInvalid},
		{"forecast key column named like the status column", func(w *bytes.Buffer) error {
			return almanac.WriteForecastCSV(w, nil, almanac.CSVOptions{KeyColumn: almanac.ForecastStatusColumn})
		}, almanac.ErrInvalid},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := tt.write(&buf); !errors.Is(err, tt.want) {
				t.Errorf("err = %v, want %v", err, tt.want)
			}
			if buf.Len() != 0 {
				t.Errorf("wrote %q", buf.String())
			}
		})
	}
}

// FuzzReadCSV: ReadCSV never panics; what it accepts is a set of valid
// regular series (unless all values of one are missing) that write back
// and read again unchanged.
func FuzzReadCSV(f *testing.F) {
	h := "series,period,value\n"
	for _, s := range []string{
		h + "a,2024-01-01,1\na,2024-02-01,2\nb,2024-01-01,NA\nb,2024-02-01,3\n",
		h + "a,2024-01-01T00:00:00Z,1\na,2024-01-01T00:15:00Z,2\n",
		h + "a,2024,1\na,2026,2\n",
		h + "a,2024-01-31,1\na,2024-02-29,2\na,2024-03-31,x\n",
		h + "a,2024-01-01,1\na,2024-01-01,1\n",
		h + "\"q\"\"k\",2024-01-01,1e308\n\"q\"\"k\",2024-01-02,-0\n",
		"value,period,series\n1,2024-01-01,a\n",
		h + "a,2024-01-01T00:00:00+01:00,1\na,2024-01-02T00:00:00+01:00,2\n",
		h + "\"a\rb\",2024-01-01,1\n\" a\",2024-01-01,2\n\" a\",2024-01-02,2\n",
		"",
		h,
	} {
		f.Add(s, false)
		f.Add(s, true)
	}
	f.Fuzz(func(t *testing.T, in string, fill bool) {
		ys, err := almanac.ReadCSV(strings.NewReader(in), almanac.CSVOptions{FillGaps: fill})
		if err != nil {
			if ys != nil {
				t.Fatal("series and error")
			}
			if !strings.HasPrefix(err.Error(), "almanac: ") {
				t.Fatalf("message %q", err)
			}
			return
		}
		if len(ys) == 0 {
			t.Fatal("no series and no error")
		}
		for _, y := range ys {
			if err := y.Validate(); err != nil && !errors.Is(err, almanac.ErrAllMissing) {
				t.Fatalf("series %q invalid: %v", y.Key, err)
			}
		}
		var buf bytes.Buffer
		if err := almanac.WriteSeriesCSV(&buf, ys, almanac.CSVOptions{}); err != nil {
			t.Fatal(err)
		}
		again, err := almanac.ReadCSV(&buf, almanac.CSVOptions{Freq: ys[0].Freq, FillGaps: true})
		if err != nil {
			t.Fatalf("re-reading our own output: %v\n%s", err, buf.String())
		}
		if len(again) != len(ys) {
			t.Fatalf("%d series, re-read %d", len(ys), len(again))
		}
		for i := range ys {
			if again[i].Key != ys[i].Key || !again[i].Start.Equal(ys[i].Start) {
				t.Fatalf("series %d: %q %v re-read as %q %v", i, ys[i].Key, ys[i].Start, again[i].Key, again[i].Start)
			}
			if !bitsEqualNaN(again[i].Values, ys[i].Values) {
				t.Fatalf("series %q values %v re-read as %v", ys[i].Key, ys[i].Values, again[i].Values)
			}
		}
	})
}

func bitsEqualNaN(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if !(a[i] == b[i] || math.IsNaN(a[i]) && math.IsNaN(b[i])) {
			return false
		}
	}
	return true
}

func TestParseValue(t *testing.T) {
	tests := []struct {
		in        string
		want      float64
		missing   bool
		err       error
		nonFinite bool
	}{
		{in: "12", want: 12},
		{in: " -3.5 ", want: -3.5},
		{in: ".5", want: 0.5},
		{in: "2e-3", want: 2e-3},
		{in: "1.5E+6", want: 1.5e6},
		{in: "", missing: true},
		{in: "na", missing: true},
		{in: "N/A", missing: true},
		{in: "NaN", missing: true},
		{in: " null ", missing: true},
		{in: "Inf", err: almanac.ErrCSVValue, nonFinite: true},
		{in: "-infinity", err: almanac.ErrCSVValue, nonFinite: true},
		{in: "1e309", err: almanac.ErrCSVValue, nonFinite: true},
		{in: "1_000", err: almanac.ErrCSVValue},
		{in: "0x1p3", err: almanac.ErrCSVValue},
		{in: "twelve", err: almanac.ErrCSVValue},
		{in: "1e", err: almanac.ErrCSVValue},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			got, err := almanac.ParseValue(tt.in)
			switch {
			case tt.err != nil:
				if !errors.Is(err, tt.err) || errors.Is(err, almanac.ErrNonFinite) != tt.nonFinite {
					t.Fatalf("ParseValue(%q) = %v, %v; want an error wrapping %v (non-finite %v)", tt.in, got, err, tt.err, tt.nonFinite)
				}
			case err != nil:
				t.Fatalf("ParseValue(%q): %v", tt.in, err)
			case tt.missing:
				if !math.IsNaN(got) {
					t.Fatalf("ParseValue(%q) = %v, want NaN", tt.in, got)
				}
			case got != tt.want:
				t.Fatalf("ParseValue(%q) = %v, want %v", tt.in, got, tt.want)
			}
		})
	}
}
