package accuracy

import (
	"context"

	"github.com/almanac-go/almanac"
)

// PilotFitWith builds a PilotFit around a given route fit and backup, for
// testing what Forecast does when the route fails.
func PilotFitWith(y almanac.Series, inner, backup almanac.Fitted) *PilotFit {
	return &PilotFit{y: y, inner: inner, backup: backup, paths: defaultPilotPaths, report: PilotReport{Members: []string{inner.String()}}}
}

// PilotFitAround builds a PilotFit of the given route around a fitted
// model of y, as Fit would have made it, for testing Refresh with a route
// model that refreshes.
func PilotFitAround(y almanac.Series, inner almanac.Fitted, route Route) *PilotFit {
	f := &PilotFit{y: y, paths: defaultPilotPaths, report: PilotReport{Route: route}}
	f.describe(inner, y)
	f.settle(context.Background(), inner, y)
	return f
}
