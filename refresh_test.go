package almanac_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/persisttest"
)

// TestRefreshWrappers checks that Box-Cox and combinations refresh
// through their members: the result equals a fit of the whole series
// with the same fixed settings (the ewma members estimate nothing).
func TestRefreshWrappers(t *testing.T) {
	all := persistSeries(true)
	head := all.Head(30)
	newV := all.Values[30:]
	for _, tc := range []struct {
		name  string
		model almanac.Model
	}{
		{"box-cox", almanac.BoxCox{Model: ewma{Weight: 0.3}, Method: almanac.LambdaFixed, Lambda: 0.4}},
		{"combination/mean", almanac.Combination{Members: []almanac.Model{ewma{Weight: 0.3}, ewma{Weight: 0.7}}, Paths: 50}},
		{"combination/weighted", almanac.Combination{Members: []almanac.Model{ewma{Weight: 0.3}, ewma{Weight: 0.7}}, Rule: almanac.CombineWeighted, Weights: []float64{3, 1}, Paths: 50}},
		{"combination/of box-cox", almanac.Combination{Members: []almanac.Model{almanac.BoxCox{Model: ewma{Weight: 0.5}, Method: almanac.LambdaFixed}, ewma{Weight: 0.7}}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := mustFit(t, tc.model, head)
			got, err := almanac.Refresh(f, newV)
			if err != nil {
				t.Fatal(err)
			}
			want := mustFit(t, tc.model, all)
			persisttest.Close(t, "fitted values", got.FittedValues(), want.FittedValues(), 1e-12)
			fg, err := got.Forecast(6, 80)
			if err != nil {
				t.Fatal(err)
			}
			fw, _ := want.Forecast(6, 80)
			persisttest.Close(t, "point forecasts", fg.Mean, fw.Mean, 1e-12)
			persisttest.Close(t, "upper bounds", fg.Intervals[0].Upper, fw.Intervals[0].Upper, 1e-12)
			persisttest.CheckRoundTrip(t, got, persisttest.Options{})
		})
	}
}

func TestRefreshNotRefreshable(t *testing.T) {
	y := persistSeries(false)
	for _, m := range []almanac.Model{
		almanac.Naive{},
		almanac.BoxCox{Model: almanac.Drift{}},
		almanac.Combination{Members: []almanac.Model{ewma{Weight: 0.5}, almanac.Mean{}}},
	} {
		f := mustFit(t, m, y)
		if _, err := almanac.Refresh(f, []float64{1}); !errors.Is(err, almanac.ErrNotRefreshable) {
			t.Errorf("%s: Refresh gave %v, want an error wrapping ErrNotRefreshable", f, err)
		}
	}
	if _, err := almanac.Refresh(nil, nil); !errors.Is(err, almanac.ErrNotRefreshable) {
		t.Errorf("Refresh(nil): %v", err)
	}
	f := mustFit(t, almanac.BoxCox{Model: ewma{Weight: 0.5}, Method: almanac.LambdaFixed}, y)
	if _, err := almanac.Refresh(f, []float64{-1}); !errors.Is(err, almanac.ErrNonPositive) {
		t.Errorf("Box-Cox refresh with a negative value: %v", err)
	}
	c := mustFit(t, almanac.Combination{Members: []almanac.Model{ewma{Weight: 0.5}}}, y)
	if _, err := almanac.Refresh(c, []float64{math.Inf(1)}); !errors.Is(err, almanac.ErrNonFinite) {
		t.Errorf("combination refresh with +Inf: %v", err)
	}
}

func TestRefreshPolicy(t *testing.T) {
	y := persistSeries(false)
	flat := y.Clone()
	for i := range flat.Values {
		flat.Values[i] -= 2 * float64(i) // no trend: the level follows
	}
	steady := mustFit(t, ewma{Weight: 0.5}, flat)
	// A level shift the model has not caught up with: the errors of the
	// last observations are all positive and large.
	shifted := y.Clone()
	for i := 30; i < len(shifted.Values); i++ {
		shifted.Values[i] += 400
	}
	drifted := mustFit(t, ewma{Weight: 0.02}, shifted)
	naive := mustFit(t, almanac.Naive{}, y)
	constant, short, extreme := y.Clone(), y.Head(9), y.Clone()
	for i := range constant.Values {
		constant.Values[i] = 7 // every one-step error 0
		extreme.Values[i] = math.MaxFloat64 * float64(1-2*(i%2))
	}
	perfect := mustFit(t, ewma{Weight: 0.5}, constant)
	few := mustFit(t, ewma{Weight: 0.5}, short) // 8 one-step errors < ⌈1/0.1⌉
	overflow := mustFit(t, ewma{Weight: 0.5}, extreme)
	cases := []struct {
		name      string
		policy    almanac.RefreshPolicy
		fit       almanac.Fitted
		added     int
		refit     bool
		reason    string
		wantErr   error
		signalNaN bool
	}{
		{name: "refresh while the signal is quiet", fit: steady, added: 3, reason: "refresh: 3 observations added, tracking signal"},
		{name: "refit after the default count", fit: steady, added: 12, refit: true, reason: "refit after 12"},
		{name: "refit after a count of our own", policy: almanac.RefreshPolicy{RefitAfter: 4}, fit: steady, added: 4, refit: true, reason: "refit after 4"},
		{name: "count rule off", policy: almanac.RefreshPolicy{RefitAfter: -1}, fit: steady, added: 100, reason: "refresh"},
		{name: "signal beyond the limit", fit: drifted, added: 1, refit: true, reason: "tracking signal"},
		{name: "signal rule off", policy: almanac.RefreshPolicy{SignalLimit: -1}, fit: drifted, added: 1, reason: "refresh: 1 observations added", signalNaN: true},
		{name: "every error zero", fit: perfect, added: 1, reason: "refresh: 1 observations added, no tracking signal: every one-step error is 0", signalNaN: true},
		{name: "too few errors", fit: few, added: 1, reason: "refresh: 1 observations added, too few one-step errors", signalNaN: true},
		{name: "infinite error", fit: overflow, added: 1, reason: "refresh: 1 observations added, no tracking signal: one-step error 2 is -Inf", signalNaN: true},
		{name: "model that cannot refresh", fit: naive, added: 0, refit: true, reason: "cannot take new observations", signalNaN: true},
		{name: "negative count", fit: steady, added: -1, wantErr: almanac.ErrInvalid},
		{name: "weight 1", policy: almanac.RefreshPolicy{SignalWeight: 1}, fit: steady, wantErr: almanac.ErrInvalid},
		{name: "limit 1", policy: almanac.RefreshPolicy{SignalLimit: 1}, fit: steady, wantErr: almanac.ErrInvalid},
		{name: "no model", fit: nil, wantErr: almanac.ErrInvalid},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			d, err := tc.policy.Decide(tc.fit, tc.added)
			if tc.wantErr != nil {
				if !errors.Is(err, tc.wantErr) {
					t.Fatalf("got %v, want %v", err, tc.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if d.Refit != tc.refit || !strings.Contains(d.Reason, tc.reason) || d.Added != tc.added {
				t.Fatalf("decision %+v, want refit %v with a reason containing %q", d, tc.refit, tc.reason)
			}
			if math.IsNaN(d.Signal) != tc.signalNaN || (!d.Refit && !math.IsNaN(d.Signal) && math.Abs(d.Signal) > almanac.DefaultSignalLimit) {
				t.Fatalf("signal %v", d.Signal)
			}
		})
	}
}
