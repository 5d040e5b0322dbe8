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
	for _, want := range []string{"drift", "(baseline)", "n/a", "80% band, each step: inside", "80% band, 2-step total: inside", "step 2", "lh", "tracking signal (a)", "(a) tracking signal = "} {
		if !strings.Contains(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	if c.String() != out {
		t.Error("String differs from WriteText")
	}
	// The baseline is marked under its own column and nowhere else.
	lines := strings.Split(out, "\n")
	for i, l := range lines {
		if strings.Contains(l, "drift") && strings.Contains(l, "naive") {
			col := strings.Index(l, "naive") + len("naive")
			tag := lines[i+1]
			if strings.Count(out, "(baseline)") != 1 || !strings.HasSuffix(strings.TrimRight(tag, " "), "(baseline)") || len(strings.TrimRight(tag, " ")) != col {
				t.Errorf("baseline marker %q not under the column ending at %d", tag, col)
			}
			break
		}
	}
}

// TestBatchAveragesWhereDefined (issue 11): one series with a zero makes
// its MAPE undefined; the batch average is taken over the other series,
// the table says over how many and why, and the tracking signal is not
// averaged.
func TestBatchAveragesWhereDefined(t *testing.T) {
	y := lhSeries(t)
	ys := []almanac.Series{y, zeroedLh(t), y.Head(46)}
	ys[1].Key, ys[2].Key = "zeroed", "shorter"
	bt := accuracy.Backtest{Horizon: 2, First: 30, Levels: []float64{80}}
	b, err := bt.RunBatch(context.Background(), ys, accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil {
		t.Fatal(err)
	}
	for c, name := range b.Names {
		m, cnt := b.Mean[c], b.Counts[c]
		want := (b.Series[0].Runs[c].Overall.MAPE + b.Series[2].Runs[c].Overall.MAPE) / 2
		if cnt.Series != 3 || cnt.MAPE != 2 || cnt.MAE != 3 || math.Abs(m.MAPE-want) > 1e-12 {
			t.Errorf("%s: MAPE %v over %d series (want %v over 2), counts %+v", name, m.MAPE, cnt.MAPE, want, cnt)
		}
		if !math.IsNaN(m.TrackingSignal) {
			t.Errorf("%s: tracking signal averaged: %v", name, m.TrackingSignal)
		}
		wantMAE := 0.0
		for _, cmp := range b.Series {
			wantMAE += cmp.Runs[c].Overall.MAE / 3
		}
		if math.Abs(m.MAE-wantMAE) > 1e-12 {
			t.Errorf("%s: MAE %v, want %v", name, m.MAE, wantMAE)
		}
	}
	var buf bytes.Buffer
	if err := b.WriteText(&buf); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	for _, want := range []string{"mean absolute % error (a)", "(a) mean absolute % error: averaged over the series where it is defined, of 3: drift 2, naive 2; it is undefined on a series where an actual value is 0"} {
		if !strings.Contains(text, want) {
			t.Errorf("text lacks %q:\n%s", want, text)
		}
	}
	if strings.Contains(text, "tracking signal") {
		t.Errorf("the batch table shows the tracking signal:\n%s", text)
	}
	buf.Reset()
	if err := b.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	csvText := buf.String()
	for _, want := range []string{accuracy.BatchMeanKey + ",drift,all,series_mape,2\n", accuracy.BatchMeanKey + ",drift,all,series_mae,3\n", accuracy.BatchMeanKey + ",drift,total,total_coverage_80,", "zeroed,drift,all,tracking_signal,"} {
		if !strings.Contains(csvText, want) {
			t.Errorf("CSV lacks %q", want)
		}
	}
	if strings.Contains(csvText, accuracy.BatchMeanKey+",drift,all,tracking_signal") {
		t.Error("CSV averages the tracking signal")
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
