package arima

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
)

// TestSimulateMatchesForecast: the mean and standard deviation of many
// simulated paths agree with the forecast mean and exact standard error
// (consistency of the two routes through the state space; tolerances are
// five Monte Carlo standard errors).
func TestSimulateMatchesForecast(t *testing.T) {
	for _, tc := range []struct {
		name, fixture string
		spec          Spec
	}{
		{"airline", "usaccdeaths_airline", airline},
		{"AR(1) with mean, missing values", "presidents_ar1_na", Spec{P: 1, Method: ML}},
		{"ARIMA(1,1,1) with drift", "nile_arima111", Spec{P: 1, D: 1, Q: 1, Constant: ConstantInclude}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, y := fixtureData(t, tc.fixture)
			fit := mustFit(t, tc.spec, y)
			const h, n = 6, 20000
			fc, err := fit.Forecast(h)
			if err != nil {
				t.Fatal(err)
			}
			paths, err := fit.Simulate(h, n, rand.NewPCG(1, 2))
			if err != nil {
				t.Fatal(err)
			}
			sd := sdOf(fc)
			for step := 0; step < h; step++ {
				m, ss := 0.0, 0.0
				for _, p := range paths {
					m += p[step]
				}
				m /= n
				for _, p := range paths {
					d := p[step] - m
					ss += d * d
				}
				s := math.Sqrt(ss / (n - 1))
				se := sd[step] / math.Sqrt(n)
				if math.Abs(m-fc.Mean[step]) > 5*se {
					t.Errorf("step %d: path mean %.6g, forecast %.6g (MC se %.3g)", step, m, fc.Mean[step], se)
				}
				if math.Abs(s-sd[step]) > 5*sd[step]/math.Sqrt(2*n) {
					t.Errorf("step %d: path sd %.6g, forecast se %.6g", step, s, sd[step])
				}
			}
			again, _ := fit.Simulate(h, 3, rand.NewPCG(1, 2))
			for i := range again {
				for j := range again[i] {
					if again[i][j] != paths[i][j] {
						t.Fatalf("paths not reproducible from the same source")
					}
				}
			}
		})
	}
}

func TestSimulateBadInput(t *testing.T) {
	f, huron := fixtureData(t, "lakehuron_ar2_trend")
	fit := mustFit(t, Spec{P: 2, Regressors: []Regressor{{Name: "year", Values: f.Floats(t, "spec.xreg.columns.year")}}}, huron)
	if _, err := fit.Simulate(3, 10, rand.NewPCG(1, 1)); !errors.Is(err, ErrNeedRegressors) {
		t.Errorf("Simulate with regressors: %v", err)
	}
	if _, err := fit.SimulateWith(3, 10, [][]float64{{1, 2}}, rand.NewPCG(1, 1)); !errors.Is(err, ErrNeedRegressors) {
		t.Errorf("SimulateWith short future: %v", err)
	}
	if _, err := fit.SimulateWith(0, 10, [][]float64{{}}, rand.NewPCG(1, 1)); !errors.Is(err, almanac.ErrHorizon) {
		t.Errorf("h = 0: %v", err)
	}
	if _, err := fit.SimulateWith(3, 0, [][]float64{{1, 2, 3}}, rand.NewPCG(1, 1)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("n = 0: %v", err)
	}
	if _, err := fit.SimulateWith(3, 5, [][]float64{{1, 2, 3}}, nil); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("nil source: %v", err)
	}
	paths, err := fit.SimulateWith(3, 5, [][]float64{{1973, 1974, 1975}}, rand.NewPCG(1, 1))
	if err != nil || len(paths) != 5 || len(paths[0]) != 3 {
		t.Errorf("SimulateWith: %v, %d paths", err, len(paths))
	}
}
