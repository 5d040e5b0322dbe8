package accuracy_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
)

// zeroedLh is lh with one actual value in the evaluation window set to 0,
// so that MAPE is undefined there.
func zeroedLh(t *testing.T) almanac.Series {
	y := lhSeries(t).Clone()
	y.Values[45] = 0
	return y
}

func TestUndefinedIsNaNInScores(t *testing.T) {
	c, err := accuracy.Backtest{Horizon: 2, First: 40}.Run(context.Background(), zeroedLh(t))
	if err != nil {
		t.Fatal(err)
	}
	s := c.Runs[0].Overall
	if !math.IsNaN(s.MAPE) {
		t.Errorf("MAPE = %v with an actual value of 0, want NaN", s.MAPE)
	}
	if math.IsNaN(s.MAE) || math.IsNaN(s.SMAPE) || math.IsNaN(s.MASE) {
		t.Errorf("defined measures lost: %+v", s)
	}
	// No step avoids the zero: the origins are 40..46 and the zero (index
	// 45) is step 1 at origin 45 and step 2 at origin 44, so every step's
	// MAPE is undefined too.
	for h, st := range c.Runs[0].ByStep {
		if !math.IsNaN(st.MAPE) {
			t.Errorf("step %d MAPE %v, want NaN (the zero is in every step)", h+1, st.MAPE)
		}
	}
}

func TestWriteText(t *testing.T) {
	c, err := accuracy.Backtest{Horizon: 2, First: 40, Levels: []float64{80}}.Run(context.Background(), zeroedLh(t),
		accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := c.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"drift", "[naive]", "n/a", "80% band", "step 2", "lh"} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	if c.String() != out {
		t.Error("String differs from WriteText")
	}
}

func TestWriteCSVRoundTrip(t *testing.T) {
	y := airPassengers(t)
	bt := accuracy.Backtest{Horizon: 3, Origins: 4, Levels: []float64{95}}
	models := []accuracy.Candidate{{Name: "drift", Model: almanac.Drift{}}}
	c, err := bt.Run(context.Background(), y, models...)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := c.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "series,model,step,measure,value" {
		t.Fatalf("header %v", rows[0])
	}
	got := map[string]string{}
	for _, r := range rows[1:] {
		got[strings.Join(r[:4], "|")] = r[4]
	}
	check := func(key string, want float64) {
		t.Helper()
		s, ok := got[key]
		if !ok {
			t.Errorf("no row %s", key)
			return
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || !(v == want || math.IsNaN(v) && math.IsNaN(want)) {
			t.Errorf("%s = %s, want %v", key, s, want)
		}
	}
	for _, r := range c.Runs {
		check("AirPassengers|"+r.Name+"|all|mae", r.Overall.MAE)
		check("AirPassengers|"+r.Name+"|all|mase", r.Overall.MASE)
		check("AirPassengers|"+r.Name+"|all|coverage_95", r.Overall.Intervals[0].Coverage)
		check("AirPassengers|"+r.Name+"|all|mase_ratio", r.Relative.MASE)
		check("AirPassengers|"+r.Name+"|3|rmse", r.ByStep[2].RMSE)
	}
	// The batch form adds the averages.
	b, err := bt.RunBatch(context.Background(), []almanac.Series{y, y.Head(120)}, models...)
	if err != nil {
		t.Fatal(err)
	}
	buf.Reset()
	if err := b.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), accuracy.BatchMeanKey+",drift,all,mase,") {
		t.Error("batch CSV lacks the mean rows")
	}
	buf.Reset()
	if err := b.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), "2 series") {
		t.Errorf("batch text:\n%s", buf.String())
	}
}
