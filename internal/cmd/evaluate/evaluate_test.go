package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/almanac-go/almanac/internal/m3data"
	"github.com/almanac-go/almanac/internal/synth"
)

func runJSON(t *testing.T, args ...string) []jsonRow {
	t.Helper()
	var out, errb bytes.Buffer
	if err := run(context.Background(), append(args, "-json"), &out, &errb); err != nil {
		t.Fatalf("run %v: %v\n%s", args, err, errb.String())
	}
	var rows []jsonRow
	dec := json.NewDecoder(&out)
	for dec.More() {
		var r jsonRow
		if err := dec.Decode(&r); err != nil {
			t.Fatal(err)
		}
		rows = append(rows, r)
	}
	return rows
}

func find(t *testing.T, rows []jsonRow, model, cat string) jsonRow {
	t.Helper()
	for _, r := range rows {
		if r.Model == model && r.Category == cat {
			return r
		}
	}
	t.Fatalf("no row for %s/%s", model, cat)
	return jsonRow{}
}

// naive2Forecast is Naive2 written independently of package accuracy,
// from the definition in ../shared/reference/published.md
// ("Forecast-competition definitions", after the M4 competition's code):
// seasonal iff n ≥ 3m and |r_m| > 1.645·√((1 + 2 Σ_{i=1}^{m−1} r_i²)/n),
// then a classical multiplicative decomposition (centred moving average;
// ratios averaged by position and scaled to mean one, as R's
// stats::decompose), the naive forecast of the adjusted series put back
// on the seasonal scale.
func naive2Forecast(y []float64, m, h int) []float64 {
	n := len(y)
	idx := make([]float64, m)
	for i := range idx {
		idx[i] = 1
	}
	if m > 1 && n >= 3*m {
		mean := 0.0
		for _, v := range y {
			mean += v
		}
		mean /= float64(n)
		den := 0.0
		for _, v := range y {
			den += (v - mean) * (v - mean)
		}
		r := func(k int) float64 {
			s := 0.0
			for t := k; t < n; t++ {
				s += (y[t] - mean) * (y[t-k] - mean)
			}
			return s / den
		}
		sum := 0.0
		for i := 1; i < m; i++ {
			sum += r(i) * r(i)
		}
		if math.Abs(r(m)) > 1.645*math.Sqrt((1+2*sum)/float64(n)) {
			ratios := make([][]float64, m)
			half := m / 2
			for t := half; t < n-half; t++ {
				var tr float64
				if m%2 == 0 {
					tr = 0.5*y[t-half] + 0.5*y[t+half]
					for j := -half + 1; j < half; j++ {
						tr += y[t+j]
					}
				} else {
					for j := -half; j <= half; j++ {
						tr += y[t+j]
					}
				}
				tr /= float64(m)
				ratios[t%m] = append(ratios[t%m], y[t]/tr)
			}
			total := 0.0
			for i := range idx {
				s := 0.0
				for _, v := range ratios[i] {
					s += v
				}
				idx[i] = s / float64(len(ratios[i]))
				total += idx[i]
			}
			for i := range idx {
				idx[i] /= total / float64(m)
			}
		}
	}
	last := y[n-1] / idx[(n-1)%m]
	f := make([]float64, h)
	for j := range f {
		f[j] = last * idx[(n+j)%m]
	}
	return f
}

// TestNaive2SMAPE checks the program's Naive2 sMAPE on an M3 subset
// against the independent computation above; sMAPE is the M3
// definition (Makridakis & Hibon 2000), averaged over every (series,
// step) point.
func TestNaive2SMAPE(t *testing.T) {
	const per = 4
	files := []struct {
		file, cat string
		m         int
	}{
		{"m3_yearly.csv", "yearly", 1},
		{"m3_quarterly.csv", "quarterly", 4},
		{"m3_monthly.csv", "monthly", 12},
		{"m3_other.csv", "other", 1},
	}
	var allSum float64
	var allN int
	want := map[string]float64{}
	for _, f := range files {
		ss := m3data.Load(t, f.file)
		sum, cnt := 0.0, 0
		for k := range per {
			s := ss[(2*k+1)*len(ss)/(2*per)] // the documented -subset rule
			fc := naive2Forecast(s.Train, f.m, len(s.Test))
			for j, y := range s.Test {
				sum += 200 * math.Abs(y-fc[j]) / (math.Abs(y) + math.Abs(fc[j]))
				cnt++
			}
		}
		want[f.cat] = sum / float64(cnt)
		allSum += sum
		allN += cnt
	}
	want["all"] = allSum / float64(allN)
	dir, _ := m3data.Dir()
	rows := runJSON(t, "-data", dir, "-models", "naive2,theta", "-subset", strconv.Itoa(per))
	for cat, w := range want {
		t.Run(cat, func(t *testing.T) {
			r := find(t, rows, "naive2", cat)
			if r.Failed != 0 || r.SMAPE == nil {
				t.Fatalf("naive2 %s: %d failed, sMAPE %v", cat, r.Failed, r.SMAPE)
			}
			if math.Abs(*r.SMAPE-w) > 1e-9*w {
				t.Errorf("naive2 %s sMAPE = %.12f, independent computation %.12f", cat, *r.SMAPE, w)
			}
			if o := find(t, rows, "naive2", cat).OWA; o == nil || math.Abs(*o-1) > 1e-12 {
				t.Errorf("naive2's OWA against itself = %v, want 1", o)
			}
			if n := find(t, rows, "theta", cat).Series; n != map[bool]int{true: 4 * per, false: per}[cat == "all"] {
				t.Errorf("%s: %d series scored", cat, n)
			}
		})
	}
}

// synthDir writes a small invented weekly/daily/hourly folder.
func synthDir(t *testing.T) (string, []synth.Series) {
	t.Helper()
	dir := t.TempDir()
	ss := synth.Generate(synth.Config{Seed: 7, Weekly: 8, Daily: 6, Hourly: 3})
	if err := synth.WriteDir(dir, ss); err != nil {
		t.Fatal(err)
	}
	return dir, ss
}

// TestSyntheticFolder runs the program on invented weekly, daily and
// hourly series with gaps: categories are found, a model that cannot
// take gaps is reported failed on exactly the series with gaps, and one
// that can (the naive method) scores every series.
func TestSyntheticFolder(t *testing.T) {
	dir, ss := synthDir(t)
	rows := runJSON(t, "-data", dir, "-models", "naive,ses")
	gappy := map[string]bool{}
	count := map[string]int{}
	for _, s := range ss {
		count[s.Freq]++
		count["all"]++
		for _, v := range s.Train {
			if math.IsNaN(v) {
				gappy[s.ID] = true
			}
		}
	}
	if len(gappy) == 0 {
		t.Fatal("the invented data should have gaps")
	}
	for _, cat := range []string{"weekly", "daily", "hourly", "all"} {
		nv := find(t, rows, "naive", cat)
		if nv.Series != count[cat] || nv.Failed != 0 || nv.SMAPE == nil || nv.Coverage80 == nil {
			t.Errorf("naive %s: %+v", cat, nv)
		}
		se := find(t, rows, "ses", cat)
		if se.Failed != len(se.FailedIDs) {
			t.Errorf("ses %s: failed %d but %d listed", cat, se.Failed, len(se.FailedIDs))
		}
		for _, id := range se.FailedIDs {
			if !gappy[id] {
				t.Errorf("ses failed on %s, which has no gap", id)
			}
		}
	}
	if all := find(t, rows, "ses", "all"); all.Failed != len(gappy) {
		t.Errorf("ses failed on %d series, %d have gaps", all.Failed, len(gappy))
	}
}

// TestWorkersDoNotChangeResults: the scores are bit-identical for one
// worker and for four.
func TestWorkersDoNotChangeResults(t *testing.T) {
	dir, _ := synthDir(t)
	a := runJSON(t, "-data", dir, "-models", "theta,snaive", "-workers", "1")
	b := runJSON(t, "-data", dir, "-models", "theta,snaive", "-workers", "4")
	if len(a) != len(b) {
		t.Fatalf("%d rows against %d", len(a), len(b))
	}
	for i := range a {
		a[i].Seconds, b[i].Seconds = 0, 0
		ja, _ := json.Marshal(a[i])
		jb, _ := json.Marshal(b[i])
		if !bytes.Equal(ja, jb) {
			t.Errorf("row %d differs:\n%s\n%s", i, ja, jb)
		}
	}
}

// TestTextReport checks that the tables name every measure and, for the
// M3 folder, print the published figures.
func TestTextReport(t *testing.T) {
	m3data.Load(t, "m3_other.csv") // skips when the data are absent
	dir, _ := m3data.Dir()
	var out, errb bytes.Buffer
	if err := run(context.Background(), []string{"-data", dir, "-models", "naive2,snaive", "-subset", "2"}, &out, &errb); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"sMAPE, %", "as published for M3", "MASE", "OWA against Naive2", "inside the 80% band", "MSIS of the 95% band", "horizon total in 95% band", "failed series"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("report lacks %q:\n%s", want, out.String())
		}
	}
	if !strings.Contains(errb.String(), "naive2: 8 series") {
		t.Errorf("no progress on stderr: %q", errb.String())
	}
}

func writeFiles(t *testing.T, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func TestBadFolders(t *testing.T) {
	meta := "series,frequency,n_train,h,start_year,start_period\nA,monthly,3,1,2020,1\n"
	vals := "series,index,value,part\nA,1,1,train\nA,2,2,train\nA,3,3,train\nA,4,4,test\n"
	tests := []struct {
		name  string
		files map[string]string
		args  []string
	}{
		{"no files", map[string]string{}, nil},
		{"no metadata", map[string]string{"v.csv": vals}, nil},
		{"unknown frequency", map[string]string{"m.csv": strings.Replace(meta, "monthly", "fortnightly", 1), "v.csv": vals}, nil},
		{"series without values", map[string]string{"m.csv": meta + "B,yearly,3,1,0,0\n", "v.csv": vals}, nil},
		{"values of an unknown series", map[string]string{"m.csv": meta, "v.csv": vals + "C,1,1,train\n"}, nil},
		{"wrong counts", map[string]string{"m.csv": strings.Replace(meta, ",3,1,", ",2,2,", 1), "v.csv": vals}, nil},
		{"hole in the index", map[string]string{"m.csv": meta, "v.csv": strings.Replace(vals, "A,2,", "A,5,", 1)}, nil},
		{"infinite value", map[string]string{"m.csv": meta, "v.csv": strings.Replace(vals, "A,2,2,", "A,2,Inf,", 1)}, nil},
		{"train after test", map[string]string{"m.csv": meta, "v.csv": "series,index,value,part\nA,1,1,train\nA,2,2,test\nA,3,3,train\nA,4,4,test\n"}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := writeFiles(t, tc.files)
			var out, errb bytes.Buffer
			err := run(context.Background(), append([]string{"-data", dir, "-models", "naive"}, tc.args...), &out, &errb)
			if !errors.Is(err, errData) {
				t.Errorf("err = %v, want one wrapping errData", err)
			}
		})
	}
	t.Run("unknown model", func(t *testing.T) {
		var out, errb bytes.Buffer
		if err := run(context.Background(), []string{"-models", "oracle"}, &out, &errb); err == nil || !strings.Contains(err.Error(), "unknown model") {
			t.Errorf("err = %v", err)
		}
	})
}

// TestMissingTestValueAndConstantSeries: a missing test value is left
// out of the scores and of the total; a constant training part has no
// MASE scale, and the series still counts for sMAPE.
func TestMissingTestValueAndConstantSeries(t *testing.T) {
	var b strings.Builder
	w := csv.NewWriter(&b)
	w.Write([]string{"series", "index", "value", "part"})
	for i := 1; i <= 12; i++ {
		w.Write([]string{"A", strconv.Itoa(i), "5", map[bool]string{true: "test", false: "train"}[i > 10]})
	}
	for i := 1; i <= 12; i++ {
		v := strconv.Itoa(10 + i)
		if i == 12 {
			v = ""
		}
		w.Write([]string{"B", strconv.Itoa(i), v, map[bool]string{true: "test", false: "train"}[i > 10]})
	}
	w.Flush()
	dir := writeFiles(t, map[string]string{
		"meta.csv": "series,frequency,n_train,h\nA,yearly,10,2\nB,yearly,10,2\n",
		"v.csv":    b.String(),
	})
	rows := runJSON(t, "-data", dir, "-models", "naive")
	r := find(t, rows, "naive", "all")
	if r.Failed != 0 || r.SMAPE == nil || *r.SMAPE < 0 {
		t.Fatalf("%+v", r)
	}
	// A is forecast exactly (sMAPE 0 on 2 points); B's one observed test
	// value 21 is forecast by 20: 200·1/41 on 1 point.
	want := (200.0 / 41) / 3
	if math.Abs(*r.SMAPE-want) > 1e-12 {
		t.Errorf("sMAPE = %v, want %v", *r.SMAPE, want)
	}
	// MASE: only B has a scale (1); its one point has |error| 1.
	if r.MASE == nil || math.Abs(*r.MASE-1) > 1e-12 {
		t.Errorf("MASE = %v, want 1", r.MASE)
	}
}

// TestForecastsFile: -forecasts writes one row per model, series and
// step, with empty cells where the model failed.
func TestForecastsFile(t *testing.T) {
	dir, ss := synthDir(t)
	file := filepath.Join(t.TempDir(), "f.csv")
	rows := runJSON(t, "-data", dir, "-models", "naive,ses", "-forecasts", file)
	fh, err := os.Open(file)
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	recs, err := csv.NewReader(fh).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	steps := 0
	for _, s := range ss {
		steps += len(s.Test)
	}
	if len(recs) != 1+2*steps {
		t.Fatalf("%d rows, want %d", len(recs), 1+2*steps)
	}
	failed := map[string]bool{}
	for _, id := range find(t, rows, "ses", "all").FailedIDs {
		failed[id] = true
	}
	for _, r := range recs[1:] {
		if empty := r[5] == ""; empty != (r[0] == "ses" && failed[r[1]]) {
			t.Fatalf("row %v: point cell empty = %v", r, empty)
		}
	}
}

// TestAutoScoresEverySeries: the automatic forecaster forecasts every
// invented weekly, daily and hourly series, gaps, short series and
// counts included, with bands and horizon totals.
func TestAutoScoresEverySeries(t *testing.T) {
	dir := t.TempDir()
	ss := synth.Generate(synth.Config{Seed: 11, Weekly: 6, Daily: 3, Hourly: 2})
	if err := synth.WriteDir(dir, ss); err != nil {
		t.Fatal(err)
	}
	rows := runJSON(t, "-data", dir, "-models", "auto")
	r := find(t, rows, "auto", "all")
	if r.Series != len(ss) || r.Failed != 0 || r.Coverage80 == nil || r.Total80 == nil {
		t.Errorf("%+v", r)
	}
}
