package accuracy

import (
	"fmt"
	"slices"

	"github.com/almanac-go/almanac"
)

// PoolPilots gives every calibrated Pilot fit of a batch (the results of
// almanac.BatchFit with a Pilot) the scaled out-of-sample error
// trajectories of all the Pilot fits of its group, as PoolCalibration
// does for Calibrated fits, and returns the results with those fits
// replaced by pooled copies; the input is not modified. By default the
// group of a fit is the frequency of its series and its route (so that,
// say, monthly series on the combination route pool with each other and
// not with intermittent demand); opt.Groups, when given, holds one label
// per result instead. Fits are also kept apart by calibrated horizon and
// error scale. Results that failed, or hold another model's fit, or an
// uncalibrated Pilot fit, are passed through unchanged.
//
// Pooling assumes that, once scaled by each model's own spread, the error
// trajectories of the series in a group are exchangeable (see
// Calibrated). Each pooled fit's Report().Calibration gives the number
// of trajectories it draws on and their source.
//
// Special cases: opt.Groups of the wrong length gives an error wrapping
// almanac.ErrLength.
func PoolPilots(results []almanac.BatchResult, opt PoolOptions) ([]almanac.BatchResult, error) {
	if opt.Groups != nil && len(opt.Groups) != len(results) {
		return nil, fmt.Errorf("accuracy: pool pilots: %w: %d group labels for %d results", almanac.ErrLength, len(opt.Groups), len(results))
	}
	inner := make([]almanac.BatchResult, len(results))
	groups := make([]string, len(results))
	for i, r := range results {
		inner[i] = almanac.BatchResult{Key: r.Key, Err: r.Err}
		pf, ok := r.Fitted.(*PilotFit)
		if r.Err != nil || !ok {
			continue
		}
		cf, ok := pf.inner.(*CalibratedFit)
		if !ok {
			continue
		}
		inner[i].Fitted = cf
		if opt.Groups != nil {
			groups[i] = opt.Groups[i]
		} else {
			groups[i] = pf.y.Freq.String() + "/" + pf.report.Route.String()
		}
	}
	pooled, err := PoolCalibration(inner, PoolOptions{Groups: groups})
	if err != nil {
		return nil, fmt.Errorf("accuracy: pool pilots: %w", err)
	}
	out := slices.Clone(results)
	for i, r := range pooled {
		cf, ok := r.Fitted.(*CalibratedFit)
		if !ok {
			continue
		}
		cp := *results[i].Fitted.(*PilotFit)
		cp.inner = cf
		cp.report.Calibration = cf.Status()
		out[i].Fitted = &cp
	}
	return out, nil
}
