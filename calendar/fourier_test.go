package calendar_test

import (
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac/calendar"
)

func TestFourierValues(t *testing.T) {
	// Period 4, k = 2 at t = 1..4: sin(πt/2), cos(πt/2), cos(πt); the
	// sine of the Nyquist pair sin(πt) vanishes at integers and is left
	// out (common practice). Values are exact trigonometry.
	cols, err := calendar.Fourier(4, 4, 2)
	if err != nil {
		t.Fatal(err)
	}
	want := [][]float64{{1, 0, -1, 0}, {0, -1, 0, 1}, {-1, 1, -1, 1}}
	if len(cols) != len(want) {
		t.Fatalf("%d columns, want %d", len(cols), len(want))
	}
	for c := range want {
		for i := range want[c] {
			if math.Abs(cols[c][i]-want[c][i]) > 1e-15 {
				t.Errorf("col %d t %d = %v, want %v", c, i+1, cols[c][i], want[c][i])
			}
		}
	}
}

// TestFourierOrthogonal: over whole cycles the Fourier columns are
// orthogonal with squared norm n/2 (discrete orthogonality of sines and
// cosines, a standard identity).
func TestFourierOrthogonal(t *testing.T) {
	const period, k, cycles = 12, 5, 3
	n := period * cycles
	cols, err := calendar.Fourier(n, period, k)
	if err != nil {
		t.Fatal(err)
	}
	for a := range cols {
		for b := range cols {
			dot := 0.0
			for i := range n {
				dot += cols[a][i] * cols[b][i]
			}
			want := 0.0
			if a == b {
				want = float64(n) / 2
			}
			if math.Abs(dot-want) > 1e-9 {
				t.Errorf("<col %d, col %d> = %v, want %v", a, b, dot, want)
			}
		}
	}
}

func TestFourierFromContinues(t *testing.T) {
	all, err := calendar.Fourier(30, 365.25/7, 3)
	if err != nil {
		t.Fatal(err)
	}
	tail, err := calendar.FourierFrom(21, 10, 365.25/7, 3)
	if err != nil {
		t.Fatal(err)
	}
	for c := range all {
		for i := range 10 {
			if math.Abs(all[c][20+i]-tail[c][i]) > 1e-12 {
				t.Fatalf("col %d step %d: %v vs %v", c, 21+i, all[c][20+i], tail[c][i])
			}
		}
	}
	if len(all) != 6 {
		t.Errorf("non-integer period: %d columns, want 6", len(all))
	}
}

func TestFourierErrors(t *testing.T) {
	tests := []struct {
		name   string
		n, k   int
		period float64
	}{
		{"k zero", 10, 0, 12},
		{"k too large", 10, 7, 12},
		{"period one", 10, 1, 1},
		{"period NaN", 10, 1, math.NaN()},
		{"period Inf", 10, 1, math.Inf(1)},
		{"negative n", -1, 1, 12},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := calendar.Fourier(tt.n, tt.period, tt.k); !errors.Is(err, calendar.ErrFourier) {
				t.Errorf("err = %v, want ErrFourier", err)
			}
		})
	}
}
