package trigg

import "math"

// Problem says why Signal gave no signal. Programs should not rely on
// the numeric values.
type Problem int

const (
	// None: the signal was computed.
	None Problem = iota
	// BadAlpha: the smoothing constant is not in (0, 1).
	BadAlpha
	// Empty: no errors at all.
	Empty
	// NonFinite: an error is ±Inf (Result.Index says which).
	NonFinite
	// AllMissing: every error is NaN.
	AllMissing
	// AllZero: every observed error is 0, so the signal is 0/0.
	AllZero
)

// Result describes a call of Signal.
type Result struct {
	// Problem is None when the signal was computed.
	Problem Problem
	// Index is the position of the first infinite error (NonFinite).
	Index int
	// Observed is the number of errors that are not NaN (counted up to
	// the first infinite one).
	Observed int
}

// Signal returns Trigg's tracking signal at the end of errs with
// smoothing constant alpha (see the package documentation), or NaN and
// the reason in Result.Problem.
func Signal(errs []float64, alpha float64) (float64, Result) {
	if !(alpha > 0 && alpha < 1) {
		return math.NaN(), Result{Problem: BadAlpha}
	}
	if len(errs) == 0 {
		return math.NaN(), Result{Problem: Empty}
	}
	// The start of M: the mean absolute error of the first ⌈1/α⌉
	// observed errors.
	warm := int(math.Min(math.Ceil(1/alpha), float64(len(errs))))
	var sumAbs float64
	n, observed := 0, 0
	for i, e := range errs {
		if math.IsInf(e, 0) {
			return math.NaN(), Result{Problem: NonFinite, Index: i, Observed: observed}
		}
		if math.IsNaN(e) {
			continue
		}
		observed++
		if n == warm {
			continue
		}
		// Divided as it goes, so that errors near the float64 limit
		// cannot overflow the sum.
		sumAbs += math.Abs(e) / float64(warm)
		n++
	}
	if n == 0 {
		return math.NaN(), Result{Problem: AllMissing}
	}
	e, m := 0.0, sumAbs/float64(n)*float64(warm)
	for _, x := range errs {
		if math.IsNaN(x) {
			continue
		}
		e = alpha*x + (1-alpha)*e
		m = alpha*math.Abs(x) + (1-alpha)*m
	}
	if m == 0 {
		return math.NaN(), Result{Problem: AllZero, Observed: observed}
	}
	return math.Max(-1, math.Min(1, e/m)), Result{Observed: observed}
}
