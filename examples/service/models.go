package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"net/http"
	"strconv"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/examples/charts"
)

// modelInfo describes a stored model in responses.
type modelInfo struct {
	ID      int64           `json:"id"`
	Series  string          `json:"series"`
	Method  string          `json:"method"`
	Options json.RawMessage `json:"options"`
	Model   string          `json:"model"`
	Stored  string          `json:"stored_as"`
	Seen    int             `json:"observations"`
	Added   int             `json:"added_since_estimation"`
	Refits  int             `json:"refits"`
	Created time.Time       `json:"created"`
	Updated time.Time       `json:"updated"`
	Route   *routeInfo      `json:"route,omitempty"`
}

// routeInfo is what the automatic forecaster did for the series.
type routeInfo struct {
	Route       string   `json:"route"`
	Members     []string `json:"members,omitempty"`
	Dropped     []string `json:"dropped,omitempty"`
	Fallbacks   []string `json:"fallbacks,omitempty"`
	Filled      int      `json:"filled_values"`
	Calibration string   `json:"calibration,omitempty"`
}

func infoOfModel(rec ModelRecord, fit almanac.Fitted) modelInfo {
	opts := json.RawMessage(rec.Options)
	if len(opts) == 0 {
		opts = json.RawMessage("{}")
	}
	mi := modelInfo{ID: rec.ID, Series: rec.SeriesKey, Method: rec.Method, Options: opts, Model: rec.Label, Stored: rec.Form,
		Seen: rec.Seen, Added: rec.Added, Refits: rec.Refits, Created: rec.Created, Updated: rec.Updated}
	if p, ok := fit.(*accuracy.PilotFit); ok {
		rep := p.Report()
		ri := &routeInfo{Route: rep.Route.String(), Members: rep.Members, Dropped: rep.Dropped, Fallbacks: rep.Fallbacks, Filled: len(rep.Repairs)}
		if rep.Calibrated {
			c := rep.Calibration
			ri.Calibration = fmt.Sprintf("%v: %d own and %d pooled error trajectories over %d steps", c.Source, c.Own, c.Pooled, c.Horizon)
		}
		mi.Route = ri
	}
	return mi
}

// fitRequest is the body of POST /v1/models.
type fitRequest struct {
	Series string `json:"series"`
	Method string `json:"method"`
	methodOptions
}

// fitModel fits a stored series and stores the model.
func (s *Server) fitModel(w http.ResponseWriter, r *http.Request) error {
	var req fitRequest
	if err := decodeJSON(r, &req, false); err != nil {
		return err
	}
	if req.Series == "" {
		return &fieldError{Field: "series", Err: fmt.Errorf("%w: no series key", ErrRequest)}
	}
	name, _, err := lookupMethod(req.Method, req.methodOptions)
	if err != nil {
		return err
	}
	ctx := r.Context()
	y, err := s.store.Series(ctx, req.Series)
	if err != nil {
		return err
	}
	f, err := fitWith(ctx, name, req.methodOptions, y)
	if err != nil {
		return err
	}
	opts, err := json.Marshal(req.methodOptions)
	if err != nil {
		return err
	}
	rec := ModelRecord{SeriesKey: y.Key, Method: name, Options: opts, Label: f.fit.String(), Form: f.form, Body: f.body,
		Seen: y.Len(), Digest: digest(y, y.Len())}
	if rec.ID, err = s.store.AddModel(ctx, rec); err != nil {
		return err
	}
	s.rememberRecord(rec, f.fit)
	// Committed: answer even if the client has gone meanwhile.
	if rec, err = s.store.Model(context.WithoutCancel(ctx), rec.ID); err != nil {
		return err
	}
	writeJSON(w, http.StatusCreated, infoOfModel(rec, f.fit))
	return nil
}

func (s *Server) listModels(w http.ResponseWriter, r *http.Request) error {
	recs, err := s.store.Models(r.Context(), r.URL.Query().Get("series"))
	if err != nil {
		return err
	}
	out := make([]modelInfo, len(recs))
	for i, rec := range recs {
		out[i] = infoOfModel(rec, nil)
	}
	writeJSON(w, http.StatusOK, map[string]any{"models": out})
	return nil
}

func (s *Server) getModel(w http.ResponseWriter, r *http.Request) error {
	id, err := modelID(r)
	if err != nil {
		return err
	}
	rec, fit, err := s.model(r.Context(), id)
	if err != nil {
		return err
	}
	writeJSON(w, http.StatusOK, infoOfModel(rec, fit))
	return nil
}

// getDocument answers with the model's saved-model document, which
// almanac.LoadModel reads.
func (s *Server) getDocument(w http.ResponseWriter, r *http.Request) error {
	id, err := modelID(r)
	if err != nil {
		return err
	}
	rec, err := s.store.Model(r.Context(), id)
	if err != nil {
		return err
	}
	if rec.Form != FormDocument {
		return fmt.Errorf("service: model %d (%s): %w: no saved-model document; its type cannot be saved, so the service keeps how to fit it again", id, rec.Label, ErrNotFound)
	}
	w.Header().Set("Content-Type", "application/json")
	w.Write(rec.Body)
	return nil
}

// DefaultHorizon is the forecast horizon when the request gives none.
const DefaultHorizon = 12

// defaultLevels are the band levels when the request gives none.
var defaultLevels = []float64{80, 95}

// horizonAndLevels reads the query parameters h (steps ahead) and level
// (repeatable, percentages in (0, 100)).
func (s *Server) horizonAndLevels(r *http.Request) (int, []float64, error) {
	q := r.URL.Query()
	h := DefaultHorizon
	if v := q.Get("h"); v != "" {
		n, err := strconv.Atoi(v)
		if err != nil || n < 1 || n > s.limits.horizon() {
			return 0, nil, &fieldError{Field: "h", Err: fmt.Errorf("%w: h=%q (a whole number of steps in [1, %d])", almanac.ErrHorizon, v, s.limits.horizon())}
		}
		h = n
	}
	levels := defaultLevels
	if vs := q["level"]; len(vs) > 0 {
		if len(vs) > maxLevels {
			return 0, nil, &fieldError{Field: "level", Err: fmt.Errorf("%w: %d levels (at most %d)", ErrRequest, len(vs), maxLevels)}
		}
		levels = make([]float64, len(vs))
		for i, v := range vs {
			x, err := strconv.ParseFloat(v, 64)
			if err != nil || !(x > 0 && x < 100) {
				return 0, nil, &fieldError{Field: "level", Err: fmt.Errorf("%w: level=%q (a percentage in (0, 100))", almanac.ErrLevel, v)}
			}
			levels[i] = x
		}
	}
	return h, levels, nil
}

// bandOut is one band of a forecast response.
type bandOut struct {
	Level float64   `json:"level"`
	Lower []float64 `json:"lower"`
	Upper []float64 `json:"upper"`
}

// forecastOut is the body of a forecast response.
type forecastOut struct {
	ModelID int64     `json:"model_id"`
	Model   string    `json:"model"`
	Series  string    `json:"series"`
	Unit    string    `json:"unit"`
	Every   int       `json:"every"`
	Times   []string  `json:"times"`
	Mean    []float64 `json:"mean"`
	Bands   []bandOut `json:"bands"`
}

// checkForecast reports a forecast with a value that is not finite (JSON
// cannot carry it, and a planner cannot use it).
func checkForecast(id int64, fc almanac.Forecast) error {
	bad := func(xs []float64) bool {
		for _, x := range xs {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return true
			}
		}
		return false
	}
	if bad(fc.Mean) {
		return fmt.Errorf("service: model %d: %w: %w in the forecast", id, almanac.ErrNotFitted, almanac.ErrNonFinite)
	}
	for _, iv := range fc.Intervals {
		if bad(iv.Lower) || bad(iv.Upper) {
			return fmt.Errorf("service: model %d: %w: %w in the %v%% band", id, almanac.ErrNotFitted, almanac.ErrNonFinite, iv.Level)
		}
	}
	return nil
}

// forecast answers GET /v1/models/{id}/forecast?h=12&level=80&level=95.
func (s *Server) forecast(w http.ResponseWriter, r *http.Request) error {
	id, err := modelID(r)
	if err != nil {
		return err
	}
	h, levels, err := s.horizonAndLevels(r)
	if err != nil {
		return err
	}
	rec, fit, err := s.model(r.Context(), id)
	if err != nil {
		return err
	}
	fc, err := fit.Forecast(h, levels...)
	if err != nil {
		return fmt.Errorf("service: model %d: %w", id, err)
	}
	if err := checkForecast(id, fc); err != nil {
		return err
	}
	o := forecastOut{ModelID: id, Model: rec.Label, Series: rec.SeriesKey, Unit: fc.Freq.Unit.String(), Every: max(fc.Freq.N, 1),
		Times: make([]string, fc.Horizon()), Mean: fc.Mean, Bands: []bandOut{}}
	for i := range o.Times {
		o.Times[i] = fc.Time(i).Format(time.RFC3339)
	}
	for _, iv := range fc.Intervals {
		o.Bands = append(o.Bands, bandOut{Level: iv.Level, Lower: iv.Lower, Upper: iv.Upper})
	}
	writeJSON(w, http.StatusOK, o)
	return nil
}

// history returns the observations the stored model has taken, checking
// that the stored series still begins with them.
func (s *Server) history(r *http.Request, rec ModelRecord) (almanac.Series, error) {
	y, err := s.store.Series(r.Context(), rec.SeriesKey)
	if err != nil {
		return almanac.Series{}, err
	}
	if y.Len() < rec.Seen || digest(y, rec.Seen) != rec.Digest {
		return almanac.Series{}, fmt.Errorf("service: model %d: %w: series %q was replaced after the model took its observations; fit a new model", rec.ID, ErrConflict, rec.SeriesKey)
	}
	return y, nil
}

// chart answers GET /v1/models/{id}/chart?format=svg|png&h=&level=&width=&height=
// with a fan chart of the history, the fit and the forecast.
func (s *Server) chart(w http.ResponseWriter, r *http.Request) error {
	id, err := modelID(r)
	if err != nil {
		return err
	}
	h, levels, err := s.horizonAndLevels(r)
	if err != nil {
		return err
	}
	q := r.URL.Query()
	format := q.Get("format")
	if format == "" {
		format = "svg"
	}
	if format != "svg" && format != "png" {
		return &fieldError{Field: "format", Err: fmt.Errorf("%w: format %q (svg or png)", charts.ErrFormat, format)}
	}
	var size [2]int
	for i, name := range []string{"width", "height"} {
		if v := q.Get(name); v != "" {
			n, err := strconv.Atoi(v)
			if err != nil || n < 100 || n > 4000 {
				return &fieldError{Field: name, Err: fmt.Errorf("%w: %s=%q (pixels in [100, 4000])", ErrRequest, name, v)}
			}
			size[i] = n
		}
	}
	rec, fit, err := s.model(r.Context(), id)
	if err != nil {
		return err
	}
	y, err := s.history(r, rec)
	if err != nil {
		return err
	}
	fc, err := fit.Forecast(h, levels...)
	if err != nil {
		return fmt.Errorf("service: model %d: %w", id, err)
	}
	pic, err := charts.Fan(y.Head(rec.Seen), fit.FittedValues(), fc, charts.Options{Width: size[0], Height: size[1],
		Title: fmt.Sprintf("%s — %s (model %d)", rec.SeriesKey, rec.Label, id)})
	if err != nil {
		return fmt.Errorf("service: model %d: chart: %w", id, err)
	}
	var buf bytes.Buffer
	if format == "png" {
		err = pic.WritePNG(&buf)
		w.Header().Set("Content-Type", "image/png")
	} else {
		err = pic.WriteSVG(&buf)
		w.Header().Set("Content-Type", "image/svg+xml")
	}
	if err != nil {
		w.Header().Del("Content-Type")
		return fmt.Errorf("service: model %d: chart: %w", id, err)
	}
	w.Write(buf.Bytes())
	return nil
}

// refreshRequest is the optional body of POST /v1/models/{id}/refresh:
// the refresh policy (zero values mean the library's defaults).
type refreshRequest struct {
	RefitAfter   int     `json:"refit_after"`
	SignalWeight float64 `json:"signal_weight"`
	SignalLimit  float64 `json:"signal_limit"`
}

// decisionOut is a refresh policy decision in a response.
type decisionOut struct {
	Refit  bool   `json:"refit"`
	Reason string `json:"reason"`
	Added  int    `json:"added"`
	Signal num    `json:"signal"`
}

// refresh brings a stored model up to its series: the observations
// stored after those it has taken are given to almanac.Refresh, the
// refresh policy decides whether the model must be estimated again, and
// when it says so (or the model cannot be refreshed) it is fitted again
// on the whole series by its method. The model keeps its id.
func (s *Server) refresh(w http.ResponseWriter, r *http.Request) error {
	id, err := modelID(r)
	if err != nil {
		return err
	}
	var req refreshRequest
	if err := decodeJSON(r, &req, true); err != nil {
		return err
	}
	policy := almanac.RefreshPolicy{RefitAfter: req.RefitAfter, SignalWeight: req.SignalWeight, SignalLimit: req.SignalLimit}
	ctx := r.Context()
	rec, fit, err := s.model(ctx, id)
	if err != nil {
		return err
	}
	y, err := s.history(r, rec)
	if err != nil {
		return err
	}
	fresh := y.Values[rec.Seen:]
	if len(fresh) == 0 {
		// Still check the policy's fields, so a bad one is reported.
		if _, err := policy.Decide(fit, rec.Added); err != nil {
			return &fieldError{Err: err}
		}
		writeJSON(w, http.StatusOK, map[string]any{"action": "unchanged", "model": infoOfModel(rec, fit),
			"decision": decisionOut{Reason: "no observations after those the model has taken", Added: rec.Added, Signal: num(math.NaN())}})
		return nil
	}
	var opts methodOptions
	if err := json.Unmarshal(rec.Options, &opts); err != nil {
		return fmt.Errorf("service: model %d: %w: options: %v", id, almanac.ErrDecode, err)
	}
	added := rec.Added + len(fresh)
	var d almanac.RefreshDecision
	var next fitted
	refreshed, err := almanac.Refresh(fit, fresh)
	switch {
	case err == nil:
		if d, err = policy.Decide(refreshed, added); err != nil {
			return &fieldError{Err: err}
		}
		if !d.Refit {
			if next, err = encodeFit(refreshed, rec.Method, opts, y); err != nil {
				return err
			}
			if next.form != FormDocument { // a recipe would fit it anew: refit instead
				d.Refit, d.Reason = true, "refit: the refreshed model cannot be saved as a document"
			}
		}
	case errors.Is(err, almanac.ErrNotRefreshable):
		if d, err = policy.Decide(fit, added); err != nil {
			return &fieldError{Err: err}
		}
	default:
		return fmt.Errorf("service: model %d: refresh: %w", id, err)
	}
	action := "refreshed"
	base := rec.Digest
	if d.Refit {
		if next, err = fitWith(ctx, rec.Method, opts, y); err != nil {
			return err
		}
		action, rec.Added, rec.Refits = "refitted", 0, rec.Refits+1
	} else {
		rec.Added = added
	}
	rec.Label, rec.Form, rec.Body, rec.Seen, rec.Digest = next.fit.String(), next.form, next.body, y.Len(), digest(y, y.Len())
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("service: model %d: %w", id, err)
	}
	if err := s.store.UpdateModel(ctx, rec, base); err != nil {
		return err
	}
	s.rememberRecord(rec, next.fit)
	if rec, err = s.store.Model(context.WithoutCancel(ctx), id); err != nil { // committed
		return err
	}
	writeJSON(w, http.StatusOK, map[string]any{"action": action, "model": infoOfModel(rec, next.fit),
		"decision": decisionOut{Refit: d.Refit, Reason: d.Reason, Added: d.Added, Signal: num(d.Signal)}})
	return nil
}
