package nightly

import (
	"fmt"
	"slices"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/smoothing"
)

// models are the forecasting models the pipeline can run, by the name
// given in Options.Model; seed is Options.Seed. Each is built the same
// way on every worker, so a test (or a user) can fit the same
// specification directly.
var models = map[string]func(seed uint64) almanac.Model{
	// The automatic forecaster: a route per series (intermittent demand,
	// the ETS/ARIMA/Theta combination, decomposition routes for weekly
	// and finer data), fallbacks down to the benchmarks, bands calibrated
	// on out-of-sample errors (pooled within each group unless
	// Options.OwnErrors), sample paths seeded by Options.Seed.
	"pilot": func(seed uint64) almanac.Model { return accuracy.Pilot{Seed: seed} },
	// Automatic exponential smoothing: the ETS model with the smallest
	// AICc.
	"select": func(uint64) almanac.Model { return smoothing.Select{} },
	// Automatic seasonal ARIMA (stepwise order search).
	"arima": func(uint64) almanac.Model { return arima.Search{} },
	// The Theta method.
	"theta": func(uint64) almanac.Model { return smoothing.Theta{} },
	// The equal-weight mean of automatic exponential smoothing, automatic
	// ARIMA and Theta, with bands from their coupled sample paths.
	"combination": func(uint64) almanac.Model {
		return almanac.Combination{Members: []almanac.Model{smoothing.Select{}, arima.Search{}, smoothing.Theta{}}}
	},
	// The seasonal naive benchmark.
	"seasonal-naive": func(uint64) almanac.Model { return almanac.SeasonalNaive{} },
}

// DefaultModel is the model used when Options.Model is empty: the
// automatic forecaster accuracy.Pilot.
const DefaultModel = "pilot"

// ModelNames lists the names Options.Model accepts, sorted.
func ModelNames() []string {
	names := make([]string, 0, len(models))
	for n := range models {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

// NewModel returns the model the pipeline runs under name ("" means
// DefaultModel) with the given seed (Options.Seed; only the models with
// sample paths of their own use it: "pilot" gives accuracy.Pilot{Seed:
// seed}). An unknown name is an error wrapping ErrOption.
func NewModel(name string, seed uint64) (almanac.Model, error) {
	if name == "" {
		name = DefaultModel
	}
	mk, ok := models[name]
	if !ok {
		return nil, fmt.Errorf("%w: unknown model %q (one of %s)", ErrOption, name, strings.Join(ModelNames(), ", "))
	}
	return mk(seed), nil
}

// PoolFits pools the calibration errors of one group's fits, as the
// pipeline does before forecasting them: results holds the group's
// fits in the documented order (the nodes of a hierarchy in its node
// order; the series of a bucket in key order), and the calibrated
// accuracy.Pilot fits among them are replaced by copies that draw on
// the errors of all of them (accuracy.PoolPilots with its default
// groups: frequency and route). Other results pass through unchanged;
// ownErrors (Options.OwnErrors) returns results as they are.
func PoolFits(results []almanac.BatchResult, ownErrors bool) ([]almanac.BatchResult, error) {
	if ownErrors {
		return results, nil
	}
	return accuracy.PoolPilots(results, accuracy.PoolOptions{})
}
