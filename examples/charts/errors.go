package charts

import "errors"

// Sentinel errors of this package. Errors about the data wrap the root
// package's sentinels (almanac.ErrEmpty, almanac.ErrLength,
// almanac.ErrNonFinite, almanac.ErrInvalid, ...); test with errors.Is.
var (
	// ErrFormat: a file name whose extension is neither .png nor .svg.
	ErrFormat = errors.New("unknown picture format")
	// ErrDraw: the plotting package failed while drawing or encoding.
	ErrDraw = errors.New("picture could not be drawn")
)
