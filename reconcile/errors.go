package reconcile

import "errors"

// Sentinel errors of package reconcile. Errors caused by bad input wrap
// one of these, or one of the root package's sentinels (almanac.ErrEmpty,
// almanac.ErrMissing, almanac.ErrNonFinite, almanac.ErrTooShort,
// almanac.ErrLength, almanac.ErrInvalid, almanac.ErrNoDistribution, ...),
// so callers can test them with errors.Is.
var (
	// ErrCycle: the parent links of a hierarchy form a cycle.
	ErrCycle = errors.New("cycle in parent links")
	// ErrUnknownParent: a node names a parent that is not in the
	// hierarchy.
	ErrUnknownParent = errors.New("unknown parent")
	// ErrDuplicateName: two nodes (or two bottom series of a grouped
	// structure) have the same name.
	ErrDuplicateName = errors.New("duplicate node name")
	// ErrNoBottom: a structure without any bottom series.
	ErrNoBottom = errors.New("no bottom series")
	// ErrStructure: any other malformed structure (no top or several
	// tops, an empty name, a bottom row of the wrong width, ...).
	ErrStructure = errors.New("malformed structure")
	// ErrDimension: a matrix whose shape does not fit the structure. It
	// always comes together with almanac.ErrLength.
	ErrDimension = errors.New("dimension mismatch")
	// ErrSingular: a covariance (or S' W⁻¹ S) that is singular or too
	// close to singular to be solved reliably. For MinT the usual remedy
	// is the shrinkage estimator.
	ErrSingular = errors.New("singular matrix")
	// ErrProportion: a disaggregation proportion cannot be formed (a
	// zero denominator).
	ErrProportion = errors.New("proportion undefined")
	// ErrNoConvergence: the non-negative active-set solve did not finish
	// within its iteration limit.
	ErrNoConvergence = errors.New("active-set solve did not converge")
)
