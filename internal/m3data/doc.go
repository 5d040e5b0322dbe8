// Package m3data loads the M3 forecasting-competition data for tests
// (Load) and for the programs under internal/cmd (Read).
//
// The data (Makridakis & Hibon 2000, "The M3-Competition: results,
// conclusions and implications", International Journal of Forecasting
// 16(4):451–476; distributed by the International Institute of
// Forecasters for research use) are not copied into this repository: the
// tests read them from the shared data folder that sits beside the
// checkout (../shared/data/m3 from the module root, the layout of the
// development machines and CI), or from the directory named by the
// ALMANAC_M3_DIR environment variable. Files are in long format with
// columns series,category,index,value,part.
//
// # Missing values
//
// M3 has none; a value that does not parse is an error.
//
// # Numerical notes
//
// Values are read with strconv.ParseFloat, exactly as written in the
// files.
//
// # Concurrency
//
// Load and Read may be called concurrently; they share no state.
//
// # Performance
//
// Test-only code; not benchmarked.
//
// # References
//
// S. Makridakis and M. Hibon (2000), The M3-Competition: results,
// conclusions and implications, International Journal of Forecasting
// 16(4), 451–476.
package m3data
