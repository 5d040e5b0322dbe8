package accuracy_test

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/google/go-cmp/cmp"
)

// paramsFit wraps a Fitted and reports a parameter count.
type paramsFit struct {
	almanac.Fitted
	k int
}

func (p paramsFit) NumParams() int { return p.k }

func TestDiagnose(t *testing.T) {
	y := airPassengers(t)
	fit, err := almanac.SeasonalNaive{}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	res := fit.Residuals() // the first 12 are NaN
	n := 0
	for _, v := range res {
		if !math.IsNaN(v) {
			n++
		}
	}
	if n != 132 {
		t.Fatalf("%d observed residuals, want 132", n)
	}

	t.Run("defaults", func(t *testing.T) {
		d, err := accuracy.Residuals{Period: 12}.Diagnose(fit)
		if err != nil {
			t.Fatal(err)
		}
		if d.N != n {
			t.Errorf("N = %d, want %d", d.N, n)
		}
		// R's acf default lag.max = floor(10·log10(n)) (recalled from
		// memory): floor(10·log10(132)) = floor(21.2) = 21.
		if got := len(d.ACF.Values); got != 22 {
			t.Errorf("ACF has %d lags, want 0..21", got)
		}
		if got := len(d.PACF.Values); got != 21 {
			t.Errorf("PACF has %d lags, want 1..21", got)
		}
		// The white-noise bound is Φ⁻¹(0.975)/√n, 1.959963984540054 being
		// the normal quantile (common practice; R's qnorm(0.975)).
		numtest.Scalar(t, "bound", d.ACF.Bound, 1.959963984540054/math.Sqrt(float64(n)), 0, 1e-15)
		// Default portmanteau lag for period 12: min(2·12, 132/5) = 24;
		// the seasonal naive fit reports 0 parameters.
		if d.LjungBox.Lag != 24 || d.LjungBox.FitDF != 0 || d.LjungBox.DF != 24 {
			t.Errorf("Ljung-Box %+v", d.LjungBox)
		}
		want, err := accuracy.LjungBox(res, 24, 0)
		if err != nil {
			t.Fatal(err)
		}
		if d := cmp.Diff(want, d.LjungBox); d != "" {
			t.Errorf("Ljung-Box differs from the stand-alone test (-want +got):\n%s", d)
		}
		bp, _ := accuracy.BoxPierce(res, 24, 0)
		if d := cmp.Diff(bp, d.BoxPierce); d != "" {
			t.Errorf("Box-Pierce differs (-want +got):\n%s", d)
		}
		acf, _ := accuracy.ACF(res, 21)
		if d := cmp.Diff(acf, d.ACF); d != "" {
			t.Errorf("ACF differs (-want +got):\n%s", d)
		}
		// The seasonal naive residuals of AirPassengers are strongly
		// autocorrelated (the trend is left in): lag 1 is significant.
		if sig := d.ACF.Significant(); len(sig) == 0 || sig[0] != 1 {
			t.Errorf("significant lags %v, want lag 1 first", sig)
		}
	})
	t.Run("parameter count", func(t *testing.T) {
		d, err := accuracy.Residuals{Lag: 10}.Diagnose(paramsFit{fit, 3})
		if err != nil {
			t.Fatal(err)
		}
		if d.LjungBox.FitDF != 3 || d.LjungBox.DF != 7 || d.BoxPierce.DF != 7 {
			t.Errorf("df: %+v / %+v", d.LjungBox, d.BoxPierce)
		}
		d2, _ := accuracy.Residuals{Lag: 10, FitDF: -1}.Diagnose(paramsFit{fit, 3})
		if d2.LjungBox.FitDF != 0 || d2.LjungBox.Statistic != d.LjungBox.Statistic {
			t.Errorf("FitDF −1 should ignore the parameter count: %+v", d2.LjungBox)
		}
		d3, _ := accuracy.Residuals{Lag: 10, FitDF: 2}.DiagnoseValues(res)
		if d3.LjungBox.DF != 8 {
			t.Errorf("explicit FitDF 2: df %d, want 8", d3.LjungBox.DF)
		}
	})
	t.Run("errors", func(t *testing.T) {
		for _, c := range []struct {
			name    string
			run     func() error
			wantErr error
		}{
			{"nil fit", func() error { _, err := accuracy.Residuals{}.Diagnose(nil); return err }, almanac.ErrInvalid},
			{"constant", func() error {
				_, err := accuracy.Residuals{}.DiagnoseValues([]float64{1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1})
				return err
			}, almanac.ErrConstant},
			{"all NaN", func() error { _, err := accuracy.Residuals{}.DiagnoseValues([]float64{nan, nan}); return err }, almanac.ErrAllMissing},
			{"no df left", func() error { _, err := accuracy.Residuals{Lag: 3, FitDF: 3}.DiagnoseValues(res); return err }, almanac.ErrInvalid},
			{"lag too long", func() error { _, err := accuracy.LjungBox([]float64{1, 2, 3}, 3, 0); return err }, almanac.ErrTooShort},
			{"Inf", func() error { _, err := accuracy.ACF([]float64{1, math.Inf(1), 3}, 1); return err }, almanac.ErrNonFinite},
			{"negative lag", func() error { _, err := accuracy.PACF([]float64{1, 2, 3}, -1); return err }, almanac.ErrInvalid},
			{"negative lag of Autocovariances", func() error { _, err := accuracy.Autocovariances([]float64{1, 2, 3}, -2); return err }, almanac.ErrInvalid},
			{"Ljung-Box lag 0", func() error { _, err := accuracy.LjungBox([]float64{1, 2, 3}, 0, 0); return err }, almanac.ErrInvalid},
			{"one observed value", func() error { _, err := accuracy.ACF([]float64{nan, 4, nan}, 0); return err }, almanac.ErrTooShort},
			{"negative fitdf", func() error { _, err := accuracy.BoxPierce([]float64{1, 2, 3, 5}, 2, -1); return err }, almanac.ErrInvalid},
		} {
			t.Run(c.name, func(t *testing.T) {
				if err := c.run(); !errors.Is(err, c.wantErr) {
					t.Errorf("error %v, want %v", err, c.wantErr)
				}
			})
		}
	})
}

// TestLjungBoxLeadingNaN: R's Box.test passes NaN to acf with na.pass
// and counts n as the observed values, so leading NaN (a naive model's
// first residual) change nothing against the trimmed series.
func TestLjungBoxLeadingNaN(t *testing.T) {
	x := lhSeries(t).Values
	with := append([]float64{nan, nan}, x...)
	a, err := accuracy.LjungBox(x, 10, 1)
	if err != nil {
		t.Fatal(err)
	}
	b, err := accuracy.LjungBox(with, 10, 1)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "statistic", b.Statistic, a.Statistic, 0, 1e-14)
	numtest.Scalar(t, "p-value", b.PValue, a.PValue, 0, 1e-12)
}

func TestKindStrings(t *testing.T) {
	for _, c := range []struct {
		got, want string
	}{
		{accuracy.LjungBoxTest.String(), "Ljung-Box"},
		{accuracy.BoxPierceTest.String(), "Box-Pierce"},
		{accuracy.PortmanteauKind(9).String(), "PortmanteauKind(9)"},
		{accuracy.Expanding.String(), "expanding"},
		{accuracy.Sliding.String(), "sliding"},
		{accuracy.WindowKind(5).String(), "WindowKind(5)"},
	} {
		if c.got != c.want {
			t.Errorf("%q, want %q", c.got, c.want)
		}
	}
}
