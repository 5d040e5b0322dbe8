package seasonal

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestFilterWeights: the weights of R's decompose (see
// ../../../shared/reference/README.md "R decompose"): c(0.5, 1, ..., 1,
// 0.5)/f for even f, rep(1, f)/f for odd f.
func TestFilterWeights(t *testing.T) {
	tests := []struct {
		name string
		m    int
		want []float64
	}{
		{"even 4", 4, []float64{0.125, 0.25, 0.25, 0.25, 0.125}},
		{"odd 3", 3, []float64{1.0 / 3, 1.0 / 3, 1.0 / 3}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			numtest.Slice(t, "weights", Filter(tc.m), tc.want, 1e-15, 0)
		})
	}
}

// TestClassicalByHand checks an additive decomposition worked by hand:
// y = 1..8 plus a period-2 pattern (+1, −1). The 2×2 moving average of a
// line plus an alternating ±1 is the line itself, so the trend is
// t+1 (1-based) away from the ends, the figure is (+1, −1) and the
// remainder is 0.
func TestClassicalByHand(t *testing.T) {
	y := []float64{2, 1, 4, 3, 6, 5, 8, 7}
	r, err := Classical(y, 2, false)
	if err != nil {
		t.Fatal(err)
	}
	nan := math.NaN()
	numtest.Slice(t, "trend", r.Trend, []float64{nan, 2, 3, 4, 5, 6, 7, nan}, 1e-12, 0)
	numtest.Slice(t, "figure", r.Figure, []float64{1, -1}, 1e-12, 0)
	numtest.Slice(t, "remainder", r.Remainder, []float64{nan, 0, 0, 0, 0, 0, 0, nan}, 1e-12, 0)
}

func TestClassicalErrors(t *testing.T) {
	if _, err := Classical([]float64{1, 2, 3}, 2, false); !errors.Is(err, ErrShort) {
		t.Errorf("short series: err = %v, want ErrShort", err)
	}
	if _, err := Classical([]float64{1, 2, 3, 4}, 1, false); !errors.Is(err, ErrShort) {
		t.Errorf("period 1: err = %v, want ErrShort", err)
	}
}

// TestIsSeasonal: a pure sine of period 12 over 10 years is seasonal;
// independent noise is not (|r_12| is O(1/√n), well inside the bound);
// too short a series (< 3 periods) is never seasonal (the test's n ≥ 3m
// rule). Note that a strong trend can pass the test, since every r_k of a
// trending series is large; the test is meant for the raw series as the
// M4 benchmark code applies it.
func TestIsSeasonal(t *testing.T) {
	sine := make([]float64, 120)
	for i := range sine {
		sine[i] = 10 + math.Sin(2*math.Pi*float64(i)/12)
	}
	if !IsSeasonal(sine, 12, 1.645) {
		t.Error("sine of period 12 not judged seasonal")
	}
	rng := rand.New(rand.NewPCG(1, 2))
	noise := make([]float64, 120)
	for i := range noise {
		noise[i] = rng.NormFloat64()
	}
	if IsSeasonal(noise, 12, 1.645) {
		t.Error("white noise judged seasonal")
	}
	if IsSeasonal(sine[:30], 12, 1.645) {
		t.Error("30 observations of period 12 judged seasonal")
	}
}
