package smoothing

import "errors"

// Sentinel errors of this package. Errors about the data itself wrap the
// root package's sentinels (almanac.ErrTooShort, almanac.ErrMissing,
// almanac.ErrNonPositive, ...); these cover what is particular to
// exponential smoothing. Test with errors.Is.
var (
	// ErrPeriodTooLong: the seasonal period is too long for the state
	// space (more than MaxPeriod seasonal states). Such series are better
	// forecast by decomposition (package decompose's decomposition
	// model: remove the seasonal part, forecast the rest, add it back).
	ErrPeriodTooLong = errors.New("seasonal period too long for the state space")
	// ErrNoCandidate: Select found no candidate model the data can
	// support, or every candidate failed to fit.
	ErrNoCandidate = errors.New("no candidate model could be fitted")
	// ErrNotAdmissible: a fixed parameter outside its valid range (a
	// fixed φ outside (0, 1]). Other fixed values are used as given; with
	// AdmissibleBounds or UsualAdmissibleBounds, fixed values that leave
	// no admissible estimate give an error wrapping almanac.ErrNotFitted.
	ErrNotAdmissible = errors.New("parameters not admissible")
)

// MaxPeriod is the longest seasonal period the state-space models accept:
// each season adds one state, and beyond 24 states the likelihood surface
// becomes too flat to estimate the initial seasonal states reliably
// (common practice).
const MaxPeriod = 24
