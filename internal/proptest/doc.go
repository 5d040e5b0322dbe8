// Package proptest holds the property checks that the test of every model
// and measure runs: series at extreme scales (from 1e−300 to 1e300, values
// of ±1e308, a single spike of 1e308 among ordinary values, tiny and huge
// values mixed, subnormal numbers), and checks that a model fitted and
// forecast on them, or a measure evaluated on them, gives finite output or
// an error wrapping one of the module's sentinels — never a panic, and
// never NaN or ±Inf with a nil error (issue 11).
//
// It is used only by tests (package *_test files); it imports the root
// package, so the root package's own tests use it from package
// almanac_test.
//
// # Missing values
//
// The series made here have none; a model's FittedValues and Residuals may
// hold NaN where the model documents that none exists (for example the
// first observation of a naive model), but never ±Inf.
//
// # Numerical notes
//
// A NaN or ±Inf from a successful call is a failure. Errors must wrap a
// root sentinel (almanac.ErrNonFinite for a result that does not fit in a
// float64) or one of the extra sentinels a test passes.
//
// # Concurrency
//
// The helpers call t.Helper and are safe to use from parallel subtests.
//
// # Performance
//
// A handful of short series per model; a whole check takes milliseconds.
//
// # References
//
// The module's error policy (README.md): never a panic, never NaN or Inf
// with a nil error, never a series silently missing from an output.
package proptest
