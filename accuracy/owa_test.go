package accuracy_test

import (
	"context"
	"errors"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/internal/numtest"
)

// TestOWAOverCommonOrigins is the reproducer of OWA comparing unlike
// cells: a candidate that fails at the last origins (after per-candidate
// failure isolation) was compared, through its Overall scores, with
// Naive2 scored over every origin. OWA (M4's definition, published.md)
// must equal the OWA of a backtest laid out on the common origins alone,
// where nothing fails.
func TestOWAOverCommonOrigins(t *testing.T) {
	y := airPassengers(t)
	y.Key = "full"
	bench := []accuracy.Candidate{{Name: accuracy.Naive2Name, Model: accuracy.Naive2{}}}
	// Origins after 96, 102, ..., 132 observations; the candidate fails
	// once its window holds 115: at 120, 126 and 132.
	bt := accuracy.Backtest{Horizon: 12, First: 96, Step: 6, Benchmarks: bench}
	trouble := accuracy.Candidate{Name: "drift", Model: keyTrouble{key: "full", from: 115}}
	c, err := bt.Run(context.Background(), y, trouble)
	if err != nil {
		t.Fatal(err)
	}
	run, _ := c.Run("drift")
	if len(c.Origins) != 7 || len(run.Failures) != 3 {
		t.Fatalf("%d origins, %d failures; want 7 and 3", len(c.Origins), len(run.Failures))
	}
	got, err := c.OWA("drift", accuracy.Naive2Name)
	if err != nil {
		t.Fatal(err)
	}
	common := bt
	common.Origins = 4
	ref, err := common.Run(context.Background(), y, trouble)
	if err != nil {
		t.Fatal(err)
	}
	if f := ref.Failures(); len(f) != 0 {
		t.Fatalf("failures on the common origins: %v", f)
	}
	a, _ := ref.Run("drift")
	b, _ := ref.Run(accuracy.Naive2Name)
	want, err := accuracy.OWA(a.Overall.SMAPE, a.Overall.MASE, b.Overall.SMAPE, b.Overall.MASE)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "OWA", got, want, 0, 1e-14)
	// The Overall scores compare unlike cells: their OWA differs.
	n2, _ := c.Run(accuracy.Naive2Name)
	unlike, _ := accuracy.OWA(run.Overall.SMAPE, run.Overall.MASE, n2.Overall.SMAPE, n2.Overall.MASE)
	if unlike == got {
		t.Errorf("OWA over unlike cells %v equals the like-for-like %v: the test does not tell them apart", unlike, got)
	}
	// Without failures OWA is that of the Overall scores, bit for bit.
	same, err := ref.OWA("drift", accuracy.Naive2Name)
	if err != nil || same != want {
		t.Errorf("OWA without failures %v (%v), want %v", same, err, want)
	}

	t.Run("no common origin", func(t *testing.T) {
		never := accuracy.Candidate{Name: "drift", Model: keyTrouble{key: "full", from: 0}}
		c, _ := bt.Run(context.Background(), y, never)
		if c == nil {
			t.Fatal("no comparison")
		}
		if v, err := c.OWA("drift", accuracy.Naive2Name); !errors.Is(err, accuracy.ErrUndefined) {
			t.Errorf("OWA %v, error %v; want an error wrapping ErrUndefined", v, err)
		}
		if _, err := c.OWA("drift", "nobody"); !errors.Is(err, almanac.ErrInvalid) {
			t.Errorf("unknown name: %v", err)
		}
	})

	t.Run("batch", func(t *testing.T) {
		ys := batchInputs(t) // "full" fails from 115 observations on
		bb := accuracy.Backtest{Horizon: 12, Origins: 4, Step: 6, Benchmarks: bench}
		bc, err := bb.RunBatch(context.Background(), ys, trouble)
		if err != nil {
			t.Fatal(err)
		}
		if len(bc.FitFailures) == 0 || len(bc.Failed) != 0 {
			t.Fatalf("fit failures %d, series left out %d: want some and none", len(bc.FitFailures), len(bc.Failed))
		}
		got, err := bc.OWA("drift", accuracy.Naive2Name)
		if err != nil {
			t.Fatal(err)
		}
		// By hand: each series' sMAPE and MASE of both over their common
		// origins (Comparison.OWA's cells), averaged over the series.
		var sm, ms, sm2, ms2 float64
		for _, c := range bc.Series {
			a, _ := c.Run("drift")
			b, _ := c.Run(accuracy.Naive2Name)
			var keep []int
			for o := range c.Origins {
				if a.Done[o] && b.Done[o] {
					keep = append(keep, o)
				}
			}
			first := c.Origins[keep[0]].Index
			one := bb
			one.First, one.Origins = first, len(keep)
			r, err := one.Run(context.Background(), ys[slicesIndex([]string{"full", "from 1951", "from 1952"}, c.Key)], trouble)
			if err != nil {
				t.Fatal(err)
			}
			ra, _ := r.Run("drift")
			rb, _ := r.Run(accuracy.Naive2Name)
			sm, ms, sm2, ms2 = sm+ra.Overall.SMAPE, ms+ra.Overall.MASE, sm2+rb.Overall.SMAPE, ms2+rb.Overall.MASE
		}
		want, err := accuracy.OWA(sm/3, ms/3, sm2/3, ms2/3)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "batch OWA", got, want, 0, 1e-14)
		plain, _ := accuracy.OWA(bc.Mean[0].SMAPE, bc.Mean[0].MASE, bc.Mean[1].SMAPE, bc.Mean[1].MASE)
		if plain == got {
			t.Errorf("batch OWA from Mean %v equals the like-for-like %v: the test does not tell them apart", plain, got)
		}
	})
}
