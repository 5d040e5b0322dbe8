package accuracy_test

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
)

// TestBatchAveragesNearTheLimit is the reproducer of the overflowing
// running sums: three yearly series alternating 0 and 1.5e308 give the
// naive method errors of ±1.5e308 and an MAE of 1.5e308 on each series;
// the batch average summed them to +Inf. Averaged on rescaled values it
// is 1.5e308 (the mean of three equal values), the ME 0 on each series
// and overall, and the counts say three series.
func TestBatchAveragesNearTheLimit(t *testing.T) {
	const big = 1.5e308
	var ys []almanac.Series
	for i := range 3 {
		v := make([]float64, 12)
		for j := range v {
			if (j+i)%2 == 1 {
				v[j] = big
			}
		}
		ys = append(ys, almanac.Series{Key: string(rune('a' + i)), Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: v})
	}
	// Horizon 1 at four origins: every error is ±1.5e308, half of each
	// sign, so ME = 0 and MAE = 1.5e308 on every series.
	bc, err := accuracy.Backtest{Horizon: 1, Origins: 4}.RunBatch(context.Background(), ys)
	if err != nil {
		t.Fatal(err)
	}
	if len(bc.Names) != 1 || bc.Names[0] != accuracy.NaiveName {
		t.Fatalf("candidates %v", bc.Names)
	}
	for _, c := range bc.Series {
		numtest.Scalar(t, "series MAE", c.Runs[0].Overall.MAE, big, 0, 0)
	}
	m := bc.Mean[0]
	numtest.Scalar(t, "mean MAE", m.MAE, big, 0, 0)
	numtest.Scalar(t, "mean ME", m.ME, 0, 0, 0)
	numtest.Scalar(t, "mean MdAE", m.MdAE, big, 0, 0)
	numtest.Scalar(t, "mean RMSE", m.RMSE, big, 0, 0)
	if bc.Counts[0].MAE != 3 || bc.Counts[0].ME != 3 {
		t.Errorf("counts %+v, want 3 series for MAE and ME", bc.Counts[0])
	}
	// The MSE of errors of 1.5e308 is beyond the float64 range: NaN on
	// each series (documented in Scores), so its average is over none.
	if !math.IsNaN(m.MSE) || bc.Counts[0].MSE != 0 {
		t.Errorf("MSE %v over %d series, want NaN over 0", m.MSE, bc.Counts[0].MSE)
	}
	// The per-series horizon-total MAE is summed unscaled in total.go and
	// comes out +Inf here; an infinite input makes the average NaN (still
	// counted, as documented on meanOf), never +Inf.
	if v := bc.Total[0].MAE; math.IsInf(v, 0) {
		t.Errorf("mean total MAE %v", v)
	}
}

// TestBatchAveragesBitIdentical: on ordinary data the rescaled sums give
// bit for bit the averages of the plain left-to-right sums (scaling by a
// power of two is exact).
func TestBatchAveragesBitIdentical(t *testing.T) {
	base := airPassengers(t)
	var ys []almanac.Series
	for i := range 5 {
		ys = append(ys, base.Window(i*6, i*6+96))
	}
	bc, err := accuracy.Backtest{Horizon: 6, Origins: 3}.RunBatch(context.Background(), ys)
	if err != nil {
		t.Fatal(err)
	}
	for c := range bc.Names {
		var mae, mase, smape float64
		for _, s := range bc.Series {
			mae += s.Runs[c].Overall.MAE
			mase += s.Runs[c].Overall.MASE
			smape += s.Runs[c].Overall.SMAPE
		}
		for _, p := range []struct {
			name      string
			got, want float64
		}{{"MAE", bc.Mean[c].MAE, mae / 5}, {"MASE", bc.Mean[c].MASE, mase / 5}, {"sMAPE", bc.Mean[c].SMAPE, smape / 5}} {
			if p.got != p.want {
				t.Errorf("%s %s: %v, plain sum gives %v", bc.Names[c], p.name, p.got, p.want)
			}
		}
	}
}
