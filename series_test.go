package almanac_test

import (
	"encoding/binary"
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
)

func TestSeriesValidate(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	start := utc(2024, 1, 1)
	tests := []struct {
		name      string
		s         almanac.Series
		want      error
		wantIndex int
	}{
		{"ok", almanac.Series{Key: "a", Start: start, Freq: calendar.Monthly, Values: []float64{1, nan, 3}}, nil, 0},
		{"constant is valid", almanac.Series{Start: start, Freq: calendar.Monthly, Values: []float64{2, 2}}, nil, 0},
		{"empty", almanac.Series{Start: start, Freq: calendar.Monthly}, almanac.ErrEmpty, -1},
		{"all missing", almanac.Series{Start: start, Freq: calendar.Monthly, Values: []float64{nan, nan}}, almanac.ErrAllMissing, -1},
		{"plus inf", almanac.Series{Start: start, Freq: calendar.Monthly, Values: []float64{1, 2, inf}}, almanac.ErrNonFinite, 2},
		{"minus inf", almanac.Series{Start: start, Freq: calendar.Monthly, Values: []float64{-inf}}, almanac.ErrNonFinite, 0},
		{"unset frequency", almanac.Series{Start: start, Values: []float64{1}}, almanac.ErrFrequency, -2},
		{"unknown frequency", almanac.Series{Start: start, Freq: calendar.Frequency{Unit: 99}, Values: []float64{1}}, almanac.ErrFrequency, -2},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.s.Validate()
			if !errors.Is(err, tt.want) || (tt.want == nil) != (err == nil) {
				t.Fatalf("err = %v, want %v", err, tt.want)
			}
			if err == nil || tt.wantIndex == -2 {
				return
			}
			var se *almanac.SeriesError
			if !errors.As(err, &se) || se.Index != tt.wantIndex {
				t.Errorf("error %v: want *SeriesError at index %d", err, tt.wantIndex)
			}
		})
	}
	if _, err := almanac.NewSeries("x", start, calendar.Monthly, nil); !errors.Is(err, almanac.ErrEmpty) {
		t.Errorf("NewSeries(nil): %v", err)
	}
}

func TestSeriesAccessors(t *testing.T) {
	nan := math.NaN()
	vals := []float64{1, nan, 3, 4, 5}
	s, err := almanac.NewSeries("x", utc(2023, 11, 30), calendar.Monthly, vals)
	if err != nil {
		t.Fatal(err)
	}
	vals[0] = 99 // NewSeries copied
	if s.Values[0] != 1 {
		t.Error("NewSeries did not copy values")
	}
	if got := s.Time(3); !got.Equal(utc(2024, 2, 29)) {
		t.Errorf("Time(3) = %v", got)
	}
	if got := s.End(); !got.Equal(utc(2024, 3, 30)) {
		t.Errorf("End() = %v", got)
	}
	if i, err := s.Index(utc(2024, 5, 30)); err != nil || i != 6 {
		t.Errorf("Index = %d, %v", i, err)
	}
	if _, err := s.Index(utc(2024, 5, 29)); !errors.Is(err, calendar.ErrNotAligned) {
		t.Errorf("Index off the grid: %v", err)
	}
	if s.Missing() != 1 || s.Len() != 5 || s.Period() != 12 {
		t.Errorf("Missing %d Len %d Period %d", s.Missing(), s.Len(), s.Period())
	}
	w := s.Window(1, 3)
	if w.Len() != 2 || !w.Start.Equal(s.Time(1)) {
		t.Errorf("Window: %v", w)
	}
	numtest.Slice(t, "head", s.Head(2).Values, []float64{1, nan}, 0, 0)
	numtest.Slice(t, "tail", s.Tail(2).Values, []float64{4, 5}, 0, 0)
	if s.Window(4, 2).Len() != 0 || s.Head(10).Len() != 5 || s.Tail(-1).Len() != 0 {
		t.Error("clamping of Window/Head/Tail")
	}
	train, test, err := s.Split(2)
	if err != nil || train.Len() != 3 || test.Len() != 2 || !test.Start.Equal(s.Time(3)) {
		t.Errorf("Split: %v %v %v", train, test, err)
	}
	for _, k := range []int{0, 5, -1} {
		if _, _, err := s.Split(k); !errors.Is(err, almanac.ErrTooShort) {
			t.Errorf("Split(%d): %v", k, err)
		}
	}
	c := s.Clone()
	c.Values[0] = -1
	if s.Values[0] != 1 {
		t.Error("Clone shares values")
	}
	if err := s.CheckComplete(); !errors.Is(err, almanac.ErrMissing) {
		t.Errorf("CheckComplete: %v", err)
	}
	if err := c.CheckPositive(); !errors.Is(err, almanac.ErrNonPositive) {
		t.Errorf("CheckPositive: %v", err)
	}
	if s.IsConstant() || !(almanac.Series{Values: []float64{nan, 2, nan, 2}}).IsConstant() {
		t.Error("IsConstant")
	}
}

// FuzzSeriesValidate: Validate never panics and accepts exactly the
// series with a valid frequency, at least one observed value and no ±Inf.
func FuzzSeriesValidate(f *testing.F) {
	enc := func(vs ...float64) []byte {
		b := make([]byte, 8*len(vs))
		for i, v := range vs {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
		}
		return b
	}
	f.Add(enc(1, 2, 3), 5, 1)
	f.Add(enc(), 5, 1)
	f.Add(enc(math.NaN(), math.NaN()), 3, 0)
	f.Add(enc(1, math.Inf(-1)), 7, 2)
	f.Add(enc(0, -0, 1e308), 0, 0)
	f.Add(enc(4), 42, -3)
	f.Fuzz(func(t *testing.T, raw []byte, unit, n int) {
		vals := make([]float64, len(raw)/8)
		observed, inf := 0, false
		for i := range vals {
			vals[i] = math.Float64frombits(binary.LittleEndian.Uint64(raw[8*i:]))
			if math.IsInf(vals[i], 0) {
				inf = true
			} else if !math.IsNaN(vals[i]) {
				observed++
			}
		}
		freq := calendar.Frequency{Unit: calendar.Unit(unit), N: n}
		s := almanac.Series{Key: "f", Start: time.Unix(0, 0).UTC(), Freq: freq, Values: vals}
		err := s.Validate()
		wantOK := freq.Validate() == nil && len(vals) > 0 && observed > 0 && !inf
		if wantOK != (err == nil) {
			t.Fatalf("Validate() = %v for %v (freq ok %v, n %d, observed %d, inf %v)", err, vals, freq.Validate() == nil, len(vals), observed, inf)
		}
		if err != nil && !errors.Is(err, almanac.ErrFrequency) && !errors.Is(err, almanac.ErrEmpty) &&
			!errors.Is(err, almanac.ErrAllMissing) && !errors.Is(err, almanac.ErrNonFinite) {
			t.Fatalf("error %v wraps no sentinel", err)
		}
	})
}
