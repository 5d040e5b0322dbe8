package accuracy_test

import (
	"context"
	"fmt"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
)

// TestCalibrationRefreshEqualsFixedRefit: rolling an ARIMA fit forward
// through almanac.Refresh (its Kalman filter run on at the estimated
// coefficients) gives the error trajectories that the fixed-coefficient
// refit used before gave, to rounding — so the calibration's bands and
// coverage do not move. The expected trajectories are computed here the
// old way: the model estimated at the first origin, then at each later
// origin refitted with every coefficient fixed at those estimates, its
// 18-step forecast's errors divided by the half-width of its 80% band.
// Series: AirPassengers (R datasets) and three M3 monthly series.
func TestCalibrationRefreshEqualsFixedRefit(t *testing.T) {
	ctx := context.Background()
	series := []almanac.Series{airPassengers(t)}
	m3 := m3data.Load(t, "m3_monthly.csv")
	for _, s := range m3[:3] {
		series = append(series, almanac.Series{Key: s.ID, Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: s.Train})
	}
	const h, origins = 18, 5
	for _, spec := range []arima.Spec{{D: 1, Q: 1, SD: 1, SQ: 1}, {P: 1, D: 1}} {
		for _, y := range series {
			t.Run(fmt.Sprintf("%v/%s", spec, y.Key), func(t *testing.T) {
				cal := accuracy.Calibrated{Model: spec, Horizon: h, Origins: origins, MinTrain: 1, MinErrors: 1}
				f, err := cal.Fit(ctx, y)
				if err != nil {
					t.Fatal(err)
				}
				cf := f.(*accuracy.CalibratedFit)
				st := cf.Status()
				if st.Origins != origins || st.Rolled != origins-1 || st.Own != origins {
					t.Fatalf("status %+v", st)
				}
				got := cf.Trajectories()
				n := y.Len()
				first := n - h - origins + 1
				est, err := spec.Fit(ctx, y.Head(first))
				if err != nil {
					t.Fatal(err)
				}
				fixed := map[string]float64{}
				for _, c := range est.(*arima.Fitted).Coef() {
					fixed[c.Name] = c.Value
				}
				for i := range origins {
					o := first + i
					fit := est
					if i > 0 {
						s := spec
						s.Fixed = fixed
						if fit, err = s.Fit(ctx, y.Head(o)); err != nil {
							t.Fatal(err)
						}
					}
					fc, err := fit.Forecast(h, 80)
					if err != nil {
						t.Fatal(err)
					}
					for s := range h {
						sc := (fc.Intervals[0].Upper[s] - fc.Intervals[0].Lower[s]) / 2
						want := (y.Values[o+s] - fc.Mean[s]) / sc
						if d := math.Abs(got[i][s] - want); d > 1e-8*math.Max(1, math.Abs(want)) {
							t.Errorf("origin %d step %d: %v, fixed-coefficient refit %v (diff %.3g)", o, s+1, got[i][s], want, d)
						}
					}
				}
			})
		}
	}
}
