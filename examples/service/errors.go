package main

import "errors"

// Sentinel errors of the service. Errors about the data wrap the
// library's sentinels (almanac.ErrEmpty, almanac.ErrNonFinite, ...) as
// well; statusOf maps both to HTTP status codes.
var (
	// ErrNotFound: no series or model with the id or key asked for.
	ErrNotFound = errors.New("not found")
	// ErrConflict: a stored model no longer matches its series (the
	// series' history was replaced after the fit), so it cannot be
	// refreshed; fit a new model.
	ErrConflict = errors.New("conflict with stored data")
	// ErrRequest: a request that cannot be read: malformed JSON, an
	// unknown member or method, a missing or out-of-range field or query
	// parameter.
	ErrRequest = errors.New("bad request")
	// ErrStore: the database failed.
	ErrStore = errors.New("store failed")
)
