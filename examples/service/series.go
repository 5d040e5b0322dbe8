package main

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"mime"
	"net/http"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// seriesIn is a series in a JSON request (and response): values are
// numbers, null for a missing one.
type seriesIn struct {
	Key    string     `json:"key"`
	Start  string     `json:"start"`
	Unit   string     `json:"unit"`
	Every  int        `json:"every,omitempty"`
	Values []*float64 `json:"values"`
}

// seriesOut is a stored series in a response.
type seriesOut struct {
	Key    string `json:"key"`
	Start  string `json:"start"`
	Unit   string `json:"unit"`
	Every  int    `json:"every"`
	Values []num  `json:"values"`
}

// maxSeriesKey bounds the length of a series key.
const maxSeriesKey = 200

// parseStart reads a start time in one of the CSV reader's layouts
// (almanac.DefaultTimeLayouts), in UTC when it has no zone.
func parseStart(s string) (time.Time, error) {
	for _, layout := range almanac.DefaultTimeLayouts {
		if t, err := time.ParseInLocation(layout, s, time.UTC); err == nil {
			return t, nil
		}
	}
	return time.Time{}, fmt.Errorf("%w: start %q is not a time (use e.g. 2025-01-01 or RFC 3339)", ErrRequest, s)
}

// toSeries checks a series of a request (field names the JSON path of in)
// and returns it.
func (in seriesIn) toSeries(field string) (almanac.Series, error) {
	fe := func(sub string, err error) error { return &fieldError{Field: field + sub, Err: err} }
	if in.Key == "" {
		return almanac.Series{}, fe(".key", fmt.Errorf("%w: empty key", ErrRequest))
	}
	if len(in.Key) > maxSeriesKey {
		return almanac.Series{}, fe(".key", fmt.Errorf("%w: key longer than %d bytes", ErrRequest, maxSeriesKey))
	}
	start, err := parseStart(in.Start)
	if err != nil {
		return almanac.Series{}, fe(".start", err)
	}
	unit := unitOf(in.Unit)
	if unit == calendar.UnitUnset {
		return almanac.Series{}, fe(".unit", fmt.Errorf("%w: unit %q (minute, hour, day, week, month, quarter or year)", almanac.ErrFrequency, in.Unit))
	}
	freq := calendar.Frequency{Unit: unit, N: in.Every}
	if err := freq.Validate(); err != nil {
		return almanac.Series{}, fe(".every", err)
	}
	y := almanac.Series{Key: in.Key, Start: start, Freq: freq, Values: make([]float64, len(in.Values))}
	for i, p := range in.Values {
		y.Values[i] = math.NaN()
		if p != nil {
			y.Values[i] = *p
		}
	}
	if err := y.Validate(); err != nil {
		var se *almanac.SeriesError
		if errors.As(err, &se) && se.Index >= 0 {
			return almanac.Series{}, fe(fmt.Sprintf(".values[%d]", se.Index), err)
		}
		return almanac.Series{}, fe(".values", err)
	}
	return y, nil
}

// out returns y as a response.
func out(y almanac.Series) seriesOut {
	v := make([]num, len(y.Values))
	for i, x := range y.Values {
		v[i] = num(x)
	}
	return seriesOut{Key: y.Key, Start: y.Start.Format(time.RFC3339), Unit: y.Freq.Unit.String(), Every: max(y.Freq.N, 1), Values: v}
}

func infoOf(y almanac.Series) SeriesInfo {
	return SeriesInfo{Key: y.Key, Start: y.Start, Unit: y.Freq.Unit.String(), Every: max(y.Freq.N, 1), Length: y.Len(), Missing: y.Missing()}
}

// readSeries reads the series of a POST /v1/series body: the long CSV
// when the content type is text/csv (with ?gaps=fill, periods without a
// row become missing values instead of an error), JSON otherwise.
func readSeries(r *http.Request) ([]almanac.Series, error) {
	ct, _, _ := mime.ParseMediaType(r.Header.Get("Content-Type"))
	if ct == "text/csv" {
		b, err := readBody(r)
		if err != nil {
			return nil, err
		}
		opt := almanac.CSVOptions{}
		switch g := r.URL.Query().Get("gaps"); g {
		case "", "refuse":
		case "fill":
			opt.FillGaps = true
		default:
			return nil, &fieldError{Field: "gaps", Err: fmt.Errorf("%w: gaps=%q (fill, or refuse: the default)", ErrRequest, g)}
		}
		ys, err := almanac.ReadCSV(bytes.NewReader(b), opt)
		if err != nil {
			return nil, fmt.Errorf("service: csv: %w", err)
		}
		for _, y := range ys {
			if len(y.Key) > maxSeriesKey {
				return nil, &fieldError{Field: almanac.DefaultKeyColumn, Err: fmt.Errorf("%w: key longer than %d bytes", ErrRequest, maxSeriesKey)}
			}
			if err := y.Validate(); err != nil {
				return nil, &fieldError{Field: almanac.DefaultValueColumn, Err: fmt.Errorf("series %q: %w", y.Key, err)}
			}
		}
		return ys, nil
	}
	var req struct {
		Series []seriesIn `json:"series"`
	}
	if err := decodeJSON(r, &req, false); err != nil {
		return nil, err
	}
	if len(req.Series) == 0 {
		return nil, &fieldError{Field: "series", Err: fmt.Errorf("%w: no series", almanac.ErrEmpty)}
	}
	seen := map[string]int{}
	ys := make([]almanac.Series, len(req.Series))
	for i, in := range req.Series {
		field := fmt.Sprintf("series[%d]", i)
		y, err := in.toSeries(field)
		if err != nil {
			return nil, err
		}
		if j, dup := seen[y.Key]; dup {
			return nil, &fieldError{Field: field + ".key", Err: fmt.Errorf("%w: key %q given twice (also series[%d])", ErrRequest, y.Key, j)}
		}
		seen[y.Key] = i
		ys[i] = y
	}
	return ys, nil
}

// postSeries stores the posted series, replacing those of the same keys.
func (s *Server) postSeries(w http.ResponseWriter, r *http.Request) error {
	ys, err := readSeries(r)
	if err != nil {
		return err
	}
	if err := s.store.PutSeries(r.Context(), ys); err != nil {
		return err
	}
	stored := make([]SeriesInfo, len(ys))
	for i, y := range ys {
		stored[i] = infoOf(y)
	}
	writeJSON(w, http.StatusCreated, map[string]any{"stored": stored})
	return nil
}

func (s *Server) listSeries(w http.ResponseWriter, r *http.Request) error {
	list, err := s.store.SeriesList(r.Context())
	if err != nil {
		return err
	}
	writeJSON(w, http.StatusOK, map[string]any{"series": list})
	return nil
}

func (s *Server) getSeries(w http.ResponseWriter, r *http.Request) error {
	y, err := s.store.Series(r.Context(), r.PathValue("key"))
	if err != nil {
		return err
	}
	writeJSON(w, http.StatusOK, out(y))
	return nil
}

// extendSeries appends observations to a stored series:
// {"values": [14.2, null, 15]}.
func (s *Server) extendSeries(w http.ResponseWriter, r *http.Request) error {
	var req struct {
		Values []*float64 `json:"values"`
	}
	if err := decodeJSON(r, &req, false); err != nil {
		return err
	}
	if len(req.Values) == 0 {
		return &fieldError{Field: "values", Err: fmt.Errorf("%w: no values", almanac.ErrEmpty)}
	}
	v := make([]float64, len(req.Values))
	for i, p := range req.Values {
		v[i] = math.NaN()
		if p != nil {
			v[i] = *p
		}
	}
	y, err := s.store.ExtendSeries(r.Context(), r.PathValue("key"), v)
	if err != nil {
		return err
	}
	writeJSON(w, http.StatusOK, infoOf(y))
	return nil
}
