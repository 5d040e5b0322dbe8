package nightly

import (
	"fmt"
	"slices"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/smoothing"
)

// models are the forecasting models the pipeline can run, by the name
// given in Options.Model. Each is built the same way on every worker, so
// a test (or a user) can fit the same specification directly.
var models = map[string]func() almanac.Model{
	// Automatic exponential smoothing: the ETS model with the smallest
	// AICc.
	"select": func() almanac.Model { return smoothing.Select{} },
	// Automatic seasonal ARIMA (stepwise order search).
	"arima": func() almanac.Model { return arima.Search{} },
	// The Theta method.
	"theta": func() almanac.Model { return smoothing.Theta{} },
	// The equal-weight mean of automatic exponential smoothing, automatic
	// ARIMA and Theta, with bands from their coupled sample paths.
	"combination": func() almanac.Model {
		return almanac.Combination{Members: []almanac.Model{smoothing.Select{}, arima.Search{}, smoothing.Theta{}}}
	},
	// The seasonal naive benchmark.
	"seasonal-naive": func() almanac.Model { return almanac.SeasonalNaive{} },
}

// DefaultModel is the model used when Options.Model is empty.
const DefaultModel = "select"

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
// DefaultModel). An unknown name is an error wrapping ErrOption.
func NewModel(name string) (almanac.Model, error) {
	if name == "" {
		name = DefaultModel
	}
	mk, ok := models[name]
	if !ok {
		return nil, fmt.Errorf("%w: unknown model %q (one of %s)", ErrOption, name, strings.Join(ModelNames(), ", "))
	}
	return mk(), nil
}
