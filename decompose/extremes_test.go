package decompose_test

import (
	"errors"
	"fmt"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/proptest"
)

func quarterly(key string, v []float64) almanac.Series {
	return almanac.Series{Key: key, Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v}
}

// methods are the package's decompositions with the options that change
// how they compute.
var methods = []struct {
	name string
	m    decompose.Method
}{
	{"STL", decompose.STL{}},
	{"STL periodic", decompose.STL{Periodic: true}},
	{"STL robust", decompose.STL{Robust: true}},
	{"STL robust exact median", decompose.STL{Robust: true, ExactMedian: true}},
	{"MSTL robust", decompose.MSTL{Robust: true}},
	{"classical", decompose.Classical{}},
	{"classical multiplicative", decompose.Classical{Multiplicative: true}},
}

// TestExtremeScales is the shared property check (issue 11, items 1 and
// 3) over every method, Repair, Screen and the forecaster with every
// benchmark: on series from 1e−300 to 1e300, at ±1e308, with a single
// 1e308 spike, and with tiny and huge values mixed, the result is finite
// (NaN only where a classical trend is undefined) or an error wrapping a
// sentinel; never a panic, never NaN or ±Inf with a nil error.
func TestExtremeScales(t *testing.T) {
	for _, c := range proptest.Cases(24, 4) {
		y := quarterly(c.Name, c.Values)
		for _, m := range methods {
			t.Run(c.Name+"/"+m.name, func(t *testing.T) {
				proptest.Safely(t, m.name, func() {
					d, err := m.m.Decompose(y)
					if err != nil {
						proptest.CheckErr(t, "Decompose", err)
						return
					}
					for _, part := range []struct {
						name string
						x    []float64
					}{{"trend", d.Trend}, {"seasonal", d.Seasonal}, {"remainder", d.Remainder}, {"weights", d.Weights}, {"adjusted", d.Adjusted().Values}} {
						if _, classical := m.m.(decompose.Classical); classical {
							proptest.NoInf(t, part.name, part.x)
						} else {
							proptest.Finite(t, part.name, part.x)
						}
					}
					if s, err := d.Strength(); err != nil {
						proptest.CheckErr(t, "Strength", err)
					} else if !(s.Trend >= 0 && s.Trend <= 1) || !(s.Seasonal[0] >= 0 && s.Seasonal[0] <= 1) {
						t.Errorf("strength %+v outside [0, 1]", s)
					}
				})
			})
			for _, inner := range []almanac.Model{almanac.Naive{}, almanac.Drift{}, almanac.Mean{}, almanac.SeasonalNaive{}} {
				t.Run(fmt.Sprintf("%s/forecaster %s+%T", c.Name, m.name, inner), func(t *testing.T) {
					proptest.CheckModel(t, decompose.Forecaster{Model: inner, Method: m.m}, y, 8)
				})
			}
		}
		t.Run(c.Name+"/repair and screen", func(t *testing.T) {
			gappy := y.Clone()
			gappy.Values[5], gappy.Values[6] = math.NaN(), math.NaN()
			proptest.Safely(t, "repair", func() {
				out, _, err := decompose.Repair{Disrupted: []int{11}}.Fill(gappy)
				if err != nil {
					proptest.CheckErr(t, "Repair", err)
				} else {
					proptest.Finite(t, "repaired", out.Values)
				}
				out, _, err = decompose.Screen{}.Apply(gappy)
				if err != nil {
					proptest.CheckErr(t, "Screen", err)
				} else {
					proptest.Finite(t, "screened", out.Values)
				}
			})
		})
	}
}

// TestExtremeReproducers are the reproducers of issue 11 with their
// expected outcome.
func TestExtremeReproducers(t *testing.T) {
	twelve := make([]float64, 12)
	for i := range twelve {
		twelve[i] = 1e308
	}
	t.Run("robust STL on twelve quarterly values of 1e308", func(t *testing.T) {
		// Used to panic: index out of range [-1] in the partial sort.
		for _, m := range []decompose.Method{decompose.STL{Robust: true}, decompose.STL{}, decompose.STL{Periodic: true}, decompose.STL{Robust: true, ExactMedian: true}, decompose.MSTL{Robust: true}} {
			d, err := m.Decompose(quarterly("big", twelve))
			if err != nil {
				t.Fatalf("%T: %v", m, err)
			}
			for i := range twelve {
				// A constant series: trend 1e308, nothing else.
				if math.Abs(d.Trend[i]-1e308) > 1e294 || math.Abs(d.Seasonal[i]) > 1e294 || math.Abs(d.Remainder[i]) > 1e294 {
					t.Fatalf("%T index %d: trend %v seasonal %v remainder %v", m, i, d.Trend[i], d.Seasonal[i], d.Remainder[i])
				}
			}
		}
	})
	t.Run("Screen and the forecaster with robust STL on a 1e308 spike", func(t *testing.T) {
		v := make([]float64, 24)
		for i := range v {
			v[i] = 50 + 10*float64(i%4) + float64(i)/4
		}
		v[13] = 1e308
		y := quarterly("spike", v)
		out, changes, err := decompose.Screen{}.Apply(y)
		if err != nil {
			t.Fatal(err)
		}
		if len(changes) == 0 || changes[0].Index != 13 || changes[0].Reason != decompose.Outlier {
			t.Fatalf("changes %+v, want the spike at 13 flagged", changes)
		}
		if math.Abs(out.Values[13]-(50+10*1+13.0/4)) > 5 {
			t.Errorf("spike replaced by %v, want about %v", out.Values[13], 50+10+13.0/4)
		}
		f, err := decompose.Forecaster{Model: almanac.Naive{}, Method: decompose.STL{Robust: true}}.Fit(t.Context(), y)
		if err != nil {
			proptest.CheckErr(t, "Fit", err)
			return
		}
		if _, err := f.Forecast(4, 95); err != nil && !errors.Is(err, almanac.ErrNonFinite) {
			t.Errorf("err = %v", err)
		}
	})
	t.Run("classical multiplicative forecaster near the limit", func(t *testing.T) {
		// Used to give a mean of +Inf: the adjusted series' drift
		// overflowed. Seasonal factors 0.8..1.2 around 1e308/1.3.
		v := make([]float64, 16)
		for i := range v {
			v[i] = 1e308 / 1.3 * (0.8 + 0.4*float64(i%4)/3)
		}
		f, err := decompose.Forecaster{Model: almanac.Drift{}, Method: decompose.Classical{Multiplicative: true}}.Fit(t.Context(), quarterly("mult", v))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := f.Forecast(4, 80)
		if err != nil {
			t.Fatal(err)
		}
		proptest.Finite(t, "mean", fc.Mean)
		for h := range fc.Mean {
			if math.Abs(fc.Mean[h]-v[12+h])/v[12+h] > 1e-9 {
				t.Errorf("step %d: %v, want %v (an exact seasonal pattern)", h+1, fc.Mean[h], v[12+h])
			}
		}
	})
	t.Run("remainder beyond the range", func(t *testing.T) {
		v := make([]float64, 20)
		for i := range v {
			v[i] = -math.MaxFloat64
		}
		v[10] = math.MaxFloat64
		_, err := decompose.STL{Robust: true}.Decompose(quarterly("over", v))
		if !errors.Is(err, almanac.ErrNonFinite) {
			t.Fatalf("err = %v, want ErrNonFinite", err)
		}
	})
}

// TestPowerOfTwoScaleExact: the decompositions run on the data times a
// power of two, so scaling the data by 2^j scales every component
// exactly.
func TestPowerOfTwoScaleExact(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	for _, m := range methods {
		d0, err := m.m.Decompose(y)
		if err != nil {
			t.Fatal(err)
		}
		for _, j := range []int{-600, 9, 600} {
			yj := y.Clone()
			for i, v := range yj.Values {
				yj.Values[i] = math.Ldexp(v, j)
			}
			d, err := m.m.Decompose(yj)
			if err != nil {
				t.Fatal(err)
			}
			for i := range y.Values {
				same := func(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }
				if !same(d.Trend[i], math.Ldexp(d0.Trend[i], j)) || !same(d.Remainder[i], math.Ldexp(d0.Remainder[i], j)) && !d.Multiplicative {
					t.Fatalf("%s 2^%d index %d: trend %v, want %v", m.name, j, i, d.Trend[i], math.Ldexp(d0.Trend[i], j))
				}
			}
		}
	}
}
