// Package reconcile makes forecasts of hierarchical and grouped series
// coherent, so that forecasts of totals equal the sums of the forecasts of
// their parts.
package reconcile
