package main

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/m3data"
	"github.com/almanac-go/almanac/reconcile"
	"github.com/almanac-go/almanac/smoothing"
	"gonum.org/v1/gonum/mat"
)

// The workloads, in the order they run. The same computations are Go
// benchmarks in their packages (named in each about).
var workloads = []workload{
	{"airline-fit", "ARIMA(0,1,1)×(0,1,1)_12 on log AirPassengers (144), exact ML, CSS then ML (arima BenchmarkFitAirline/CSS-ML); R: arima()", airlineFit},
	{"ets-madm-fit", "ETS(M,Ad,M) on AirPassengers (144) (smoothing BenchmarkFit); statsmodels: ETSModel.fit", etsFit},
	{"ets-select", "smoothing.Select, default candidates, AirPassengers (smoothing BenchmarkSelect/workers=1)", etsSelect(false)},
	{"ets-select-18", "smoothing.Select with all 18 candidates (undamped trends, unstable combinations), AirPassengers; statsmodels: the 18 ETSModel fits", etsSelect(true)},
	{"stl-monthly", "robust STL of R's co2 (468, period 12, s.window 7, R's other defaults) (decompose BenchmarkSTL/monthly-468/robust=true); R: stl()", stlMonthly},
	{"stl-weekly", "robust STL of the weekly CO2 record (2,284, period 52, gaps interpolated linearly, s.window 7, R's other defaults) (decompose BenchmarkSTL); R: stl()", stlWeekly},
	{"search-m3-monthly", "arima.Search on the training part of each of the 1,428 M3 monthly series, one after another (arima BenchmarkSearchM3Monthly runs every 50th)", searchM3Monthly},
	{"search-hourly", "arima.Search on an invented hourly series of 960 values, period 24 (arima BenchmarkSearchHourly)", searchHourly},
	{"auto-m3-first200", "accuracy.Pilot (the automatic forecaster, calibrated bands) fit and a forecast with 80/95% bands over the training parts of the first 200 M3 series (N1–N200, all yearly; 6 steps), one after another (accuracy BenchmarkPilot)", autoM3First200},
	{"mint-quickstart", "MinT (shrinkage covariance, non-negative) of 12-step forecasts on the quickstart's hierarchy (32 products, 4 categories, total; seasonal naive base forecasts) (reconcile BenchmarkQuickstartMinT)", mintQuickstart},
}

func monthlySeries(key string, v []float64, start time.Time) almanac.Series {
	return almanac.Series{Key: key, Start: start, Freq: calendar.Monthly, Values: v}
}

func airPassengersSeries() almanac.Series {
	return monthlySeries("AirPassengers", airPassengers, time.Date(1949, 1, 1, 0, 0, 0, 0, time.UTC))
}

func airlineFit(cfg config) (*prepared, error) {
	y := airPassengersSeries()
	y.Values = make([]float64, len(airPassengers))
	for i, v := range airPassengers {
		y.Values[i] = math.Log(v)
	}
	spec := arima.Spec{D: 1, Q: 1, SD: 1, SQ: 1}
	var fit almanac.Fitted
	return &prepared{
		n: y.Len(),
		op: func() error {
			var err error
			fit, err = spec.Fit(context.Background(), y)
			return err
		},
		check: func() string {
			f := fit.(*arima.Fitted)
			return fmt.Sprintf("%s loglik %.6f", f, f.LogLik())
		},
	}, nil
}

func etsFit(cfg config) (*prepared, error) {
	y := airPassengersSeries()
	spec := smoothing.Spec{Error: smoothing.MultiplicativeError, Trend: smoothing.DampedTrend, Season: smoothing.MultiplicativeSeason}
	var fit almanac.Fitted
	return &prepared{
		n: y.Len(),
		op: func() error {
			var err error
			fit, err = spec.Fit(context.Background(), y)
			return err
		},
		check: func() string {
			f := fit.(*smoothing.Fitted)
			return fmt.Sprintf("%s loglik %.6f", f, f.LogLik)
		},
	}, nil
}

func etsSelect(all bool) func(config) (*prepared, error) {
	return func(cfg config) (*prepared, error) {
		y := airPassengersSeries()
		sel := smoothing.Select{Workers: 1, UndampedTrends: all, AllowUnstable: all}
		var fit almanac.Fitted
		return &prepared{
			n: y.Len(),
			op: func() error {
				var err error
				fit, err = sel.Fit(context.Background(), y)
				return err
			},
			check: func() string { return fit.String() },
		}, nil
	}
}

// stlCheck summarises a decomposition: the chosen settings and the sums
// of its components.
func stlCheck(d *decompose.Decomposition) string {
	var s, t float64
	for i := range d.Trend {
		s += d.Seasonal[i]
		t += d.Trend[i]
	}
	return fmt.Sprintf("sum seasonal %.6f sum trend %.6f", s, t)
}

func stlOp(y almanac.Series, period int) *prepared {
	spec := decompose.STL{Period: period, SeasonalWindow: 7, Robust: true}
	var d *decompose.Decomposition
	return &prepared{
		n: y.Len(),
		op: func() error {
			var err error
			d, err = spec.Decompose(y)
			return err
		},
		check: func() string { return stlCheck(d) },
	}
}

func stlMonthly(cfg config) (*prepared, error) {
	return stlOp(monthlySeries("co2", co2Monthly, time.Date(1959, 1, 1, 0, 0, 0, 0, time.UTC)), 12), nil
}

func stlWeekly(cfg config) (*prepared, error) {
	y, err := co2WeeklyFilled(cfg.co2Weekly)
	if err != nil {
		return nil, err
	}
	if cfg.tiny {
		y = y.Head(520)
	}
	return stlOp(y, 52), nil
}

// co2WeeklyFilled reads the weekly CO2 record (CSV date,co2 with empty
// cells for missing weeks) and fills each gap by linear interpolation
// between its neighbours (R's approx and numpy's interp give the same
// values; the reference scripts read the filled series from -inputs).
func co2WeeklyFilled(path string) (almanac.Series, error) {
	fh, err := os.Open(path)
	if err != nil {
		return almanac.Series{}, err
	}
	defer fh.Close()
	rows, err := csv.NewReader(fh).ReadAll()
	if err != nil {
		return almanac.Series{}, fmt.Errorf("%s: %w", path, err)
	}
	if len(rows) < 3 {
		return almanac.Series{}, fmt.Errorf("%s: no data", path)
	}
	start, err := time.Parse("2006-01-02", rows[1][0])
	if err != nil {
		return almanac.Series{}, fmt.Errorf("%s: %w", path, err)
	}
	v := make([]float64, len(rows)-1)
	for i, r := range rows[1:] {
		if len(r) < 2 || strings.TrimSpace(r[1]) == "" {
			v[i] = math.NaN()
			continue
		}
		if v[i], err = strconv.ParseFloat(r[1], 64); err != nil {
			return almanac.Series{}, fmt.Errorf("%s line %d: %w", path, i+2, err)
		}
	}
	if err := interpolate(v); err != nil {
		return almanac.Series{}, fmt.Errorf("%s: %w", path, err)
	}
	return almanac.Series{Key: "co2 weekly", Start: start, Freq: calendar.Weekly, Values: v}, nil
}

// interpolate fills interior NaN runs of v linearly; NaN at either end
// is an error.
func interpolate(v []float64) error {
	last := -1
	for i, x := range v {
		if math.IsNaN(x) {
			continue
		}
		if last < 0 && i > 0 {
			return errors.New("missing values at the start")
		}
		for j := last + 1; j < i && last >= 0; j++ {
			f := float64(j-last) / float64(i-last)
			v[j] = v[last] + f*(x-v[last])
		}
		last = i
	}
	if last != len(v)-1 {
		return errors.New("missing values at the end")
	}
	return nil
}

func searchM3Monthly(cfg config) (*prepared, error) {
	all, err := m3data.Read(cfg.m3Dir, "m3_monthly.csv")
	if err != nil {
		return nil, err
	}
	if cfg.tiny {
		all = all[:3]
	}
	p := &prepared{n: len(all)}
	chosen := make([]string, len(all))
	start := time.Date(1990, 1, 1, 0, 0, 0, 0, time.UTC)
	for i, s := range all {
		y := monthlySeries(s.ID, s.Train, start)
		p.items = append(p.items, item{key: s.ID, op: func() error {
			f, err := (arima.Search{}).Fit(context.Background(), y)
			if err == nil {
				chosen[i] = f.String()
			}
			return err
		}})
	}
	p.check = func() string { return fmt.Sprintf("%s: %s", all[0].ID, chosen[0]) }
	return p, nil
}

// autoM3First200 times the automatic forecaster on the first 200 M3
// series in the order of their numbers (N1–N200, which are all yearly
// series; the yearly file lists them first): one fit and one forecast of
// the M3 yearly horizon, 6, with 80% and 95% bands per series.
func autoM3First200(cfg config) (*prepared, error) {
	all, err := m3data.Read(cfg.m3Dir, "m3_yearly.csv")
	if err != nil {
		return nil, err
	}
	count := 200
	if cfg.tiny {
		count = 3
	}
	if len(all) < count {
		return nil, fmt.Errorf("M3 yearly: %d series, want at least %d", len(all), count)
	}
	all = all[:count]
	p := &prepared{n: len(all)}
	chosen := make([]string, len(all))
	start := time.Date(1990, 1, 1, 0, 0, 0, 0, time.UTC)
	for i, s := range all {
		y := almanac.Series{Key: s.ID, Start: start, Freq: calendar.Yearly, Values: s.Train}
		p.items = append(p.items, item{key: s.ID, op: func() error {
			f, err := (accuracy.Pilot{}).Fit(context.Background(), y)
			if err != nil {
				return err
			}
			fc, err := f.Forecast(6, 80, 95)
			if err == nil {
				chosen[i] = fmt.Sprintf("%s, 6th step %.3f", f, fc.Mean[5])
			}
			return err
		}})
	}
	p.check = func() string { return fmt.Sprintf("%s: %s", all[0].ID, chosen[0]) }
	return p, nil
}

// hourlyLoad is an invented hourly series (a fictional depot's electricity
// load): a daily profile that drifts from day to day, AR(1) noise and a
// slowly wandering level; the generator of arima's BenchmarkSearchHourly.
func hourlyLoad(n int, seed uint64) almanac.Series {
	src := rand.New(rand.NewPCG(seed, 7))
	var profile [24]float64
	for h := range profile {
		profile[h] = 20*math.Sin(2*math.Pi*float64(h)/24) + 8*math.Cos(4*math.Pi*float64(h)/24)
	}
	v := make([]float64, n)
	noise, level := 0.0, 100.0
	for t := range v {
		h := t % 24
		level += 0.02 * src.NormFloat64()
		noise = 0.7*noise + src.NormFloat64()
		profile[h] += 0.8 * src.NormFloat64()
		v[t] = level + profile[h] + 3*noise
	}
	return almanac.Series{Key: "depot load", Start: time.Date(2025, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, Values: v}
}

func searchHourly(cfg config) (*prepared, error) {
	n := 960
	if cfg.tiny {
		n = 240
	}
	y := hourlyLoad(n, 1)
	var fit almanac.Fitted
	return &prepared{
		n: n,
		op: func() error {
			var err error
			fit, err = (arima.Search{}).Fit(context.Background(), y)
			return err
		},
		check: func() string { return fit.String() },
	}, nil
}

// mintQuickstart builds the quickstart's hierarchy (total / category /
// product from the product paths) from its data file, fits the seasonal
// naive method to every node (outside the timing), and times MinT with
// the shrinkage covariance and the non-negativity constraint, as the
// quickstart reconciles its forecasts.
func mintQuickstart(cfg config) (*prepared, error) {
	fh, err := os.Open(cfg.quickstart)
	if err != nil {
		return nil, err
	}
	defer fh.Close()
	lines, err := almanac.ReadCSV(fh, almanac.CSVOptions{
		KeyColumn: "product", TimeColumn: "month", ValueColumn: "units",
		Layouts: []string{"2006-01"}, Freq: calendar.Monthly,
	})
	if err != nil {
		return nil, err
	}
	for i, y := range lines {
		if y.Missing() > 0 {
			if lines[i], _, err = (decompose.Repair{}).Fill(y); err != nil {
				return nil, err
			}
		}
	}
	paths := make([]string, len(lines))
	for i, y := range lines {
		paths[i] = "total/" + y.Key
	}
	st, err := reconcile.HierarchyFromPaths(paths, "/")
	if err != nil {
		return nil, err
	}
	nodes, err := aggregate(st, lines)
	if err != nil {
		return nil, err
	}
	const h = 12
	fits := make([]almanac.Fitted, len(nodes))
	base := mat.NewDense(h, len(nodes), nil)
	for i, y := range nodes {
		if fits[i], err = (almanac.SeasonalNaive{}).Fit(context.Background(), y); err != nil {
			return nil, fmt.Errorf("%s: %w", y.Key, err)
		}
		fc, err := fits[i].Forecast(h)
		if err != nil {
			return nil, err
		}
		base.SetCol(i, fc.Mean)
	}
	resid, err := reconcile.ResidualMatrix(st, fits)
	if err != nil {
		return nil, err
	}
	spec := reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true}
	var out *mat.Dense
	return &prepared{
		n: len(nodes),
		op: func() error {
			var err error
			out, err = reconcile.Reconcile(st, base, spec)
			return err
		},
		check: func() string {
			return fmt.Sprintf("%d nodes, total of the first month %.3f", len(nodes), out.At(0, 0))
		},
	}, nil
}

// aggregate returns one series per node of st (structure order), each
// the sum of the product lines below it (as the quickstart does).
func aggregate(st reconcile.Structure, lines []almanac.Series) ([]almanac.Series, error) {
	names := st.Names()
	m := st.NumBottom()
	if m != len(lines) {
		return nil, errors.New("hierarchy and data disagree on the number of product lines")
	}
	byPath := make(map[string]almanac.Series, len(lines))
	for _, y := range lines {
		byPath["total/"+y.Key] = y
	}
	bottom := make([]almanac.Series, m)
	for j := range m {
		y, ok := byPath[names[len(names)-m+j]]
		if !ok {
			return nil, fmt.Errorf("no data for %s", names[len(names)-m+j])
		}
		bottom[j] = y
	}
	nodes, err := reconcile.Aggregate(st, bottom)
	if err != nil {
		return nil, err
	}
	for i := range nodes {
		nodes[i].Key = strings.TrimPrefix(nodes[i].Key, "total/")
	}
	return nodes, nil
}

// writeInputs writes the inputs the reference scripts time, one value a
// line: airpassengers.csv, co2_monthly.csv, co2_weekly_filled.csv.
func writeInputs(cfg config, dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	week, err := co2WeeklyFilled(cfg.co2Weekly)
	if err != nil {
		return err
	}
	for name, v := range map[string][]float64{
		"airpassengers.csv":     airPassengers,
		"co2_monthly.csv":       co2Monthly,
		"co2_weekly_filled.csv": week.Values,
	} {
		var b strings.Builder
		b.WriteString("value\n")
		for _, x := range v {
			b.WriteString(strconv.FormatFloat(x, 'g', -1, 64))
			b.WriteByte('\n')
		}
		if err := os.WriteFile(filepath.Join(dir, name), []byte(b.String()), 0o644); err != nil {
			return err
		}
	}
	return nil
}
