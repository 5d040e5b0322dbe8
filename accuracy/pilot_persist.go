package accuracy

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
)

// Kinds of Pilot's fitted values in saved documents (see
// almanac.SaveModel).
const (
	kindPilot     = "accuracy.pilot"
	kindLastValue = "accuracy.last-value"
)

func init() {
	almanac.Register(kindPilot, 1, loadPilot)
	almanac.Register(kindLastValue, 1, loadLastValue)
}

var (
	_ almanac.Storable = (*PilotFit)(nil)
	_ almanac.Storable = (*lastValue)(nil)
)

// pilotBody is the saved form of a PilotFit. The route's fitted model is
// a nested document of its own kind (a CalibratedFit around a
// combination, an intermittent-demand fit, a benchmark, ...), so the
// document holds exactly what that kind saves. What Pilot decided before
// fitting is stored as decided (the route, its periods, the fallbacks
// taken); what follows from the data is computed again on loading: the
// leading missing values left out, the demand class, non-negativity, the
// values filled by decompose.Repair (Repaired says whether they were),
// the members and dropped models (read from the nested model), the
// calibration status, and the benchmark at the end of the fallback
// chain, all of them deterministic functions of the stored series.
type pilotBody struct {
	Series    almanac.StoredSeries `json:"series"`
	Paths     int                  `json:"paths"`
	Seed      uint64               `json:"seed"`
	Route     string               `json:"route"`
	Periods   []float64            `json:"periods,omitempty"`
	Fallbacks []string             `json:"fallbacks,omitempty"`
	Repaired  bool                 `json:"repaired,omitempty"`
	Refreshed int                  `json:"refreshed,omitempty"`
	Inner     json.RawMessage      `json:"inner"`
}

// StoredKind implements almanac.Storable.
func (f *PilotFit) StoredKind() (string, int) { return kindPilot, 1 }

// StoredBody implements almanac.Storable. The route's fitted model is
// saved as a nested document, so it must be almanac.Storable too (every
// model Pilot fits is, once its kind is registered; the error of
// almanac.MarshalModel is passed on otherwise).
func (f *PilotFit) StoredBody() ([]byte, error) {
	if f == nil || f.inner == nil {
		return nil, fmt.Errorf("accuracy: pilot: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	inner, err := almanac.MarshalModel(f.inner)
	if err != nil {
		return nil, fmt.Errorf("accuracy: pilot: route %v: %w", f.report.Route, err)
	}
	return json.Marshal(pilotBody{
		Series:    almanac.StoreSeries(f.y),
		Paths:     f.paths,
		Seed:      f.seed,
		Route:     f.report.Route.String(),
		Periods:   f.report.Periods,
		Fallbacks: f.report.Fallbacks,
		Repaired:  len(f.report.Repairs) > 0,
		Refreshed: f.refreshed,
		Inner:     inner,
	})
}

// maxPilotPaths bounds the number of sample paths a loaded fit draws
// per forecast, so a tampered document cannot make Forecast exhaust
// memory (the bound of the root package's combinations).
const maxPilotPaths = 1 << 20

// allRoutes lists every route, for reading their names back.
var allRoutes = []Route{RouteBenchmark, RouteCombination, RouteNonSeasonal, RouteWeekly, RouteMultiSeasonal, RouteIntermittent}

func loadPilot(_ int, body []byte) (almanac.Fitted, error) {
	var b pilotBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	route := Route(-1)
	for _, r := range allRoutes {
		if r.String() == b.Route {
			route = r
		}
	}
	if route < 0 {
		return nil, fmt.Errorf("unknown route %q", b.Route)
	}
	if b.Paths < 1 || b.Paths > maxPilotPaths {
		return nil, fmt.Errorf("%d sample paths (need 1 to %d)", b.Paths, maxPilotPaths)
	}
	for _, p := range b.Periods {
		if !(p > 1) || math.IsInf(p, 0) || p > float64(y.Len()) {
			return nil, fmt.Errorf("seasonal period %v outside (1, %d]", p, y.Len())
		}
	}
	if len(b.Inner) == 0 {
		return nil, errors.New("no route model")
	}
	first := slices.IndexFunc(y.Values, func(v float64) bool { return !math.IsNaN(v) })
	if b.Refreshed < 0 || b.Refreshed >= y.Len()-first {
		return nil, fmt.Errorf("%d refreshed values of %d", b.Refreshed, y.Len()-first)
	}
	f := &PilotFit{y: y, paths: b.Paths, seed: b.Seed, refreshed: b.Refreshed}
	rep := &f.report
	rep.Trimmed = first
	given := y.Window(first, y.Len())
	// The values Fit saw, then those Refresh added.
	work := given.Window(0, given.Len()-b.Refreshed).Clone()
	if b.Repaired {
		if work.Missing() == 0 {
			return nil, errors.New("repaired, but no value is missing")
		}
		filled, changes, err := repairGaps(work)
		if err != nil {
			return nil, fmt.Errorf("repairing the gaps again: %w", err)
		}
		work, rep.Repairs = filled, changes
	}
	if route != RouteBenchmark && work.Missing() > 0 {
		return nil, fmt.Errorf("route %v on a series with %d gaps not repaired", route, work.Missing())
	}
	work.Values = append(work.Values, given.Values[given.Len()-b.Refreshed:]...)
	inner, err := almanac.UnmarshalModel(b.Inner)
	if err != nil {
		return nil, fmt.Errorf("route model: %w", err)
	}
	if n := len(inner.FittedValues()); n != work.Len() {
		return nil, fmt.Errorf("%w: the route model %s has %d observations, the series %d after %d leading missing values", almanac.ErrLength, inner, n, work.Len(), first)
	}
	if _, ok := inner.(almanac.Simulator); !ok {
		return nil, fmt.Errorf("the route model %s cannot simulate", inner)
	}
	rep.Route = route
	rep.Periods = slices.Clone(b.Periods)
	rep.Fallbacks = slices.Clone(b.Fallbacks)
	f.describe(inner, given)
	f.settle(context.Background(), inner, work)
	return f, nil
}

// lastValueBody is the saved form of the last-value forecaster: the
// series, from which the last observed value is read again.
type lastValueBody struct {
	Series almanac.StoredSeries `json:"series"`
}

// StoredKind implements almanac.Storable.
func (f *lastValue) StoredKind() (string, int) { return kindLastValue, 1 }

// StoredBody implements almanac.Storable.
func (f *lastValue) StoredBody() ([]byte, error) {
	if f == nil || f.y.Len() == 0 {
		return nil, fmt.Errorf("accuracy: last value: %w", almanac.ErrNotFitted)
	}
	return json.Marshal(lastValueBody{Series: almanac.StoreSeries(f.y)})
}

func loadLastValue(_ int, body []byte) (almanac.Fitted, error) {
	var b lastValueBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	return newLastValue(y), nil
}
