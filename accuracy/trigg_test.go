package accuracy_test

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/smoothing"
)

func TestTriggSignal(t *testing.T) {
	tests := []struct {
		name   string
		errs   []float64
		alpha  float64
		want   float64
		reason string
	}{
		// Computed by hand: M starts at mean(|1|, |−1|) = 1 (⌈1/0.5⌉ = 2
		// errors), E at 0; after 1, −1, 2, 0, 3 the recursions give
		// E = 1.71875 and M = 1.875, so T = 11/12.
		{"hand computed", []float64{1, -1, 2, 0, 3}, 0.5, 11.0 / 12, "worked by hand from the definition"},
		// The same with a missing error in the middle: NaN is passed over.
		{"missing passed over", []float64{1, -1, math.NaN(), 2, 0, 3}, 0.5, 11.0 / 12, "a NaN leaves E and M unchanged"},
		// A constant error c gives M_t = |c| throughout and
		// E_n = c·(1 − (1 − α)^n).
		{"constant error", []float64{2, 2, 2, 2}, 0.1, 1 - math.Pow(0.9, 4), "E builds up from 0 towards M"},
		// By hand: M_0 = mean(3, 1, 2) = 2 (⌈1/0.3⌉ = 4 > 3 errors);
		// E = −0.9, −0.93, −1.251; M = 2.3, 1.91, 1.937.
		{"all negative", []float64{-3, -1, -2}, 0.3, -1.251 / 1.937, "worked by hand from the definition"},
		// E = max·(0.5, 0.75, −0.125) and M = max throughout: no overflow.
		{"near the float64 limit", []float64{math.MaxFloat64, math.MaxFloat64, -math.MaxFloat64}, 0.5, -0.125, "the convex combinations cannot overflow"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := accuracy.TriggSignal(tc.errs, tc.alpha)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got-tc.want) > 1e-14 {
				t.Fatalf("got %v, want %v (%s)", got, tc.want, tc.reason)
			}
		})
	}
}

func TestTriggSignalBadInput(t *testing.T) {
	tests := []struct {
		name  string
		errs  []float64
		alpha float64
		want  error
	}{
		{"empty", nil, 0.1, almanac.ErrEmpty},
		{"alpha 0", []float64{1}, 0, almanac.ErrInvalid},
		{"alpha 1", []float64{1}, 1, almanac.ErrInvalid},
		{"alpha NaN", []float64{1}, math.NaN(), almanac.ErrInvalid},
		{"infinite error", []float64{1, math.Inf(-1)}, 0.1, almanac.ErrNonFinite},
		{"all missing", []float64{math.NaN(), math.NaN()}, 0.1, almanac.ErrAllMissing},
		{"all zero", []float64{0, 0, 0}, 0.1, accuracy.ErrUndefined},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := accuracy.TriggSignal(tc.errs, tc.alpha)
			if !errors.Is(err, tc.want) {
				t.Fatalf("error %v, want one wrapping %v", err, tc.want)
			}
			if !math.IsNaN(got) {
				t.Fatalf("value %v beside an error, want NaN", got)
			}
		})
	}
}

// TestTriggLimit checks TriggLimit (Trigg 1964's 95% limit for a
// smoothing constant of 0.1, recalled from memory) and the 0.74 he gave
// for 0.2 by simulation: with independent standard normal errors the
// signal after 100 periods (the start long forgotten: 0.9^100 ≈ 3e-5)
// should exceed the limit in about 5% of series. With 4000 series the
// binomial standard error of the rate is 0.0034; the band below is
// ±3.5 of them. The same simulation gives the rate beyond 0.5, the
// default limit of almanac.RefreshPolicy (which computes the same
// signal), quoted in its documentation: about 7.6% (measured here;
// standard error 0.0042, band ±3.5 of them).
func TestTriggLimit(t *testing.T) {
	for _, tc := range []struct {
		alpha, limit, lo, hi float64
	}{
		{accuracy.TriggAlpha, accuracy.TriggLimit, 0.038, 0.062},
		{0.2, 0.74, 0.038, 0.062},
		{almanac.DefaultSignalWeight, almanac.DefaultSignalLimit, 0.061, 0.091},
	} {
		rng := rand.New(rand.NewPCG(1964, 271))
		const series, length = 4000, 100
		errs := make([]float64, length)
		out := 0
		for range series {
			for i := range errs {
				errs[i] = rng.NormFloat64()
			}
			s, err := accuracy.TriggSignal(errs, tc.alpha)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(s) > tc.limit {
				out++
			}
		}
		rate := float64(out) / series
		t.Logf("alpha %v: |signal| > %v in %.4f of unbiased series", tc.alpha, tc.limit, rate)
		if rate < tc.lo || rate > tc.hi {
			t.Errorf("alpha %v: |signal| > %v in %.4f of unbiased series, want it in [%v, %v]", tc.alpha, tc.limit, rate, tc.lo, tc.hi)
		}
	}
}

// TestTriggSignalMatchesRefreshPolicy: the refresh policy's tracking
// signal is TriggSignal of the model's one-step errors on the data's
// scale with the policy's weight (one implementation, internal/trigg,
// serves both), before and after a refresh with a missing value.
func TestTriggSignalMatchesRefreshPolicy(t *testing.T) {
	y := paintSales(60)
	fit, err := smoothing.Spec{Trend: smoothing.DampedTrend}.Fit(context.Background(), y.Head(48))
	if err != nil {
		t.Fatal(err)
	}
	newer := slices.Clone(y.Values[48:])
	newer[3] = math.NaN()
	for i := range newer {
		newer[i] += 30 // a shift the model has not seen: the signal rises
	}
	refreshed, err := almanac.Refresh(fit, newer)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		f      almanac.Fitted
		policy almanac.RefreshPolicy
	}{
		{"fitted", fit, almanac.RefreshPolicy{}},
		{"refreshed", refreshed, almanac.RefreshPolicy{}},
		{"refreshed, weight 0.3", refreshed, almanac.RefreshPolicy{SignalWeight: 0.3, RefitAfter: -1}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			d, err := tc.policy.Decide(tc.f, 1)
			if err != nil {
				t.Fatal(err)
			}
			alpha := tc.policy.SignalWeight
			if alpha == 0 {
				alpha = almanac.DefaultSignalWeight
			}
			want, err := accuracy.TriggSignal(almanac.ResponseResiduals(tc.f), alpha)
			if err != nil {
				t.Fatal(err)
			}
			if math.Float64bits(d.Signal) != math.Float64bits(want) {
				t.Fatalf("policy signal %v, TriggSignal %v", d.Signal, want)
			}
		})
	}
}
