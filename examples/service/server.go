package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"strconv"
	"sync"
	"time"

	"github.com/almanac-go/almanac"
)

// Limits bound what one request may ask. The zero value gives the
// defaults.
type Limits struct {
	// Body is the largest request body in bytes; 0 means 8 MiB.
	Body int64
	// Timeout is the time a request may take, fits included; 0 means
	// two minutes.
	Timeout time.Duration
	// Horizon is the largest forecast horizon; 0 means 1000.
	Horizon int
}

func (l Limits) body() int64 {
	if l.Body > 0 {
		return l.Body
	}
	return 8 << 20
}

func (l Limits) timeout() time.Duration {
	if l.Timeout > 0 {
		return l.Timeout
	}
	return 2 * time.Minute
}

func (l Limits) horizon() int {
	if l.Horizon > 0 {
		return l.Horizon
	}
	return 1000
}

// maxLevels bounds the band levels of one request.
const maxLevels = 8

// maxCached bounds the fitted models kept in memory.
const maxCached = 256

// Server answers the service's requests from a Store. It is safe for
// concurrent use.
type Server struct {
	store  Store
	limits Limits

	mu    sync.Mutex
	cache map[int64]cachedFit
}

// cachedFit is a loaded model, valid while the stored body is the same.
type cachedFit struct {
	sum [32]byte
	fit almanac.Fitted
}

// NewServer returns a server on store with the limits.
func NewServer(store Store, limits Limits) *Server {
	return &Server{store: store, limits: limits, cache: map[int64]cachedFit{}}
}

// Handler returns the service's routes (see the package documentation),
// each with the body limit and the per-request deadline.
func (s *Server) Handler() http.Handler {
	mux := http.NewServeMux()
	handle := func(pattern string, h func(w http.ResponseWriter, r *http.Request) error) {
		mux.Handle(pattern, s.guard(h))
	}
	handle("GET /v1/methods", s.listMethods)
	handle("POST /v1/series", s.postSeries)
	handle("GET /v1/series", s.listSeries)
	handle("GET /v1/series/{key}", s.getSeries)
	handle("POST /v1/series/{key}/observations", s.extendSeries)
	handle("POST /v1/series/{key}/backtest", s.backtest)
	handle("POST /v1/models", s.fitModel)
	handle("GET /v1/models", s.listModels)
	handle("GET /v1/models/{id}", s.getModel)
	handle("GET /v1/models/{id}/document", s.getDocument)
	handle("GET /v1/models/{id}/forecast", s.forecast)
	handle("GET /v1/models/{id}/chart", s.chart)
	handle("POST /v1/models/{id}/refresh", s.refresh)
	handle("GET /v1/review", s.review)
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if _, pattern := mux.Handler(r); pattern == "" {
			// No route, or a route without this method: answer as the
			// mux would, but with a problem document.
			c := &captured{header: http.Header{}}
			mux.ServeHTTP(c, r)
			if allow := c.header.Get("Allow"); allow != "" {
				w.Header().Set("Allow", allow)
			}
			kind := kindNotFound
			if c.status == http.StatusMethodNotAllowed {
				kind = kindMethod
			}
			writeJSON(w, c.status, map[string]problem{"problem": {Status: c.status, Kind: kind,
				Detail: fmt.Sprintf("service: no route %s %s", r.Method, r.URL.Path)}})
			return
		}
		mux.ServeHTTP(w, r)
	})
}

// captured records the status and header a handler writes.
type captured struct {
	header http.Header
	status int
}

func (c *captured) Header() http.Header { return c.header }
func (c *captured) WriteHeader(status int) {
	if c.status == 0 {
		c.status = status
	}
}
func (c *captured) Write(b []byte) (int, error) {
	c.WriteHeader(http.StatusOK)
	return len(b), nil
}

// guard limits the body, sets the deadline, and answers an error with a
// problem document. A panic in a handler is answered with 500, not a
// dropped connection.
func (s *Server) guard(h func(w http.ResponseWriter, r *http.Request) error) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		ctx, cancel := context.WithTimeout(r.Context(), s.limits.timeout())
		defer cancel()
		r = r.WithContext(ctx)
		r.Body = http.MaxBytesReader(w, r.Body, s.limits.body())
		defer func() {
			if v := recover(); v != nil {
				if v == http.ErrAbortHandler {
					panic(v)
				}
				writeProblem(w, fmt.Errorf("service: %s %s: panic: %v", r.Method, r.URL.Path, v))
			}
		}()
		if err := h(w, r); err != nil {
			writeProblem(w, err)
		}
	})
}

// readBody reads the whole request body (within the limit).
func readBody(r *http.Request) ([]byte, error) {
	b, err := io.ReadAll(r.Body)
	var tooLarge *http.MaxBytesError
	if errors.As(err, &tooLarge) {
		return nil, fmt.Errorf("service: request body larger than the limit of %d bytes: %w", tooLarge.Limit, err)
	}
	if err != nil {
		return nil, fmt.Errorf("service: read body: %w", err)
	}
	return b, nil
}

// decodeJSON decodes a JSON request body into v, rejecting unknown
// members and trailing data, and naming the field of a type mismatch. An
// empty body is allowed when emptyOK (v keeps its zero value).
func decodeJSON(r *http.Request, v any, emptyOK bool) error {
	b, err := readBody(r)
	if err != nil {
		return err
	}
	if len(bytes.TrimSpace(b)) == 0 {
		if emptyOK {
			return nil
		}
		return fmt.Errorf("service: %w: empty body (a JSON object is expected)", ErrRequest)
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		var syn *json.SyntaxError
		var typ *json.UnmarshalTypeError
		switch {
		case errors.As(err, &syn):
			return &fieldError{Err: fmt.Errorf("%w: malformed JSON at byte %d: %v", ErrRequest, syn.Offset, err)}
		case errors.As(err, &typ):
			return &fieldError{Field: typ.Field, Err: fmt.Errorf("%w: %v", ErrRequest, err)}
		case errors.Is(err, io.ErrUnexpectedEOF):
			return &fieldError{Err: fmt.Errorf("%w: truncated JSON", ErrRequest)}
		}
		return fmt.Errorf("service: %w: %w", ErrRequest, err)
	}
	if dec.More() {
		return fmt.Errorf("service: %w: data after the JSON object", ErrRequest)
	}
	return nil
}

// modelID reads the {id} path value.
func modelID(r *http.Request) (int64, error) {
	s := r.PathValue("id")
	id, err := strconv.ParseInt(s, 10, 64)
	if err != nil || id < 1 {
		return 0, fmt.Errorf("service: model %q: %w (ids are positive integers)", s, ErrNotFound)
	}
	return id, nil
}

// model returns the stored model id and its fitted model, loaded from the
// store or the cache.
func (s *Server) model(ctx context.Context, id int64) (ModelRecord, almanac.Fitted, error) {
	rec, err := s.store.Model(ctx, id)
	if err != nil {
		return ModelRecord{}, nil, err
	}
	sum := sha256.Sum256(append([]byte(rec.Form+"\x00"), rec.Body...))
	s.mu.Lock()
	c, ok := s.cache[id]
	s.mu.Unlock()
	if ok && c.sum == sum {
		return rec, c.fit, nil
	}
	fit, err := loadFit(ctx, rec)
	if err != nil {
		return ModelRecord{}, nil, err
	}
	s.remember(id, sum, fit)
	return rec, fit, nil
}

// remember caches a loaded model, dropping an arbitrary one when full.
func (s *Server) remember(id int64, sum [32]byte, fit almanac.Fitted) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if _, ok := s.cache[id]; !ok && len(s.cache) >= maxCached {
		for k := range s.cache {
			delete(s.cache, k)
			break
		}
	}
	s.cache[id] = cachedFit{sum: sum, fit: fit}
}

func (s *Server) rememberRecord(rec ModelRecord, fit almanac.Fitted) {
	s.remember(rec.ID, sha256.Sum256(append([]byte(rec.Form+"\x00"), rec.Body...)), fit)
}

// methodInfo describes a method in GET /v1/methods.
type methodInfo struct {
	Name      string `json:"name"`
	About     string `json:"about"`
	Default   bool   `json:"default,omitempty"`
	Benchmark bool   `json:"benchmark,omitempty"`
	Options   bool   `json:"takes_seed_and_paths,omitempty"`
}

func (s *Server) listMethods(w http.ResponseWriter, r *http.Request) error {
	out := []methodInfo{}
	for _, name := range methodNames() {
		m := methods[name]
		out = append(out, methodInfo{Name: name, About: m.about, Default: name == DefaultMethod, Benchmark: !m.compare, Options: m.paths})
	}
	writeJSON(w, http.StatusOK, map[string]any{"methods": out})
	return nil
}
