//go:build !race

package smoothing

// raceEnabled reports whether the tests run under the race detector.
const raceEnabled = false
