package accuracy

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/smoothing"
)

// DemandClass is the demand pattern of a non-negative series in the
// classification of Syntetos, Boylan & Croston (2005) by the average
// inter-demand interval (ADI: observed periods per period with demand)
// and the squared coefficient of variation of the non-zero demand sizes
// (CV²), with their cut-offs ADI = 1.32 and CV² = 0.49:
//
//	               CV² < 0.49      CV² ≥ 0.49
//	ADI < 1.32     smooth          erratic
//	ADI ≥ 1.32     intermittent    lumpy
//
// The paper finds the Syntetos–Boylan approximation better than
// Croston's method and simple exponential smoothing in the intermittent
// and lumpy classes; Pilot routes those to it and the others by
// frequency. Programs should not rely on the numeric values.
type DemandClass int

const (
	// DemandUnclassified: a series with a negative value or without any
	// demand (the zero value).
	DemandUnclassified DemandClass = iota
	DemandSmooth
	DemandErratic
	DemandIntermittent
	DemandLumpy
)

// The cut-offs of Syntetos, Boylan & Croston (2005).
const (
	adiCutoff = 1.32
	cv2Cutoff = 0.49
)

// String returns "smooth", "erratic", "intermittent", "lumpy" or
// "unclassified".
func (c DemandClass) String() string {
	switch c {
	case DemandUnclassified:
		return "unclassified"
	case DemandSmooth:
		return "smooth"
	case DemandErratic:
		return "erratic"
	case DemandIntermittent:
		return "intermittent"
	case DemandLumpy:
		return "lumpy"
	}
	return fmt.Sprintf("DemandClass(%d)", int(c))
}

// Intermittent reports whether demand occurs in too few periods for the
// usual models: the intermittent and lumpy classes.
func (c DemandClass) Intermittent() bool { return c == DemandIntermittent || c == DemandLumpy }

// ClassifyDemand returns the demand class of y (missing values left out)
// and its ADI and CV². A series with a negative value or no demand is
// DemandUnclassified with NaN measures.
func ClassifyDemand(y []float64) (class DemandClass, adi, cv2 float64) {
	var periods, demands int
	var sum, sumsq float64
	for _, v := range y {
		switch {
		case math.IsNaN(v):
			continue
		case v < 0:
			return DemandUnclassified, math.NaN(), math.NaN()
		case v > 0:
			demands++
			sum += v
		}
		periods++
	}
	if demands == 0 {
		return DemandUnclassified, math.NaN(), math.NaN()
	}
	mean := sum / float64(demands)
	for _, v := range y {
		if v > 0 {
			d := v - mean
			sumsq += d * d
		}
	}
	adi = float64(periods) / float64(demands)
	cv2 = sumsq / float64(demands) / (mean * mean)
	switch {
	case adi < adiCutoff && cv2 < cv2Cutoff:
		class = DemandSmooth
	case adi < adiCutoff:
		class = DemandErratic
	case cv2 < cv2Cutoff:
		class = DemandIntermittent
	default:
		class = DemandLumpy
	}
	return class, adi, cv2
}

func classifyDemand(y []float64) DemandClass {
	c, _, _ := ClassifyDemand(y)
	return c
}

// intermittentStage fits the Syntetos–Boylan approximation with its
// constant estimated (0.1 when the series is too short to estimate it);
// its bands and sample paths are those of smoothing's intermittent-demand
// fit (simulated from the fitted process, never below zero).
func intermittentStage() stage {
	return stage{route: RouteIntermittent, needsComplete: true, fit: func(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
		fit, err := smoothing.Croston{Variant: smoothing.CrostonSBA, EstimateAlpha: true}.Fit(ctx, y)
		if err != nil && ctx.Err() == nil {
			fit, err = smoothing.Croston{Variant: smoothing.CrostonSBA}.Fit(ctx, y)
		}
		return fit, err
	}}
}

// lastValue forecasts the last observed value of a series with a single
// observation: bands of zero width, constant sample paths.
type lastValue struct {
	y     almanac.Series
	value float64
}

func newLastValue(y almanac.Series) *lastValue {
	v := math.NaN()
	for k := y.Len() - 1; k >= 0; k-- {
		if !math.IsNaN(y.Values[k]) {
			v = y.Values[k]
			break
		}
	}
	return &lastValue{y: y, value: v}
}

// String returns "last value".
func (f *lastValue) String() string { return "last value" }

// FittedValues returns NaN: a single value forecasts nothing in sample.
func (f *lastValue) FittedValues() []float64 {
	out := make([]float64, f.y.Len())
	for i := range out {
		out[i] = math.NaN()
	}
	return out
}

// Residuals returns NaN throughout, as FittedValues.
func (f *lastValue) Residuals() []float64 { return f.FittedValues() }

// Forecast returns the last value at every step, with bands of zero
// width.
func (f *lastValue) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: last value: %w", err)
	}
	mean := make([]float64, h)
	sd := make([]float64, h)
	for j := range mean {
		mean[j] = f.value
	}
	return almanac.NewForecast(f.y.Time(f.y.Len()), f.y.Freq, mean, &almanac.Normal{Mean: mean, SD: sd}, levels...)
}

// Simulate returns n constant paths.
func (f *lastValue) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("accuracy: last value: %w", err)
	}
	if n < 1 {
		return nil, fmt.Errorf("accuracy: last value: %w: %d paths", almanac.ErrInvalid, n)
	}
	out := make([][]float64, n)
	for i := range out {
		out[i] = make([]float64, h)
		for j := range out[i] {
			out[i][j] = f.value
		}
	}
	return out, nil
}
