// Package reftest loads the reference fixtures kept in each package's
// testdata/reference/*.json (format: the shared reference README) and runs
// one subtest per fixture, dispatched on its "kind". A fixture of a kind
// with no handler fails; nothing is skipped silently.
//
// # Missing values
//
// JSON null in a fixture reads as NaN (a missing value or an undefined
// result in the reference output).
//
// # Numerical notes
//
// Numbers are decoded by encoding/json into float64 exactly as written
// (shortest round-trip text from the generators). Tol returns the
// fixture's own tolerance; an entry without abs or rel gives 0 for it,
// never a looser default.
//
// # Concurrency
//
// Run starts subtests sequentially; a Fixture is read-only once loaded.
//
// # Performance
//
// Test-only code; not benchmarked.
//
// # References
//
// /work/shared/reference/README.md (fixture format and tolerance rule).
package reftest
