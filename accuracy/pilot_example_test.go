package accuracy_test

import (
	"context"
	"fmt"
	"log"
	"math"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
)

// A fictional chain of hardware stores forecasts monthly sales of garden
// hoses at one store (invented figures, with two months missing from the
// till system). Pilot chooses the route, fills the gaps and reports what
// it did.
func ExamplePilot() {
	season := []float64{-30, -25, 0, 25, 40, 45, 35, 20, 0, -15, -25, -35}
	v := make([]float64, 60)
	for i := range v {
		v[i] = 120 + 0.5*float64(i) + season[i%12] + float64((i*7)%5)
	}
	v[17], v[41] = math.NaN(), math.NaN()
	y := almanac.Series{Key: "hoses/store 12", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}

	fit, err := accuracy.Pilot{}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	rep := fit.(*accuracy.PilotFit).Report()
	fmt.Println("route:", rep.Route, rep.Periods)
	fmt.Println("models:", len(rep.Members), "filled:", len(rep.Repairs))
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	for j := range fc.Mean {
		fmt.Printf("%s %.3f [%.3f, %.3f]\n", fc.Time(j).Format("2006-01"), fc.Mean[j], fc.Intervals[0].Lower[j], fc.Intervals[0].Upper[j])
	}
	// Output:
	// route: combination [12]
	// models: 3 filled: 2
	// 2025-01 122.166 [120.095, 124.134]
	// 2025-02 127.969 [125.351, 130.462]
	// 2025-03 154.531 [151.475, 157.516]
}

// The README's first program: read a catalogue in long CSV, fit every
// series with Pilot on all cores, pool the out-of-sample errors behind
// the bands across the catalogue, print each forecast (invented monthly
// sales of three fictional product lines; one is slow-moving).
func ExamplePilot_catalogue() {
	file := strings.NewReader(catalogueCSV())
	ctx := context.Background()

	ys, err := almanac.ReadCSV(file, almanac.CSVOptions{Freq: calendar.Monthly}) // series,period,value
	if err != nil {
		log.Fatal(err)
	}
	results, err := almanac.BatchFit(ctx, accuracy.Pilot{}, ys, almanac.BatchOptions{})
	if err != nil {
		log.Fatal(err)
	}
	results, err = accuracy.PoolPilots(results, accuracy.PoolOptions{}) // calibrate bands on the whole catalogue's errors
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range results {
		if r.Err != nil {
			log.Printf("%s: %v", r.Key, r.Err)
			continue
		}
		fc, _ := r.Fitted.Forecast(12, 80, 95) // 12 steps, 80% and 95% bands
		route := r.Fitted.(*accuracy.PilotFit).Report().Route
		fmt.Printf("%s: %v, next month %.3f [%.3f, %.3f]\n", r.Key, route, fc.Mean[0], fc.Intervals[0].Lower[0], fc.Intervals[0].Upper[0])
	}
	// Output:
	// rakes: combination, next month 83.833 [81.830, 85.875]
	// seed trays: combination, next month 335.520 [326.935, 344.183]
	// spare blades: intermittent, next month 0.617 [0.000, 2.575]
}

// catalogueCSV writes the invented catalogue of ExamplePilot_catalogue.
func catalogueCSV() string {
	var b strings.Builder
	b.WriteString("series,period,value\n")
	for k, key := range []string{"rakes", "seed trays", "spare blades"} {
		for i := range 48 {
			t := time.Date(2021, time.Month(1+i), 1, 0, 0, 0, 0, time.UTC)
			v := 0.0
			switch k {
			case 0:
				v = 80 + 30*math.Sin(2*math.Pi*float64(i)/12) + float64(i%7)
			case 1:
				v = 200 + 2*float64(i) + 40*math.Cos(2*math.Pi*float64(i)/12) + float64((i*5)%9)
			default:
				if (i*i*7+3)%11 < 3 { // now and then, with no yearly pattern
					v = float64(1 + i%3)
				}
			}
			fmt.Fprintf(&b, "%s,%s,%g\n", key, t.Format("2006-01"), v)
		}
	}
	return b.String()
}
