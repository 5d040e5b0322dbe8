package main

import (
	"fmt"
	"net/http"
	"slices"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
)

// compareRequest is the body of POST /v1/series/{key}/backtest.
type compareRequest struct {
	// Methods take part besides the benchmarks; none means DefaultMethod.
	Methods []string `json:"methods"`
	// Horizon is the number of steps forecast from each origin; 0 means
	// one seasonal period (1 for non-seasonal data).
	Horizon int `json:"horizon"`
	// Origins is the number of forecast origins, the latest ones; 0
	// means defaultOrigins.
	Origins int `json:"origins"`
	// Levels are the band levels scored; none means 80 and 95.
	Levels []float64 `json:"levels"`
	methodOptions
}

// Bounds of a backtest request.
const (
	defaultOrigins = 4
	maxOrigins     = 48
	maxMethods     = 6
)

// scoresOut are a run's scores in a response (null where undefined).
type scoresOut struct {
	Cells int        `json:"cells"`
	MAE   num        `json:"mae"`
	RMSE  num        `json:"rmse"`
	SMAPE num        `json:"smape"`
	MASE  num        `json:"mase"`
	CRPS  num        `json:"crps"`
	Bands []bandHits `json:"bands"`
}

type bandHits struct {
	Level    float64 `json:"level"`
	Coverage num     `json:"coverage"`
	MSIS     num     `json:"msis"`
}

type ratiosOut struct {
	MAE  num `json:"mae"`
	RMSE num `json:"rmse"`
	MASE num `json:"mase"`
	CRPS num `json:"crps"`
}

type runOut struct {
	Name      string    `json:"name"`
	Benchmark bool      `json:"benchmark"`
	Done      int       `json:"origins_done"`
	Fits      []string  `json:"fits"`
	Failures  []string  `json:"failures,omitempty"`
	Scores    scoresOut `json:"scores"`
	Relative  ratiosOut `json:"relative"`
}

type compareOut struct {
	Series   string   `json:"series"`
	Horizon  int      `json:"horizon"`
	Period   int      `json:"period"`
	Baseline string   `json:"baseline"`
	Origins  []string `json:"origins"`
	Runs     []runOut `json:"runs"`
}

// backtest compares methods with the benchmarks on a stored series by
// accuracy.Backtest at its latest origins.
func (s *Server) backtest(w http.ResponseWriter, r *http.Request) error {
	var req compareRequest
	if err := decodeJSON(r, &req, true); err != nil {
		return err
	}
	if len(req.Methods) == 0 {
		req.Methods = []string{DefaultMethod}
	}
	if len(req.Methods) > maxMethods {
		return &fieldError{Field: "methods", Err: fmt.Errorf("%w: %d methods (at most %d)", ErrRequest, len(req.Methods), maxMethods)}
	}
	switch {
	case req.Origins < 0 || req.Origins > maxOrigins:
		return &fieldError{Field: "origins", Err: fmt.Errorf("%w: %d origins (0 to %d)", ErrRequest, req.Origins, maxOrigins)}
	case req.Origins == 0:
		req.Origins = defaultOrigins
	}
	if req.Horizon < 0 || req.Horizon > s.limits.horizon() {
		return &fieldError{Field: "horizon", Err: fmt.Errorf("%w: horizon %d (0 to %d)", almanac.ErrHorizon, req.Horizon, s.limits.horizon())}
	}
	if len(req.Levels) == 0 {
		req.Levels = defaultLevels
	}
	if len(req.Levels) > maxLevels {
		return &fieldError{Field: "levels", Err: fmt.Errorf("%w: %d levels (at most %d)", ErrRequest, len(req.Levels), maxLevels)}
	}
	for i, l := range req.Levels {
		if err := almanac.CheckLevels(l); err != nil {
			return &fieldError{Field: fmt.Sprintf("levels[%d]", i), Err: err}
		}
	}
	var cands []accuracy.Candidate
	for i, name := range req.Methods {
		field := fmt.Sprintf("methods[%d]", i)
		name, m, err := lookupMethod(name, methodOptions{})
		if err != nil {
			return &fieldError{Field: field, Err: err}
		}
		if !m.compare {
			return &fieldError{Field: field, Err: fmt.Errorf("%w: %q is a benchmark, compared always", ErrRequest, name)}
		}
		if slices.ContainsFunc(cands, func(c accuracy.Candidate) bool { return c.Name == name }) {
			return &fieldError{Field: field, Err: fmt.Errorf("%w: method %q given twice", ErrRequest, name)}
		}
		o := methodOptions{}
		if m.paths {
			o = req.methodOptions
			if _, _, err := lookupMethod(name, o); err != nil {
				return err
			}
		}
		cands = append(cands, accuracy.Candidate{Name: name, Model: m.model(o)})
	}
	y, err := s.store.Series(r.Context(), r.PathValue("key"))
	if err != nil {
		return err
	}
	bt := accuracy.Backtest{Horizon: req.Horizon, Origins: req.Origins, Levels: req.Levels, Workers: 1}
	c, err := bt.Run(r.Context(), y, cands...)
	if err != nil {
		return fmt.Errorf("service: backtest of %q: %w", y.Key, err)
	}
	o := compareOut{Series: y.Key, Horizon: c.Horizon, Period: c.Period, Baseline: c.Baseline, Origins: make([]string, len(c.Origins))}
	for i, org := range c.Origins {
		o.Origins[i] = org.Time.Format(time.RFC3339)
	}
	for i, run := range c.Runs {
		ro := runOut{Name: run.Name, Benchmark: i >= len(cands), Fits: run.Fits, Relative: ratiosOut{
			MAE: num(run.Relative.MAE), RMSE: num(run.Relative.RMSE), MASE: num(run.Relative.MASE), CRPS: num(run.Relative.CRPS)}}
		for _, d := range run.Done {
			if d {
				ro.Done++
			}
		}
		for _, f := range run.Failures {
			ro.Failures = append(ro.Failures, f.Err.Error())
		}
		sc := run.Overall
		ro.Scores = scoresOut{Cells: sc.N, MAE: num(sc.MAE), RMSE: num(sc.RMSE), SMAPE: num(sc.SMAPE), MASE: num(sc.MASE), CRPS: num(sc.CRPS), Bands: []bandHits{}}
		for _, iv := range sc.Intervals {
			ro.Scores.Bands = append(ro.Scores.Bands, bandHits{Level: iv.Level, Coverage: num(iv.Coverage), MSIS: num(iv.MSIS)})
		}
		o.Runs = append(o.Runs, ro)
	}
	writeJSON(w, http.StatusOK, o)
	return nil
}
