package reconcile_test

import (
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/reconcile"
)

func TestAggregate(t *testing.T) {
	h, err := reconcile.NewHierarchy(
		reconcile.Link{Name: "all"},
		reconcile.Link{Name: "east", Parent: "all"},
		reconcile.Link{Name: "west", Parent: "all"},
		reconcile.Link{Name: "e1", Parent: "east"},
		reconcile.Link{Name: "e2", Parent: "east"},
		reconcile.Link{Name: "w1", Parent: "west"},
	)
	if err != nil {
		t.Fatal(err)
	}
	start := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC)
	ser := func(key string, v ...float64) almanac.Series {
		return almanac.Series{Key: key, Start: start, Freq: calendar.Monthly, Values: v}
	}
	names := h.Names()
	n, m := h.Len(), h.NumBottom()
	bottom := make([]almanac.Series, m)
	data := map[string][]float64{"e1": {1, 2, math.NaN()}, "e2": {10, 20, 30}, "w1": {100, 200, 300}}
	for j := range m {
		bottom[j] = ser("in-"+names[n-m+j], data[names[n-m+j]]...)
	}
	got, err := reconcile.Aggregate(h, bottom)
	if err != nil {
		t.Fatal(err)
	}
	// Sums worked by hand from the table above.
	want := map[string][]float64{
		"all": {111, 222, math.NaN()}, "east": {11, 22, math.NaN()}, "west": {100, 200, 300},
		"e1": {1, 2, math.NaN()}, "e2": {10, 20, 30}, "w1": {100, 200, 300},
	}
	if len(got) != n {
		t.Fatalf("%d series, want %d", len(got), n)
	}
	for i, y := range got {
		if y.Key != names[i] || !y.Start.Equal(start) || y.Freq != calendar.Monthly {
			t.Fatalf("node %d: key %q start %v freq %v", i, y.Key, y.Start, y.Freq)
		}
		w := want[y.Key]
		for k := range w {
			if !(y.Values[k] == w[k] || math.IsNaN(y.Values[k]) && math.IsNaN(w[k])) {
				t.Fatalf("%s = %v, want %v", y.Key, y.Values, w)
			}
		}
	}
	// Aggregate copies: changing the output leaves the input alone.
	got[n-m].Values[0] = -1
	if bottom[0].Values[0] == -1 {
		t.Fatal("the bottom series share storage with the output")
	}

	bad := []struct {
		name   string
		st     reconcile.Structure
		bottom []almanac.Series
		want   error
	}{
		{"nil structure", nil, bottom, almanac.ErrInvalid},
		{"too few", h, bottom[:2], almanac.ErrLength},
		{"lengths differ", h, []almanac.Series{bottom[0], bottom[1], ser("w1", 1, 2)}, almanac.ErrLength},
		{"grids differ", h, []almanac.Series{bottom[0], bottom[1], {Key: "w1", Start: start.AddDate(0, 1, 0), Freq: calendar.Monthly, Values: []float64{1, 2, 3}}}, almanac.ErrInvalid},
		{"infinite value", h, []almanac.Series{bottom[0], bottom[1], ser("w1", 1, math.Inf(1), 3)}, almanac.ErrNonFinite},
		{"sum overflows", h, []almanac.Series{ser("e1", 1e308, 0, 0), ser("e2", 1e308, 0, 0), ser("w1", 0, 0, 0)}, almanac.ErrNonFinite},
	}
	for _, tt := range bad {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := reconcile.Aggregate(tt.st, tt.bottom); !errors.Is(err, tt.want) {
				t.Fatalf("error %v, want one wrapping %v", err, tt.want)
			}
		})
	}
}
