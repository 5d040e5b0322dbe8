//go:build race

package smoothing

// raceEnabled reports whether the tests run under the race detector,
// which slows the numerical searches about tenfold; single-goroutine
// numerical checks then run on a subset (see their comments).
const raceEnabled = true
