package accuracy

import "github.com/almanac-go/almanac"

// PilotFitWith builds a PilotFit around a given route fit and backup, for
// testing what Forecast does when the route fails.
func PilotFitWith(y almanac.Series, inner, backup almanac.Fitted) *PilotFit {
	return &PilotFit{y: y, inner: inner, backup: backup, paths: defaultPilotPaths, report: PilotReport{Members: []string{inner.String()}}}
}
