// Package numtest holds the one floating-point comparison rule used by
// almanac's tests: |got − want| ≤ abs + rel·|want|, with NaN equal to NaN
// (both missing) and infinities equal only to themselves.
//
// # Missing values
//
// NaN marks a missing or undefined value: two NaNs compare as equal, a
// NaN and a number do not.
//
// # Numerical notes
//
// The relative part scales with |want| (the reference value), not with
// |got|, so a wrong result cannot widen its own tolerance.
//
// # Concurrency
//
// Close is pure; Scalar and Slice report through the testing.TB given.
//
// # Performance
//
// Test-only code; not benchmarked.
//
// # References
//
// /work/shared/reference/README.md (the tolerance rule of the fixtures).
package numtest
