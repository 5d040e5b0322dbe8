package almanac_test

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

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
		{"out of order", h + "a,2024-02-01,1\na,2024-03-01,2\na,2024-01-01,3\n", almanac.CSVOptions{}, almanac.ErrCSVOrder, 4},
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
		{Key: "A", Forecast: fa}, {Key: "B", Forecast: fb}, {Key: "C", Err: almanac.ErrTooShort},
	}, almanac.CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	want0 := "series,period,step,point,band80_low,band80_high,band95_low,band95_high"
	if lines[0] != want0 {
		t.Errorf("header %q, want %q", lines[0], want0)
	}
	if len(lines) != 4 {
		t.Fatalf("%d lines, want header + 3 rows:\n%s", len(lines), buf.String())
	}
	if !strings.HasPrefix(lines[1], "A,2024-04-01,1,4,") || !strings.HasPrefix(lines[2], "A,2024-05-01,2,4,") {
		t.Errorf("rows %q", lines[1:3])
	}
	if lines[3] != "B,2024-04-01,1,4,NA,NA,NA,NA" {
		t.Errorf("row without intervals %q", lines[3])
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
