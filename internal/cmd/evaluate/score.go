package main

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
)

// levels are the band levels scored, in percent.
var levels = [2]float64{80, 95}

// totalPaths is the number of sample paths drawn for the band of the
// h-step total.
const totalPaths = 1000

// result is one model's forecast of one series, scored. Sums are over the
// series' test points; counts say how many points entered each sum.
type result struct {
	err  error  // why the series failed (nil when scored)
	fit  string // the fitted model's String
	secs float64

	smape  float64 // Σ 200|y−f|/(|y|+|f|)
	nSmape int
	mase   float64 // Σ |y−f|/scale
	nMase  int
	in     [2]int     // points inside the band at each level
	msis   [2]float64 // Σ interval score/scale at each level
	nBand  int        // points with a band
	nMsis  int        // points with a band and a defined scale
	totIn  [2]int     // 1 when the h-step total is inside its band
	nTot   int        // 1 when the total could be scored
	note   string     // what could not be scored, e.g. "no bands"
	route  string     // the automatic forecaster's route ("" for other models)

	// The forecast itself, kept for -forecasts: point forecasts and the
	// bands at each level (nil without bands).
	point  []float64
	lo, hi [2][]float64
}

// fitOne fits m to the training part of it, turning a panic into an
// error, and returns the fit with the time it took.
func fitOne(ctx context.Context, m almanac.Model, it item) (fit almanac.Fitted, secs float64, err error) {
	defer func() {
		if v := recover(); v != nil {
			fit, err = nil, fmt.Errorf("fit: %w: panic: %v", almanac.ErrNotFitted, v)
		}
	}()
	t0 := time.Now()
	fit, err = m.Fit(ctx, it.train)
	secs = time.Since(t0).Seconds()
	if err != nil {
		return nil, secs, fmt.Errorf("fit: %w", err)
	}
	if fit == nil {
		return nil, secs, fmt.Errorf("fit: %w: no fit and no error", almanac.ErrNotFitted)
	}
	return fit, secs, nil
}

// scoreFit forecasts the test part of it from a fitted model and scores
// the forecast; fitSecs is the time the fit took. seed makes the paths
// for the total's band reproducible. Any panic is turned into a failure.
func scoreFit(fit almanac.Fitted, fitSecs float64, it item, seed uint64) (r result) {
	defer func() {
		if v := recover(); v != nil {
			r = result{err: fmt.Errorf("forecast: %w: panic: %v", almanac.ErrNotFitted, v)}
		}
	}()
	h := len(it.test)
	t0 := time.Now()
	fc, err := fit.Forecast(h, levels[:]...)
	bands := err == nil
	if err != nil {
		var err2 error
		if fc, err2 = fit.Forecast(h); err2 != nil {
			return result{err: fmt.Errorf("forecast: %w", err)}
		}
		r.note = "no bands: " + err.Error()
	}
	r.secs = fitSecs + time.Since(t0).Seconds()
	r.fit = fit.String()
	if pf, ok := fit.(*accuracy.PilotFit); ok {
		r.route = pf.Report().Route.String()
	}
	if len(fc.Mean) != h {
		return result{err: fmt.Errorf("forecast: %w: %d values for %d steps", almanac.ErrLength, len(fc.Mean), h)}
	}
	for j, f := range fc.Mean {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return result{err: fmt.Errorf("forecast: %w: %v at step %d returned without an error", almanac.ErrNonFinite, f, j+1)}
		}
	}
	var lo, hi [2][]float64
	if bands {
		if len(fc.Intervals) != len(levels) {
			return result{err: fmt.Errorf("forecast: %w: %d bands for %d levels", almanac.ErrLength, len(fc.Intervals), len(levels))}
		}
		for k := range levels {
			iv := fc.Intervals[k]
			if iv.Level != levels[k] || len(iv.Lower) != h || len(iv.Upper) != h {
				return result{err: fmt.Errorf("forecast: %w: band %d does not match level %v and %d steps", almanac.ErrLength, k, levels[k], h)}
			}
			for j := range h {
				l, u := iv.Lower[j], iv.Upper[j]
				if math.IsNaN(l) || math.IsNaN(u) || math.IsInf(l, 0) || math.IsInf(u, 0) || l > u {
					return result{err: fmt.Errorf("forecast: %w: %v%% band [%v, %v] at step %d returned without an error", almanac.ErrNonFinite, levels[k], l, u, j+1)}
				}
			}
			lo[k], hi[k] = iv.Lower, iv.Upper
		}
	}
	scale, _, serr := accuracy.NaiveScale(it.train.Values, it.m)
	if serr != nil || !(scale > 0) || math.IsInf(scale, 0) {
		scale = math.NaN()
		r.note = joinNote(r.note, "no MASE scale (constant training part)")
	}
	for j, y := range it.test {
		if math.IsNaN(y) {
			continue
		}
		f := fc.Mean[j]
		r.smape += smapeTerm(y, f)
		r.nSmape++
		if !math.IsNaN(scale) {
			r.mase += math.Abs(y-f) / scale
			r.nMase++
		}
		if bands {
			r.nBand++
			for k, lv := range levels {
				l, u := lo[k][j], hi[k][j]
				if y >= l && y <= u {
					r.in[k]++
				}
				if !math.IsNaN(scale) {
					r.msis[k] += intervalScore(y, l, u, lv) / scale
				}
			}
			if !math.IsNaN(scale) {
				r.nMsis++
			}
		}
	}
	r.point, r.lo, r.hi = fc.Mean, lo, hi
	r.scoreTotal(fit, fc, it.test, seed)
	return r
}

// scoreTotal checks whether the total of the test part lies inside the
// central band of the forecast total, taken from sample paths: the
// forecast's own when its distribution is a sample, else drawn from the
// fitted model when it simulates. A test part with a missing value, or a
// model without paths, leaves the total unscored.
func (r *result) scoreTotal(fit almanac.Fitted, fc almanac.Forecast, test []float64, seed uint64) {
	total := 0.0
	for _, y := range test {
		if math.IsNaN(y) {
			return
		}
		total += y
	}
	paths := fc.SamplePaths()
	if paths == nil {
		sim, ok := fit.(almanac.Simulator)
		if !ok {
			r.note = joinNote(r.note, "total not scored: no sample paths")
			return
		}
		var err error
		paths, err = sim.Simulate(len(test), totalPaths, rand.NewPCG(seed, 0x7f4a7c15))
		if err != nil {
			r.note = joinNote(r.note, "total not scored: "+err.Error())
			return
		}
	}
	sums := make([]float64, 0, len(paths))
	for _, p := range paths {
		s := 0.0
		for j := range test {
			s += p[j]
		}
		if !math.IsNaN(s) && !math.IsInf(s, 0) {
			sums = append(sums, s)
		}
	}
	if len(sums) < 2 {
		r.note = joinNote(r.note, "total not scored: no usable path")
		return
	}
	slices.Sort(sums)
	r.nTot = 1
	for k, lv := range levels {
		a := (1 - lv/100) / 2
		if total >= quantile(sums, a) && total <= quantile(sums, 1-a) {
			r.totIn[k] = 1
		}
	}
}

func joinNote(a, b string) string {
	if a == "" {
		return b
	}
	return a + "; " + b
}

// smapeTerm is one point of the M3 sMAPE, 200·|y − f|/(|y| + |f|)
// (Makridakis & Hibon 2000; published.md), taken as 0 when y = f = 0.
func smapeTerm(y, f float64) float64 {
	d := math.Abs(y) + math.Abs(f)
	if d == 0 {
		return 0
	}
	return 200 * math.Abs(y-f) / d
}

// intervalScore is the interval score of Gneiting & Raftery (2007) that
// M4's MSIS averages: (u − l) + (2/α)(l − y)·1{y<l} + (2/α)(y − u)·1{y>u}
// with α = 1 − level/100 (published.md).
func intervalScore(y, l, u, level float64) float64 {
	a := 1 - level/100
	s := u - l
	if y < l {
		s += 2 / a * (l - y)
	} else if y > u {
		s += 2 / a * (y - u)
	}
	return s
}

// quantile is the p-quantile of sorted xs, interpolating linearly between
// order statistics (type 7 of Hyndman & Fan 1996, as almanac.Sample).
func quantile(xs []float64, p float64) float64 {
	pos := p * float64(len(xs)-1)
	i := int(math.Floor(pos))
	if i >= len(xs)-1 {
		return xs[len(xs)-1]
	}
	return xs[i] + (pos-float64(i))*(xs[i+1]-xs[i])
}

// summary aggregates results over a set of series: every measure averages
// over all the (series, step) points that enter it, as the published M3
// table does for its "all" column.
type summary struct {
	series, failed int
	failedIDs      []string
	secs           float64
	smape, mase    float64
	in             [2]float64 // coverage, percent
	msis           [2]float64
	tot            [2]float64 // coverage of the total, percent
	nTot           int
	nBand          int
	owa            float64
}

// common returns the indices at which every run scored the series.
func common(runs []modelRun, idx []int) []int {
	var out []int
	for _, i := range idx {
		ok := true
		for _, r := range runs {
			if r.res[i].err != nil {
				ok = false
				break
			}
		}
		if ok {
			out = append(out, i)
		}
	}
	return out
}

// summarize aggregates the results at the given indices; ref holds the
// Naive2 results for OWA (nil when not wanted).
func summarize(items []item, res, ref []result, idx []int) summary {
	s := summary{series: len(idx)}
	var sm, ms, msis [2]float64
	var nS, nM, nBand, nMsis, nTot int
	var in, tot [2]int
	// OWA sums over the series both the model and Naive2 scored.
	var oS, oM, rS, rM float64
	var oNS, oNM int
	for _, i := range idx {
		r := res[i]
		if r.err != nil {
			s.failed++
			s.failedIDs = append(s.failedIDs, items[i].id)
			continue
		}
		s.secs += r.secs
		sm[0] += r.smape
		nS += r.nSmape
		ms[0] += r.mase
		nM += r.nMase
		nBand += r.nBand
		nMsis += r.nMsis
		nTot += r.nTot
		for k := range levels {
			in[k] += r.in[k]
			msis[k] += r.msis[k]
			tot[k] += r.totIn[k]
		}
		if ref != nil && ref[i].err == nil && r.nMase == ref[i].nMase && r.nSmape == ref[i].nSmape {
			oS += r.smape
			oM += r.mase
			rS += ref[i].smape
			rM += ref[i].mase
			oNS += r.nSmape
			oNM += r.nMase
		}
	}
	s.smape = ratio(sm[0], nS)
	s.mase = ratio(ms[0], nM)
	s.nBand, s.nTot = nBand, nTot
	for k := range levels {
		s.in[k] = 100 * ratio(float64(in[k]), nBand)
		s.msis[k] = ratio(msis[k], nMsis)
		s.tot[k] = 100 * ratio(float64(tot[k]), nTot)
	}
	s.owa = math.NaN()
	if oNS > 0 && oNM > 0 && rS > 0 && rM > 0 {
		s.owa = (oS/rS + oM/rM) / 2 // the point counts cancel
	}
	return s
}

func ratio(a float64, n int) float64 {
	if n == 0 {
		return math.NaN()
	}
	return a / float64(n)
}
