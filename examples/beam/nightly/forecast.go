package nightly

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/reconcile"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"
)

// forecastFn forecasts one group: a hierarchy (all the series under one
// root, so that it is reconciled on one worker) or one series outside
// any hierarchy.
type forecastFn struct {
	Model       string
	Horizon     int
	Levels      []float64
	Backtest    int // rolling origins per series; 0 = no backtest
	Reconcile   string
	NonNegative bool
	Paths       int
	Seed        uint64
	Workers     int
	OwnErrors   bool // calibrate each series on its own errors (no pooling)

	model almanac.Model
}

// Setup builds the model from its name.
func (f *forecastFn) Setup() error {
	m, err := NewModel(f.Model, f.Seed)
	f.model = m
	return err
}

// ProcessElement forecasts the series of one group and writes their
// forecasts, accuracy, status and dead-letter records.
func (f *forecastFn) ProcessElement(ctx context.Context, group string, it func(*SeriesRec) bool, out func(Record)) {
	var recs []SeriesRec
	var r SeriesRec
	for it(&r) {
		recs = append(recs, r)
		r = SeriesRec{}
	}
	slices.SortFunc(recs, func(a, b SeriesRec) int { return strings.Compare(a.Key, b.Key) })
	if strings.HasPrefix(group, "tree\x00") {
		f.tree(ctx, strings.TrimPrefix(group, "tree\x00"), recs, out)
		return
	}
	f.lone(ctx, slices.DeleteFunc(recs, func(r SeriesRec) bool { return r.Failed }), out)
}

func (r SeriesRec) series() almanac.Series {
	return almanac.Series{Key: r.Key, Start: r.start(), Freq: r.freq(), Values: r.Values}
}

// fitAll fits the model to ys (in parallel over Workers goroutines; the
// results do not depend on their number).
func (f *forecastFn) fitAll(ctx context.Context, ys []almanac.Series) []almanac.BatchResult {
	res, err := almanac.BatchFit(ctx, f.model, ys, almanac.BatchOptions{Workers: f.Workers})
	if err != nil && res == nil { // invalid options: cannot happen after Build's checks
		res = make([]almanac.BatchResult, len(ys))
		for i := range res {
			res[i] = almanac.BatchResult{Key: ys[i].Key, Err: err}
		}
	}
	return res
}

// lone forecasts series outside any hierarchy (a bucket of them, fitted
// together on Workers goroutines, their calibration errors pooled in key
// order).
func (f *forecastFn) lone(ctx context.Context, recs []SeriesRec, out func(Record)) {
	ys := make([]almanac.Series, len(recs))
	for i, r := range recs {
		ys[i] = r.series()
	}
	res := f.pool(f.fitAll(ctx, ys))
	for i, y := range ys {
		st := status{key: y.Key, role: RoleInput, state: StateFailed, obs: len(y.Values)}
		if res[i].Err != nil {
			st.reason, st.detail = reasonOf(res[i].Err), res[i].Err.Error()
			st.report(ctx, out)
			continue
		}
		st.model, st.bands = res[i].Fitted.String(), bandsOf(res[i].Fitted)
		fc, err := res[i].Fitted.Forecast(f.Horizon, f.Levels...)
		if err != nil {
			st.reason, st.detail = ReasonForecast, err.Error()
			st.report(ctx, out)
			continue
		}
		f.emitForecast(y.Key, KindBase, fc, out)
		st.state = StateForecast
		st.report(ctx, out)
		f.backtest(ctx, y, out)
	}
}

// pool pools the calibration errors of one group's fits (PoolFits). It
// cannot fail (no group labels are given); should it, the fits keep their
// own errors.
func (f *forecastFn) pool(res []almanac.BatchResult) []almanac.BatchResult {
	pooled, err := PoolFits(res, f.OwnErrors)
	if err != nil {
		return res
	}
	return pooled
}

// bandsOf says where the bands of a fit come from, for the status file:
// "pooled errors (N)" or "own errors (N)" for an accuracy.Pilot fit whose
// bands are calibrated on N out-of-sample error trajectories, "model" for
// the model's own bands.
func bandsOf(f almanac.Fitted) string {
	pf, ok := f.(*accuracy.PilotFit)
	if !ok {
		return BandsModel
	}
	rep := pf.Report()
	if !rep.Calibrated {
		return BandsModel
	}
	switch c := rep.Calibration; c.Source {
	case accuracy.BandsFromPooledErrors:
		return fmt.Sprintf("pooled errors (%d)", c.Pooled)
	case accuracy.BandsFromOwnErrors:
		return fmt.Sprintf("own errors (%d)", c.Own)
	}
	return BandsModel
}

// BandsModel is the status file's bands entry of a forecast whose bands
// are the model's own (not calibrated on out-of-sample errors).
const BandsModel = "model"

// reasonOf classifies a fitting error.
func reasonOf(err error) string {
	switch {
	case errors.Is(err, almanac.ErrTooShort), errors.Is(err, almanac.ErrEmpty):
		return ReasonTooShort
	case errors.Is(err, almanac.ErrAllMissing):
		return ReasonAllMissing
	case errors.Is(err, almanac.ErrMissing):
		return ReasonMissing
	case errors.Is(err, almanac.ErrNonPositive):
		return ReasonNonPositive
	case errors.Is(err, almanac.ErrConstant):
		return ReasonConstant
	case errors.Is(err, almanac.ErrNonFinite):
		return ReasonNonFinite
	}
	return ReasonFit
}

// emitForecast writes the rows of one forecast.
func (f *forecastFn) emitForecast(key, kind string, fc almanac.Forecast, out func(Record)) {
	fields := make([]string, 5+2*len(f.Levels))
	for h, m := range fc.Mean {
		fields[0], fields[1], fields[2], fields[3], fields[4] = key, formatTime(fc.Time(h), fc.Freq), strconv.Itoa(h+1), kind, formatValue(m)
		for j, l := range f.Levels {
			lo, hi := "NA", "NA"
			for _, iv := range fc.Intervals {
				if iv.Level == l && h < len(iv.Lower) && h < len(iv.Upper) {
					lo, hi = formatValue(iv.Lower[h]), formatValue(iv.Upper[h])
					break
				}
			}
			fields[5+2*j], fields[6+2*j] = lo, hi
		}
		out(Record{Output: OutputForecasts, Key: key, Line: csvLine(fields...)})
	}
}

// backtest runs the rolling-origin backtest of one series, when asked,
// and writes one accuracy row per candidate. A backtest that cannot be
// run is a dead-letter row; the series' forecast stands.
func (f *forecastFn) backtest(ctx context.Context, y almanac.Series, out func(Record)) {
	if f.Backtest == 0 {
		return
	}
	bt := accuracy.Backtest{Horizon: f.Horizon, Origins: f.Backtest, Levels: f.Levels, Workers: f.Workers}
	c, err := bt.Run(ctx, y, accuracy.Candidate{Name: f.modelName(), Model: f.model})
	if err != nil {
		beam.NewCounter(counterNamespace, "backtests_failed").Inc(ctx, 1)
		out(deadRecord(SourceSeries, 0, y.Key, ReasonBacktest, err.Error()))
	}
	if c == nil {
		return
	}
	for _, run := range c.Runs {
		done := 0
		for _, d := range run.Done {
			if d {
				done++
			}
		}
		s := run.Overall
		fields := []string{y.Key, run.Name, strconv.Itoa(done), strconv.Itoa(s.N),
			formatValue(s.MAE), formatValue(s.RMSE), formatValue(s.MASE), formatValue(s.RMSSE), formatValue(s.CRPS)}
		for _, l := range f.Levels {
			cov := "NA"
			if iv, ok := s.Interval(l); ok {
				cov = formatValue(iv.Coverage)
			}
			fields = append(fields, cov)
		}
		fields = append(fields, formatValue(run.Relative.MASE), c.Baseline)
		out(Record{Output: OutputAccuracy, Key: y.Key, Line: csvLine(fields...)})
	}
}

func (f *forecastFn) modelName() string {
	if f.Model == "" {
		return DefaultModel
	}
	return f.Model
}

// tree forecasts and reconciles the series of one hierarchy.
func (f *forecastFn) tree(ctx context.Context, rootName string, recs []SeriesRec, out func(Record)) {
	// Every aggregate named by any series placed in the tree.
	aggs := map[string]bool{}
	for _, r := range recs {
		for _, p := range prefixes(r.Within) {
			aggs[p] = true
		}
	}
	stat := func(r SeriesRec) status {
		return status{key: r.Key, role: RoleInput, tree: rootName, state: StateFailed, obs: len(r.Values)}
	}
	left := map[string]string{} // series left out of the reconciliation -> reason
	for _, r := range recs {
		if r.Failed {
			left[r.Key] = r.Reason
		}
	}
	var cands []SeriesRec
	for _, r := range recs {
		switch {
		case r.Failed:
		case aggs[r.Key]:
			st := stat(r)
			st.reason, st.detail = ReasonNameClash, fmt.Sprintf("its key is also the name of an aggregate of hierarchy %q", rootName)
			st.report(ctx, out)
			left[r.Key] = st.reason
		default:
			cands = append(cands, r)
		}
	}
	// The series of one hierarchy must cover the same periods; the grid
	// most of them share wins (ties: the earliest start, then the longest).
	grid := modalGrid(cands)
	var bottoms []SeriesRec
	for _, r := range cands {
		if g := gridOf(r); g != grid {
			st := stat(r)
			st.reason = ReasonMisaligned
			st.detail = fmt.Sprintf("%d %v periods from %s; most of hierarchy %q has %d from %s",
				len(r.Values), r.freq(), formatTime(r.start(), r.freq()), rootName, grid.len, formatTime(grid.rec().start(), grid.rec().freq()))
			st.report(ctx, out)
			left[r.Key] = st.reason
			continue
		}
		bottoms = append(bottoms, r)
	}

	// Bottom series: fit.
	ys := make([]almanac.Series, len(bottoms))
	for i, r := range bottoms {
		ys[i] = r.series()
	}
	res := f.fitAll(ctx, ys)
	fits := map[string]almanac.Fitted{}
	var fitted []SeriesRec
	for i, r := range bottoms {
		if res[i].Err != nil {
			st := stat(r)
			st.reason, st.detail = reasonOf(res[i].Err), res[i].Err.Error()
			st.report(ctx, out)
			left[r.Key] = st.reason
			continue
		}
		fits[r.Key] = res[i].Fitted
		fitted = append(fitted, r)
	}

	// The hierarchy of the series fitted, and its aggregates.
	var h *reconcile.Hierarchy
	var aggSeries []almanac.Series
	treeErr, aggErr := "", ""
	if len(fitted) > 0 {
		var err error
		if h, aggSeries, err = Aggregate(seriesOf(fitted)); err != nil { // cannot happen: the paths were checked when read
			h, aggSeries, aggErr = nil, nil, err.Error()
		}
	}
	aggNames := slices.Sorted(func(yield func(string) bool) {
		for a := range aggs {
			if !yield(a) {
				return
			}
		}
	})
	built := map[string]int{}
	for i, a := range aggSeries {
		built[a.Key] = i
	}
	for _, a := range aggNames {
		if _, ok := built[a]; !ok && aggErr == "" {
			st := status{key: a, role: RoleAggregate, tree: rootName, state: StateSkipped, reason: ReasonNoMembers,
				detail: "none of the series under it could be forecast: " + leftOut(a, recs, left)}
			st.report(ctx, out)
		}
	}
	aggRes := f.fitAll(ctx, aggSeries)

	// Pool the calibration errors of every node fitted, in the
	// hierarchy's node order.
	if h != nil {
		names := h.Names()
		nodes := make([]almanac.BatchResult, len(names))
		for i, n := range names {
			if i < len(aggRes) {
				nodes[i] = aggRes[i]
			} else {
				nodes[i] = almanac.BatchResult{Key: n, Fitted: fits[n]}
			}
		}
		nodes = f.pool(nodes)
		for i, n := range names {
			if i < len(aggRes) {
				aggRes[i] = nodes[i]
			} else {
				fits[n] = nodes[i].Fitted
			}
		}
	}

	// Forecast the bottom series. One whose forecast fails is already in
	// its aggregates' sums, so the hierarchy is not reconciled.
	var ok []SeriesRec
	var okStat []status
	for _, r := range fitted {
		st := stat(r)
		st.model, st.bands = fits[r.Key].String(), bandsOf(fits[r.Key])
		fc, err := fits[r.Key].Forecast(f.Horizon, f.Levels...)
		if err != nil {
			st.reason, st.detail = ReasonForecast, err.Error()
			st.report(ctx, out)
			delete(fits, r.Key)
			if treeErr == "" {
				treeErr = fmt.Sprintf("series %q: %s", r.Key, st.reason)
			}
			continue
		}
		f.emitForecast(r.Key, KindBase, fc, out)
		st.state = StateForecast
		ok = append(ok, r)
		okStat = append(okStat, st)
	}

	// Forecast the aggregates.
	var aggStat []status
	for i, a := range aggSeries {
		st := status{key: a.Key, role: RoleAggregate, tree: rootName, state: StateFailed, obs: len(a.Values)}
		if l := leftOut(a.Key, recs, left); l != "" {
			st.detail = "sums the series forecast; left out: " + l
		}
		if aggRes[i].Err != nil {
			st.reason, st.detail = reasonOf(aggRes[i].Err), joinDetail(aggRes[i].Err.Error(), st.detail)
		} else {
			st.model, st.bands = aggRes[i].Fitted.String(), bandsOf(aggRes[i].Fitted)
			if fc, err := aggRes[i].Fitted.Forecast(f.Horizon, f.Levels...); err != nil {
				st.reason, st.detail = ReasonForecast, joinDetail(err.Error(), st.detail)
			} else {
				f.emitForecast(a.Key, KindBase, fc, out)
				fits[a.Key] = aggRes[i].Fitted
				st.state = StateForecast
			}
		}
		if st.state == StateFailed && treeErr == "" {
			treeErr = fmt.Sprintf("aggregate %q: %s", a.Key, st.reason)
		}
		aggStat = append(aggStat, st)
	}

	// Reconcile, when every node has a model.
	reason, detail := "", ""
	switch {
	case len(ok) == 0:
	case aggErr != "":
		reason, detail = ReasonReconcile, aggErr
	case f.Reconcile == ReconcileNone:
		reason, detail = ReasonReconcileOff, "reconciliation switched off"
	case treeErr != "":
		reason, detail = ReasonAggregate, treeErr
	default:
		names := h.Names()
		nodeFits := make([]almanac.Fitted, len(names))
		for i, n := range names {
			nodeFits[i] = fits[n]
		}
		rec, err := reconcile.FromFits(ctx, h, nodeFits, f.Horizon, f.reconcileSpec(), f.Levels...)
		if err != nil {
			reason, detail = ReasonReconcile, err.Error()
			break
		}
		for i, n := range names {
			f.emitForecast(n, KindReconciled, rec[i], out)
		}
	}
	if reason != "" && reason != ReasonReconcileOff {
		beam.NewCounter(counterNamespace, "trees_not_reconciled").Inc(ctx, 1)
		out(deadRecord(SourceTree, 0, rootName, reason, detail))
	} else if len(ok) > 0 && reason == "" {
		beam.NewCounter(counterNamespace, "trees_reconciled").Inc(ctx, 1)
	}
	for _, st := range append(okStat, aggStat...) {
		if st.state != StateFailed {
			if reason == "" {
				st.state = StateReconciled
			} else {
				st.reason, st.detail = reason, joinDetail(detail, st.detail)
			}
		}
		st.report(ctx, out)
	}
	for _, r := range ok {
		f.backtest(ctx, r.series(), out)
	}
	for i, a := range aggSeries {
		if aggRes[i].Err == nil {
			f.backtest(ctx, a, out)
		}
	}
}

// Reconciliation methods (Options.Reconcile).
const (
	ReconcileMinT       = "mint"        // MinT with the shrinkage covariance (the default)
	ReconcileMinTSample = "mint-sample" // MinT with the sample covariance
	ReconcileWLS        = "wls"         // weighted least squares, variance scaling
	ReconcileStructural = "structural"  // weighted least squares, structural scaling
	ReconcileOLS        = "ols"         // ordinary least squares
	ReconcileBottomUp   = "bottom-up"   // sums of the bottom series' forecasts
	ReconcileNone       = "none"        // base forecasts only
)

var reconcileMethods = map[string]reconcile.Method{
	"":                  reconcile.MethodMinTShrink,
	ReconcileMinT:       reconcile.MethodMinTShrink,
	ReconcileMinTSample: reconcile.MethodMinTSample,
	ReconcileWLS:        reconcile.MethodWLSVariance,
	ReconcileStructural: reconcile.MethodWLSStructural,
	ReconcileOLS:        reconcile.MethodOLS,
	ReconcileBottomUp:   reconcile.MethodBottomUp,
	ReconcileNone:       reconcile.MethodAuto,
}

// reconcileSpec is the reconcile.Spec every hierarchy is reconciled with.
func (f *forecastFn) reconcileSpec() reconcile.Spec {
	return ReconcileSpec(f.Reconcile, f.NonNegative, f.Paths, f.Seed)
}

// ReconcileSpec is the reconcile.Spec the pipeline passes to
// reconcile.FromFits for the given options: the method, non-negative
// bottom-level forecasts, the number of joint sample paths (0 = the
// library's default), and the seed. It is exported so that a test or a
// user can reproduce the pipeline's reconciled forecasts exactly.
func ReconcileSpec(method string, nonNegative bool, paths int, seed uint64) reconcile.Spec {
	return reconcile.Spec{Method: reconcileMethods[method], NonNegative: nonNegative, Paths: paths, Seed: seed}
}

// prefixes returns the aggregates a path names: "N03/PNT" gives "N03"
// and "N03/PNT".
func prefixes(within string) []string {
	if within == "" {
		return nil
	}
	parts := strings.Split(within, PathSeparator)
	out := make([]string, len(parts))
	for i := range parts {
		out[i] = strings.Join(parts[:i+1], PathSeparator)
	}
	return out
}

func under(within, agg string) bool {
	return within == agg || strings.HasPrefix(within, agg+PathSeparator)
}

// leftOut lists the series under aggregate agg left out of its sum, with
// their reasons ("" when none).
func leftOut(agg string, recs []SeriesRec, left map[string]string) string {
	var parts []string
	total := 0
	for _, r := range recs {
		if !under(r.Within, agg) {
			continue
		}
		total++
		if reason, ok := left[r.Key]; ok {
			parts = append(parts, r.Key+" ("+reason+")")
		}
	}
	if len(parts) == 0 {
		return ""
	}
	const show = 5
	s := strings.Join(parts[:min(show, len(parts))], ", ")
	if len(parts) > show {
		s += fmt.Sprintf(" and %d more", len(parts)-show)
	}
	return fmt.Sprintf("%d of %d series: %s", len(parts), total, s)
}

func joinDetail(a, b string) string {
	if a == "" || b == "" {
		return a + b
	}
	return a + "; " + b
}

// grid is the time span of a series: its start, frequency and length.
type grid struct {
	sec, nsec int64
	unit, n   int
	len       int
}

func gridOf(r SeriesRec) grid { return grid{r.Sec, r.Nsec, r.Unit, r.N, len(r.Values)} }

func (g grid) rec() SeriesRec { return SeriesRec{Sec: g.sec, Nsec: g.nsec, Unit: g.unit, N: g.n} }

// modalGrid returns the grid most series share: ties go to the earliest
// start, then the longest series, then the finest frequency.
func modalGrid(recs []SeriesRec) grid {
	counts := map[grid]int{}
	for _, r := range recs {
		counts[gridOf(r)]++
	}
	var best grid
	bestN := 0
	for g, n := range counts {
		if n > bestN || n == bestN && cmp.Or(cmp.Compare(g.sec, best.sec), cmp.Compare(g.nsec, best.nsec), cmp.Compare(best.len, g.len), cmp.Compare(g.unit, best.unit), cmp.Compare(g.n, best.n)) < 0 {
			best, bestN = g, n
		}
	}
	return best
}
