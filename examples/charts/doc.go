// Package charts draws pictures of forecasts with gonum's plot package
// (gonum.org/v1/plot), as PNG or SVG:
//
//   - Fan: a fan chart of one series — the history (broken at missing
//     values), the one-step fitted values, the forecast and its bands at
//     every level, the widest lightest;
//   - Panels: the panels of a decomposition from decompose.STL, MSTL or
//     Classical — the data, the trend, each seasonal component and the
//     remainder, one above the other on a shared time axis;
//   - StepErrors: a backtest comparison (accuracy.Comparison) — the scaled
//     error (MASE) of every candidate at each step ahead, the benchmarks
//     dashed.
//
// Each returns a *Picture: WritePNG and WriteSVG write it, Save writes a
// file whose extension (.png or .svg) says which. Options set the size in
// pixels (the PNG's, at 96 dots per inch; the SVG has the same size in
// CSS pixels) and the title.
//
//	pic, err := charts.Fan(y, fit.FittedValues(), fc, charts.Options{})
//	if err != nil { ... }
//	err = pic.Save("paint.png")
//
// The package lives in the examples module because gonum's plot package
// is a dependency the library does not take: almanac itself draws only
// the inline SVG charts of its review page (accuracy.WriteReview), with
// the standard library. The looks and wording are this package's own and
// may change.
//
// # Missing values
//
// NaN marks a missing value: lines break at it, and a lone value between
// gaps is drawn as a dot. The trend and remainder of a classical
// decomposition are NaN at both ends and are drawn where defined.
//
// # Numerical notes
//
// Values are drawn in float64 as given. Values beyond ±1e300, where the
// axis arithmetic of the plotting package would overflow, are refused
// with an error wrapping almanac.ErrNonFinite rather than drawn wrong.
//
// # Concurrency
//
// The functions are safe for concurrent use; a Picture may be written
// any number of times, from one goroutine at a time.
//
// # Performance
//
// A fan chart of 84 monthly values with 12 forecast steps and three bands
// at the default size (960 × 420) takes about 50 ms of CPU written as PNG
// (the rasteriser and the PNG encoder dominate) and about 1.5 ms as SVG:
// user CPU time of BenchmarkFan on one core, as wall times on the shared
// 2-core machine were four to six times higher.
//
// # References
//
//   - Britton, E., Fisher, P. & Whitley, J. (1998). The Inflation Report
//     projections: understanding the fan chart. Bank of England Quarterly
//     Bulletin 38, 30–37 (the fan chart; recalled from memory).
//   - Cleveland, R. B., Cleveland, W. S., McRae, J. E. & Terpenning, I.
//     (1990). STL: a seasonal-trend decomposition procedure based on
//     loess. Journal of Official Statistics 6, 3–73 (the panels).
package charts
