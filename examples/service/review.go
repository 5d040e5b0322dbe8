package main

import (
	"bytes"
	"fmt"
	"net/http"

	"github.com/almanac-go/almanac/accuracy"
)

// review answers GET /v1/review?series=KEY&h=12&level=80&level=95 with
// the review page (accuracy.WriteReview) of the stored models: one entry
// per model, of the series named (repeatable) or of every series, with
// its history, one-step fit and forecast, and for the automatic
// forecaster its route, members, fallbacks and filled values. A model
// whose series was replaced after its fit is listed with the reason.
func (s *Server) review(w http.ResponseWriter, r *http.Request) error {
	h, levels, err := s.horizonAndLevels(r)
	if err != nil {
		return err
	}
	ctx := r.Context()
	var recs []ModelRecord
	keys := r.URL.Query()["series"]
	if len(keys) == 0 {
		keys = []string{""}
	}
	for _, key := range keys {
		if key != "" {
			if _, err := s.store.Series(ctx, key); err != nil {
				return err
			}
		}
		rs, err := s.store.Models(ctx, key)
		if err != nil {
			return err
		}
		recs = append(recs, rs...)
	}
	if len(recs) == 0 {
		return fmt.Errorf("service: review: %w: no stored models (fit one with POST /v1/models)", ErrNotFound)
	}
	entries := make([]accuracy.ReviewSeries, 0, len(recs))
	for _, meta := range recs {
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("service: review: %w", err)
		}
		key := fmt.Sprintf("%s · model %d", meta.SeriesKey, meta.ID)
		rec, fit, err := s.model(ctx, meta.ID)
		if err != nil {
			entries = append(entries, accuracy.ReviewSeries{Key: key, Model: meta.Label, Err: err})
			continue
		}
		y, err := s.history(r, rec)
		if err != nil {
			entries = append(entries, accuracy.ReviewSeries{Key: key, Model: rec.Label, Err: err})
			continue
		}
		fc, err := fit.Forecast(h, levels...)
		if err == nil {
			err = checkForecast(rec.ID, fc)
		}
		if err != nil {
			entries = append(entries, accuracy.ReviewSeries{Key: key, History: y.Head(rec.Seen), Model: rec.Label, Err: err})
			continue
		}
		e := accuracy.NewReviewSeries(y.Head(rec.Seen), fit, fc)
		e.Key, e.Route = key, "method "+rec.Method
		if rec.Added > 0 {
			e.Notes = append(e.Notes, fmt.Sprintf("Refreshed with %d observations since it was last estimated.", rec.Added))
		}
		if p, ok := fit.(*accuracy.PilotFit); ok {
			rep := p.Report()
			e.Route = "automatic: " + rep.Route.String()
			e.Members, e.Fallbacks, e.Repairs = rep.Members, rep.Fallbacks, rep.Repairs
			e.Notes = append(e.Notes, rep.Dropped...)
		}
		entries = append(entries, e)
	}
	var buf bytes.Buffer
	err = accuracy.WriteReview(&buf, accuracy.Review{
		Title:  "Planning service: stored models",
		About:  fmt.Sprintf("Every stored model of the planning service (%d), forecast %d steps ahead with the bands asked for.", len(entries), h),
		Levels: levels,
		Series: entries,
	})
	if err != nil {
		return fmt.Errorf("service: review: %w", err)
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.Write(buf.Bytes())
	return nil
}
