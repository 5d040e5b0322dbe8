package accuracy_test

import (
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/internal/numtest"
	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

var nan = math.NaN()

// TestPointMeasures holds worked examples computed by hand (in each
// reason) for the ordinary cases and the edge cases: zeros, ties and NaN.
func TestPointMeasures(t *testing.T) {
	mase1 := func(a, f []float64) (float64, error) { return accuracy.MASE(a, f, []float64{1, 3, 2, 5}, 1) }
	rmsse1 := func(a, f []float64) (float64, error) { return accuracy.RMSSE(a, f, []float64{1, 3, 2, 5}, 1) }
	tests := []struct {
		name     string
		fn       func(a, f []float64) (float64, error)
		actual   []float64
		forecast []float64
		want     float64
		wantErr  error
		reason   string
	}{
		{"ME", accuracy.ME, []float64{3, 5, 4}, []float64{1, 6, 4}, 1.0 / 3, nil, "errors 2, −1, 0; mean 1/3"},
		{"MAE", accuracy.MAE, []float64{3, 5, 4}, []float64{1, 6, 4}, 1, nil, "|e| 2, 1, 0; mean 1"},
		{"MSE", accuracy.MSE, []float64{3, 5, 4}, []float64{1, 6, 4}, 5.0 / 3, nil, "e² 4, 1, 0; mean 5/3"},
		{"RMSE", accuracy.RMSE, []float64{3, 5, 4}, []float64{1, 6, 4}, math.Sqrt(5.0 / 3), nil, "√(5/3)"},
		{"MAPE", accuracy.MAPE, []float64{2, 4}, []float64{1, 5}, 37.5, nil, "100·mean(1/2, 1/4) = 37.5"},
		{"MAPE zero actual", accuracy.MAPE, []float64{0, 4}, []float64{1, 5}, nan, accuracy.ErrUndefined, "|e|/0"},
		{"MAPE zero actual missing forecast", accuracy.MAPE, []float64{0, 4}, []float64{nan, 5}, 25, nil, "the zero's pair is left out; 100·1/4"},
		{"sMAPE", accuracy.SMAPE, []float64{2, 4}, []float64{1, 4}, 100.0 / 3, nil, "terms 2·1/3 and 0; 100·mean = 33.33"},
		{"sMAPE one zero", accuracy.SMAPE, []float64{0, 2}, []float64{1, 2}, 100, nil, "2·1/(0+1) = 2 and 0; 100·mean = 100"},
		{"sMAPE both zero", accuracy.SMAPE, []float64{0, 2}, []float64{0, 2}, nan, accuracy.ErrUndefined, "0/0 is undefined, not 0"},
		{"sMAPE worst", accuracy.SMAPE, []float64{5}, []float64{-5}, 200, nil, "2·10/10 = 2 → 200, the upper limit"},
		{"sMAPE near the float64 limit", accuracy.SMAPE, []float64{1e308}, []float64{-1e308}, 200, nil, "2·2e308/2e308 = 2 → 200; the difference and sum overflow unless scaled (they once gave a silent NaN)"},
		{"sMAPE large, same sign", accuracy.SMAPE, []float64{1.5e308}, []float64{1e308}, 40, nil, "2·0.5/2.5 = 0.4 → 40; the sum overflows unless scaled"},
		{"MdAE odd", accuracy.MdAE, []float64{1, 2, 9}, []float64{0, 0, 0}, 2, nil, "|e| 1, 2, 9; middle 2"},
		{"MdAE even", accuracy.MdAE, []float64{1, 2, 3, 4}, []float64{0, 0, 0, 0}, 2.5, nil, "middle two 2 and 3; mean 2.5"},
		{"MdAE ties", accuracy.MdAE, []float64{1, 1, 1, 5}, []float64{0, 0, 0, 0}, 1, nil, "sorted 1, 1, 1, 5; middle two both 1"},
		{"MAE NaN pairs", accuracy.MAE, []float64{1, nan, 3}, []float64{2, 5, nan}, 1, nil, "only index 0 has both: |1 − 2|"},
		{"ME NaN pairs", accuracy.ME, []float64{1, nan, 3}, []float64{2, 5, nan}, -1, nil, "only index 0: 1 − 2"},
		{"MAE all NaN", accuracy.MAE, []float64{nan, 2}, []float64{1, nan}, nan, almanac.ErrAllMissing, "no pair observed"},
		{"MAE Inf", accuracy.MAE, []float64{1, math.Inf(1)}, []float64{1, 1}, nan, almanac.ErrNonFinite, "±Inf is never data"},
		{"MAE lengths", accuracy.MAE, []float64{1, 2}, []float64{1}, nan, almanac.ErrLength, "2 vs 1"},
		{"MAE empty", accuracy.MAE, nil, nil, nan, almanac.ErrEmpty, "nothing to score"},
		{"MASE", mase1, []float64{6, 4}, []float64{5, 5}, 0.5, nil, "scale mean(|3−1|, |2−3|, |5−2|) = 2; MAE 1"},
		{"RMSSE", rmsse1, []float64{6, 4}, []float64{5, 5}, math.Sqrt(3.0 / 14), nil, "scale mean(4, 1, 9) = 14/3; MSE 1; √(3/14)"},
		{"tracking signal", accuracy.TrackingSignal, []float64{3, 3, 3}, []float64{1, 2, 3}, 3, nil, "Σe = 3, MAE = 1"},
		{"tracking signal perfect", accuracy.TrackingSignal, []float64{3, 3}, []float64{3, 3}, nan, accuracy.ErrUndefined, "0/0"},
		// Finite data whose errors overflow float64 (issue 11, item 3):
		// these once returned a silent NaN, then an error; the sums are
		// now taken on the values times a power of two, so a
		// representable answer comes out and only a result beyond the
		// float64 range is an error.
		{"ME overflow", accuracy.ME, []float64{1e308, -1e308}, []float64{-1e308, 1e308}, 0, nil, "errors 2e308 and −2e308 cancel: mean 0"},
		{"tracking signal overflow", accuracy.TrackingSignal, []float64{1e308, 1e308}, []float64{-1e308, -1e308}, 2, nil, "Σe = 4e308, MAE = 2e308: 2"},
		{"MASE overflow", func(a, f []float64) (float64, error) { return accuracy.MASE(a, f, []float64{1e308, -1e308}, 1) }, []float64{1e308}, []float64{-1e308}, 1, nil, "MAE 2e308 over scale 2e308: 1"},
		{"ME large but finite", accuracy.ME, []float64{1e308, -1e308}, []float64{0, 0}, 0, nil, "1e308 − 1e308 = 0, no overflow"},
		{"MAE beyond the range", accuracy.MAE, []float64{1e308, -1e308}, []float64{-1e308, 1e308}, nan, almanac.ErrNonFinite, "issue 11: the MAE is 2e308, beyond the float64 range (it was +Inf with no error)"},
		{"RMSE beyond the range", accuracy.RMSE, []float64{1e308, -1e308}, []float64{-1e308, 1e308}, nan, almanac.ErrNonFinite, "issue 11: the RMSE is 2e308"},
		{"MdAE beyond the range", accuracy.MdAE, []float64{1e308, -1e308}, []float64{-1e308, 1e308}, nan, almanac.ErrNonFinite, "issue 11: the MdAE is 2e308"},
		{"MAPE near the float64 limit", accuracy.MAPE, []float64{1e308, -1e308}, []float64{-1e308, 1e308}, 200, nil, "issue 11: |e|/|a| = 2e308/1e308 = 2 for both pairs → 200 (it was +Inf)"},
		{"MAE large but representable", accuracy.MAE, []float64{1.5e308, -0.5e308}, []float64{0.5e308, 0.5e308}, 1e308, nil, "|e| 1e308 and 1e308; the sum 2e308 overflows unless scaled"},
		{"RMSE where the MSE overflows", accuracy.RMSE, []float64{3e200, 4e200}, []float64{0, 0}, math.Sqrt(12.5) * 1e200, nil, "√((9e400 + 16e400)/2): the MSE is beyond the range, the RMSE is not"},
		{"MSE beyond the range", accuracy.MSE, []float64{3e200, 4e200}, []float64{0, 0}, nan, almanac.ErrNonFinite, "12.5e400"},
		{"MAPE term beyond the range", accuracy.MAPE, []float64{1e-300}, []float64{1e300}, nan, almanac.ErrNonFinite, "|e|/|a| = 1e600"},
		{"MAE tiny", accuracy.MAE, []float64{3e-320, 1e-320}, []float64{1e-320, 3e-320}, 2e-320, nil, "subnormal values: |e| 2e-320 each, exact after scaling"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := tt.fn(tt.actual, tt.forecast)
			if tt.wantErr != nil {
				if !errors.Is(err, tt.wantErr) {
					t.Fatalf("error %v, want %v (%s)", err, tt.wantErr, tt.reason)
				}
				if !math.IsNaN(got) {
					t.Errorf("value %v alongside an error, want NaN", got)
				}
				return
			}
			if err != nil {
				t.Fatalf("unexpected error %v (%s)", err, tt.reason)
			}
			numtest.Scalar(t, tt.name+" ("+tt.reason+")", got, tt.want, 0, 1e-15)
		})
	}
}

func TestScaleErrors(t *testing.T) {
	tests := []struct {
		name     string
		insample []float64
		m        int
		wantErr  error
	}{
		{"constant in-sample", []float64{4, 4, 4, 4}, 1, accuracy.ErrUndefined},
		{"too short for m", []float64{1, 2, 3, 4}, 4, almanac.ErrTooShort},
		{"period 0", []float64{1, 2, 3}, 0, almanac.ErrInvalid},
		{"in-sample Inf", []float64{1, math.Inf(-1), 3}, 1, almanac.ErrNonFinite},
		{"only NaN differences", []float64{1, nan, 3}, 1, almanac.ErrTooShort},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			for name, fn := range map[string]func() (float64, error){
				"MASE":  func() (float64, error) { return accuracy.MASE([]float64{1}, []float64{2}, tt.insample, tt.m) },
				"RMSSE": func() (float64, error) { return accuracy.RMSSE([]float64{1}, []float64{2}, tt.insample, tt.m) },
				"MSIS": func() (float64, error) {
					return accuracy.MSIS([]float64{1}, []float64{0}, []float64{2}, 95, tt.insample, tt.m)
				},
			} {
				if _, err := fn(); !errors.Is(err, tt.wantErr) {
					t.Errorf("%s: error %v, want %v", name, err, tt.wantErr)
				}
			}
		})
	}
}

func TestNaiveScaleSkipsNaN(t *testing.T) {
	// Differences 2−1 and 7−3 (|4|); the pairs touching NaN are left out:
	// abs = (1 + 4)/2 = 2.5, sq = (1 + 16)/2 = 8.5.
	abs, sq, err := accuracy.NaiveScale([]float64{1, 2, nan, 3, 7}, 1)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "abs", abs, 2.5, 0, 0)
	numtest.Scalar(t, "sq", sq, 8.5, 0, 0)
}

func TestRelative(t *testing.T) {
	actual := []float64{10, 12, 14, nan}
	fc := []float64{11, 12, 13, 1}
	bench := []float64{12, 10, nan, 1}
	// Pairs used: indices 0 and 1 (index 2 has no benchmark, 3 no actual).
	// MAE forecast (1 + 0)/2 = 0.5, benchmark (2 + 2)/2 = 2 → 0.25.
	got, err := accuracy.Relative(accuracy.MAE, actual, fc, bench)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "relative MAE", got, 0.25, 0, 1e-15)
	if !math.IsNaN(actual[3]) || actual[2] != 14 {
		t.Error("Relative modified the caller's actual values")
	}
	if _, err := accuracy.Relative(accuracy.MAE, []float64{1, 2}, []float64{0, 2}, []float64{1, 2}); !errors.Is(err, accuracy.ErrUndefined) {
		t.Errorf("perfect benchmark: error %v, want ErrUndefined", err)
	}
	if _, err := accuracy.Relative(accuracy.MAE, []float64{1, 2}, []float64{0, 2}, []float64{1}); !errors.Is(err, almanac.ErrLength) {
		t.Errorf("short benchmark: error %v, want ErrLength", err)
	}
	if _, err := accuracy.Relative(nil, []float64{1}, []float64{0}, []float64{1}); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("nil measure: error %v, want ErrInvalid", err)
	}
}

// TestIntervalMeasures: worked examples computed by hand.
func TestIntervalMeasures(t *testing.T) {
	actual := []float64{1, 5, 10}
	lower := []float64{0, 0, 0}
	upper := []float64{5, 4, 10}
	t.Run("coverage", func(t *testing.T) {
		// 1 ∈ [0, 5]; 5 ∉ [0, 4]; 10 ∈ [0, 10] (bounds included): 2/3.
		got, err := accuracy.Coverage(actual, lower, upper)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "coverage", got, 2.0/3, 0, 0)
	})
	t.Run("interval score", func(t *testing.T) {
		// level 80: α = 0.2, 2/α = 10. Scores 5; 4 + 10·(5 − 4) = 14; 10.
		// Mean 29/3.
		got, err := accuracy.IntervalScore(actual, lower, upper, 80)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "interval score", got, 29.0/3, 0, 1e-15)
	})
	t.Run("interval score below", func(t *testing.T) {
		// level 95: α = 0.05, 2/α = 40. y = −1 below [0, 2]: 2 + 40·1 = 42.
		got, err := accuracy.IntervalScore([]float64{-1}, []float64{0}, []float64{2}, 95)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "interval score", got, 42, 0, 1e-14)
	})
	t.Run("coverage NaN", func(t *testing.T) {
		// Index 1 has a NaN bound and index 2 a NaN actual: only index 0.
		got, err := accuracy.Coverage([]float64{1, 2, nan}, []float64{0, nan, 0}, []float64{2, 3, 1})
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "coverage", got, 1, 0, 0)
	})
	t.Run("pinball", func(t *testing.T) {
		// tau 0.9: y = 10, q = 8 → 0.9·2 = 1.8; y = 5, q = 8 → 0.1·3 = 0.3.
		// Mean 1.05.
		got, err := accuracy.Pinball([]float64{10, 5}, []float64{8, 8}, 0.9)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "pinball", got, 1.05, 0, 1e-15)
	})
	errCases := []struct {
		name    string
		fn      func() (float64, error)
		wantErr error
	}{
		{"crossed bounds", func() (float64, error) { return accuracy.Coverage([]float64{1}, []float64{2}, []float64{1}) }, almanac.ErrInvalid},
		{"level 100", func() (float64, error) {
			return accuracy.IntervalScore([]float64{1}, []float64{0}, []float64{2}, 100)
		}, almanac.ErrLevel},
		{"level as fraction", func() (float64, error) {
			return accuracy.IntervalScore([]float64{1}, []float64{0}, []float64{2}, 0)
		}, almanac.ErrLevel},
		{"tau 1", func() (float64, error) { return accuracy.Pinball([]float64{1}, []float64{1}, 1) }, almanac.ErrLevel},
		{"bound lengths", func() (float64, error) { return accuracy.Coverage([]float64{1, 2}, []float64{0}, []float64{2, 3}) }, almanac.ErrLength},
		{"negative sd", func() (float64, error) { return accuracy.CRPSNormal([]float64{1}, []float64{0}, []float64{-1}) }, almanac.ErrInvalid},
		{"all missing", func() (float64, error) { return accuracy.CRPSNormal([]float64{nan}, []float64{0}, []float64{1}) }, almanac.ErrAllMissing},
		{"sample no paths", func() (float64, error) { return accuracy.CRPSSample([]float64{1}, nil) }, almanac.ErrLength},
		{"sample short path", func() (float64, error) { return accuracy.CRPSSample([]float64{1, 2}, [][]float64{{1}}) }, almanac.ErrLength},
		{"sample all NaN draws", func() (float64, error) { return accuracy.CRPSSample([]float64{1}, [][]float64{{nan}}) }, almanac.ErrAllMissing},
		{"sample Inf draw", func() (float64, error) { return accuracy.CRPSSample([]float64{1}, [][]float64{{math.Inf(1)}}) }, almanac.ErrNonFinite},
	}
	for _, tt := range errCases {
		t.Run(tt.name, func(t *testing.T) {
			got, err := tt.fn()
			if !errors.Is(err, tt.wantErr) {
				t.Fatalf("error %v, want %v", err, tt.wantErr)
			}
			if !math.IsNaN(got) {
				t.Errorf("value %v alongside an error", got)
			}
		})
	}
}

// crpsIntegral evaluates the CRPS by its definition (Matheson & Winkler
// 1976), ∫ (F(x) − 1{x ≥ y})² dx, by Gauss–Legendre quadrature on each
// side of y over ±12 standard deviations.
func crpsIntegral(y, mu, sd float64) float64 {
	d := distuv.Normal{Mu: mu, Sigma: sd}
	left := quad.Fixed(func(x float64) float64 { p := d.CDF(x); return p * p }, mu-12*sd, y, 2000, nil, 0)
	right := quad.Fixed(func(x float64) float64 { p := 1 - d.CDF(x); return p * p }, y, mu+12*sd, 2000, nil, 0)
	return left + right
}

func TestCRPSNormal(t *testing.T) {
	t.Run("at the mean", func(t *testing.T) {
		// Published definition (Gneiting et al. 2005) at z = 0:
		// σ(2φ(0) − 1/√π) = σ(√2 − 1)/√π; with σ = 2: 0.467389954...
		got, err := accuracy.CRPSNormal([]float64{3}, []float64{3}, []float64{2})
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "crps", got, 2*(math.Sqrt2-1)/math.Sqrt(math.Pi), 0, 1e-15)
	})
	t.Run("sd too small for z", func(t *testing.T) {
		// z = 2/1e-320 overflows; the CRPS tends to |y − mu| = 2 as sd → 0
		// (sd·Inf once gave +Inf).
		got, err := accuracy.CRPSNormal([]float64{3}, []float64{1}, []float64{1e-320})
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "crps", got, 2, 0, 1e-15)
	})
	t.Run("zero sd", func(t *testing.T) {
		// A point mass: the CRPS is the absolute error |7 − 4| = 3.
		got, err := accuracy.CRPSNormal([]float64{7}, []float64{4}, []float64{0})
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "crps", got, 3, 0, 0)
	})
	for _, c := range []struct {
		name      string
		y, mu, sd float64
	}{
		{"right tail", 5.5, 1, 1.5},
		{"left tail", -30, 2, 10},
		{"near", 0.2, 0, 0.3},
	} {
		t.Run("definition "+c.name, func(t *testing.T) {
			// The closed form against the defining integral (independent
			// computation; quadrature accurate to ~1e-12 here).
			got, err := accuracy.CRPSNormal([]float64{c.y}, []float64{c.mu}, []float64{c.sd})
			if err != nil {
				t.Fatal(err)
			}
			numtest.Scalar(t, "crps", got, crpsIntegral(c.y, c.mu, c.sd), 1e-9, 1e-9)
		})
	}
}

func TestCRPSSample(t *testing.T) {
	t.Run("two draws", func(t *testing.T) {
		// Draws {0, 1}, y = 0: E|X − y| = 1/2, E|X − X'| = 2/4 = 1/2, so
		// CRPS = 1/2 − 1/4 = 1/4. By the integral: the empirical CDF is
		// 1/2 on [0, 1) where the step at y is 1: ∫₀¹ (1/2)² = 1/4.
		got, err := accuracy.CRPSSample([]float64{0}, [][]float64{{1}, {0}})
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "crps", got, 0.25, 0, 0)
	})
	t.Run("NaN draws and actuals", func(t *testing.T) {
		// Step 0: draws {2, NaN, 4} → {2, 4}, y = 3: E|X − y| = 1,
		// E|X − X'| = 2·2/4 = 1 → 1/2. Step 1: actual NaN, left out.
		got, err := accuracy.CRPSSample([]float64{3, nan}, [][]float64{{2, 0}, {nan, 0}, {4, 0}})
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "crps", got, 0.5, 0, 0)
	})
	t.Run("one draw is the absolute error", func(t *testing.T) {
		got, err := accuracy.CRPSSample([]float64{2, 5}, [][]float64{{1, 9}})
		if err != nil {
			t.Fatal(err)
		}
		numtest.Scalar(t, "crps", got, (1+4)/2.0, 0, 0)
	})
	t.Run("normal quantile grid approaches the closed form", func(t *testing.T) {
		// The draws are the normal quantiles at (i − ½)/n; the empirical
		// CRPS tends to the normal one (Gneiting et al. 2005) as n grows.
		const n = 20000
		mu, sd, y := 10.0, 3.0, 12.5
		paths := make([][]float64, n)
		for i := range paths {
			paths[i] = []float64{mu + sd*distuv.UnitNormal.Quantile((float64(i)+0.5)/n)}
		}
		got, err := accuracy.CRPSSample([]float64{y}, paths)
		if err != nil {
			t.Fatal(err)
		}
		want, _ := accuracy.CRPSNormal([]float64{y}, []float64{mu}, []float64{sd})
		numtest.Scalar(t, "crps", got, want, 1e-3, 0)
	})
}
