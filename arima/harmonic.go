package arima

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"gonum.org/v1/gonum/mat"
)

// DefaultMaxHarmonics bounds the Fourier pairs per seasonal period that
// HarmonicRegression considers when MaxHarmonics is 0.
const DefaultMaxHarmonics = 12

// HarmonicRegression is dynamic harmonic regression: a regression on
// Fourier terms of exact seasonal periods (any real number of
// observations: 365.25/7 for the year in weekly data, 7 and 365.25 for
// daily data, 24 and 168 for hourly data) with ARIMA errors, for series
// whose seasonality is long, non-integer or multiple, where seasonal
// ARIMA and exponential smoothing do not reach. It is an almanac.Model;
// the fitted model builds its own future Fourier terms (anchored to
// absolute time, calendar.Cycle) and calendar regressors.
//
// Fit chooses, in order:
//  1. the periods (Periods, or the frequency's natural ones,
//     calendar.Frequency.SeasonalPeriods) that the series covers more
//     than once, and per period at most min(⌊period/2⌋, MaxHarmonics)
//     harmonics, fewer when the series is short;
//  2. the order of differencing d (Search.D, or KPSS tests on the
//     residuals of the least-squares regression on the largest Fourier
//     set and the calendar regressors, as Search does);
//  3. the number of harmonics per period by AICc (Hurvich & Tsai 1989),
//     period by period in two passes, adding harmonics while one of the
//     next two lowers the AICc (the last minimum of a longer scan was
//     often a chance dip: on an invented hourly series with two daily
//     harmonics, the 7th came out 0.03 below the 2nd), each candidate
//     scored by the conditional Gaussian likelihood of the regression with AR(2) errors (φ
//     estimated once from the largest model's residuals, β by generalised
//     least squares given φ): a screen that costs a least-squares fit per
//     candidate rather than a likelihood optimisation;
//  4. the ARMA orders of the errors by Search (stepwise, non-seasonal) on
//     the regression's residual series;
//  5. the final model by exact maximum likelihood, all coefficients
//     jointly (Spec with the Fourier terms and Calendar as rules).
//
// The zero value chooses everything from the series' frequency. A
// HarmonicRegression is a plain value, safe to share.
type HarmonicRegression struct {
	// Periods are the seasonal periods in observations (each > 2); nil
	// takes the frequency's natural ones.
	Periods []float64
	// Harmonics fixes the number of Fourier pairs per period (same order
	// as the periods used); nil or a 0 entry chooses it by AICc.
	Harmonics []int
	// MaxHarmonics bounds the pairs per period when choosing (0 means
	// DefaultMaxHarmonics).
	MaxHarmonics int
	// Calendar holds further regressors as rules (holidays, events);
	// their columns enter every candidate.
	Calendar calendar.Design
	// Search chooses the ARMA orders of the errors and d; its seasonal
	// settings are ignored (the Fourier terms carry the seasons: no
	// seasonal ARIMA part, no seasonal differencing), as are its
	// Regressors and Calendar (use Calendar above).
	Search Search
}

var (
	_ almanac.Model        = HarmonicRegression{}
	_ almanac.Fitted       = (*HarmonicFit)(nil)
	_ almanac.Simulator    = (*HarmonicFit)(nil)
	_ almanac.ParamCounter = (*HarmonicFit)(nil)
)

// HarmonicFit is a fitted HarmonicRegression: the final regression with
// ARIMA errors, whose methods it has (Coef names the Fourier terms
// "cycle 52.18 sin1", … as calendar.Cycle does), and the choice made.
type HarmonicFit struct {
	*Fitted
	// Periods are the seasonal periods used, Harmonics the pairs chosen
	// for each.
	Periods   []float64
	Harmonics []int
	// Screened lists the harmonics tried with their screening AICc, in
	// the order tried.
	Screened []HarmonicScore
}

// HarmonicScore is one candidate of the harmonics screen.
type HarmonicScore struct {
	Harmonics []int
	AICc      float64
}

// String returns the fitted model's notation with the harmonics, e.g.
// "ARIMA(1,0,1) + mean + harmonics(52.18: 4)" (the Fourier and calendar
// columns are not listed one by one).
func (h *HarmonicFit) String() string {
	f := h.Fitted
	var b strings.Builder
	b.WriteString(f.lay.orders())
	if f.lay.mean {
		b.WriteString(" + mean")
	}
	if f.lay.drift {
		b.WriteString(" + drift")
	}
	var parts []string
	for i, p := range h.Periods {
		parts = append(parts, fmt.Sprintf("%.4g: %d", p, h.Harmonics[i]))
	}
	b.WriteString(" + harmonics(" + strings.Join(parts, ", ") + ")")
	if other := len(f.lay.regNames) - h.fourierColumns(); other > 0 {
		fmt.Fprintf(&b, " + %d calendar regressors", other)
	}
	b.WriteString(f.leftOutString())
	return b.String()
}

func (h *HarmonicFit) fourierColumns() int {
	n := 0
	for i, p := range h.Periods {
		n += cycleColumns(p, h.Harmonics[i])
	}
	return n
}

// cycleColumns is the number of columns of calendar.Cycle{p, k}.
func cycleColumns(p float64, k int) int {
	if float64(2*k) == p {
		return 2*k - 1
	}
	return 2 * k
}

// Fit chooses and fits the model.
//
// Special cases: an invalid series gives the error of Series.Validate, a
// constant one wraps almanac.ErrConstant; a frequency without seasonal
// periods (and no Periods given), a period ≤ 2 or not finite, a negative
// Harmonics entry or MaxHarmonics, or more Harmonics entries than periods
// wrap almanac.ErrInvalid; a series that covers no period more than once,
// or too short for one harmonic, wraps almanac.ErrTooShort (the caller
// chooses the fallback); the errors of Search and Spec.Fit otherwise.
func (m HarmonicRegression) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	h, err := m.fit(ctx, y)
	if err != nil {
		return nil, err
	}
	return h, nil
}

func (m HarmonicRegression) fit(ctx context.Context, y almanac.Series) (*HarmonicFit, error) {
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("arima: harmonic regression: %w", err)
	}
	if y.IsConstant() {
		return nil, fmt.Errorf("arima: harmonic regression: %w: series %q", almanac.ErrConstant, y.Key)
	}
	periods := m.Periods
	if periods == nil {
		periods = y.Freq.SeasonalPeriods()
		if len(periods) == 0 {
			return nil, fmt.Errorf("arima: harmonic regression: %w: frequency %v has no seasonal period (set Periods)", almanac.ErrInvalid, y.Freq)
		}
	}
	if m.MaxHarmonics < 0 || len(m.Harmonics) > len(periods) {
		return nil, fmt.Errorf("arima: harmonic regression: %w: MaxHarmonics %d, %d Harmonics entries for %d periods", almanac.ErrInvalid, m.MaxHarmonics, len(m.Harmonics), len(periods))
	}
	for i, p := range periods {
		if !(p > 2) || math.IsInf(p, 0) {
			return nil, fmt.Errorf("arima: harmonic regression: %w: period %v (need > 2)", almanac.ErrInvalid, p)
		}
		if i < len(m.Harmonics) && (m.Harmonics[i] < 0 || float64(2*m.Harmonics[i]) > p) {
			return nil, fmt.Errorf("arima: harmonic regression: %w: %d harmonics for period %v", almanac.ErrInvalid, m.Harmonics[i], p)
		}
	}
	n := y.Len()
	nObs := n - y.Missing()
	capK := m.MaxHarmonics
	if capK == 0 {
		capK = DefaultMaxHarmonics
	}
	// Periods the series covers more than once, and their bounds.
	var use []float64
	var fixedK, maxK []int
	for i, p := range periods {
		if float64(n) <= p {
			continue
		}
		k := min(int(p/2), capK)
		fk := 0
		if i < len(m.Harmonics) {
			fk = m.Harmonics[i]
		}
		use = append(use, p)
		fixedK = append(fixedK, fk)
		maxK = append(maxK, k)
	}
	if len(use) == 0 {
		return nil, fmt.Errorf("arima: harmonic regression: %w: series %q has %d values, no seasonal period %v is covered more than once", almanac.ErrTooShort, y.Key, n, periods)
	}
	// A harmonic of a longer period whose frequency equals one of a
	// shorter period's (the 7th of 168 hours is the 1st of 24) would
	// repeat its columns: the longer period stops below the first one.
	for i, p := range use {
		for _, q := range use {
			if q >= p {
				continue
			}
			for j := 1; j <= maxK[i]; j++ {
				if r := float64(j) * q / p; math.Abs(r-math.Round(r)) < 1e-9 {
					maxK[i] = j - 1
					break
				}
			}
		}
		if fixedK[i] > maxK[i] && maxK[i] < int(p/2) {
			return nil, fmt.Errorf("arima: harmonic regression: %w: %d harmonics of period %v repeat those of a shorter period (at most %d)", almanac.ErrInvalid, fixedK[i], p, maxK[i])
		}
	}
	// Room for the coefficients: at most about a third of the observed
	// values go to Fourier terms.
	room := max((nObs-8)/3, 0)
	for {
		total := 0
		for i := range use {
			total += 2 * max(maxK[i], fixedK[i])
		}
		if total <= room {
			break
		}
		j := 0
		for i := range use {
			if maxK[i] > maxK[j] {
				j = i
			}
		}
		if maxK[j] <= 1 {
			return nil, fmt.Errorf("arima: harmonic regression: %w: series %q has %d observed values, too few for one harmonic of each period %v", almanac.ErrTooShort, y.Key, nObs, use)
		}
		maxK[j]--
	}
	for i := range use {
		if fixedK[i] > 0 {
			maxK[i] = fixedK[i]
		}
	}

	// Columns: every Fourier pair up to the bound, and the calendar's.
	design := calendar.Design{Stamp: m.Calendar.Stamp}
	for i, p := range use {
		design.Effects = append(design.Effects, calendar.Cycle{Period: p, Harmonics: maxK[i]})
	}
	fourier, err := design.Build(y.Start, y.Freq, n, 0)
	if err != nil {
		return nil, fmt.Errorf("arima: harmonic regression: %w: %w", almanac.ErrInvalid, err)
	}
	var other []Regressor
	if len(m.Calendar.Effects) > 0 {
		if other, _, _, err = expandCalendar(m.Calendar, nil, nil, y); err != nil {
			return nil, err
		}
	}
	colsFor := func(ks []int) [][]float64 {
		var out [][]float64
		off := 0
		for i, p := range use {
			out = append(out, columnsOf(fourier[off:off+cycleColumns(p, ks[i])])...)
			off += cycleColumns(p, maxK[i])
		}
		for _, r := range other {
			out = append(out, r.Values)
		}
		return out
	}

	// Order of differencing.
	s := m.Search
	d := 0
	switch {
	case s.D > 0:
		d = s.D
	case s.D == NoDifferencing:
	default:
		var regs []Regressor
		for j, c := range colsFor(maxK) {
			regs = append(regs, Regressor{Name: fmt.Sprint(j), Values: c})
		}
		res, err := regressionResiduals(y.Values, regs)
		if err != nil {
			return nil, fmt.Errorf("arima: harmonic regression: %w", err)
		}
		if d, err = Differences(res, s.Differencing); err != nil {
			return nil, fmt.Errorf("arima: harmonic regression: choosing d: %w", err)
		}
	}

	// The harmonics screen.
	out := &HarmonicFit{Periods: use}
	ks := append([]int(nil), maxK...)
	var choose []int
	for i := range use {
		if fixedK[i] == 0 {
			choose = append(choose, i)
			ks[i] = 1
		}
	}
	if len(choose) > 0 {
		phi := screenAR(y.Values, colsFor(maxK), d)
		seen := map[string]float64{}
		score := func(k []int) float64 {
			key := fmt.Sprint(k)
			if v, ok := seen[key]; ok {
				return v
			}
			v := screenAICc(y.Values, colsFor(k), d, phi)
			seen[key] = v
			out.Screened = append(out.Screened, HarmonicScore{Harmonics: append([]int(nil), k...), AICc: v})
			return v
		}
		for pass := 0; pass < min(2, len(choose)); pass++ {
			for _, i := range choose {
				if err := ctx.Err(); err != nil {
					return nil, fmt.Errorf("arima: harmonic regression: %w", err)
				}
				best, bestK := math.Inf(1), ks[i]
				for k := 1; k <= maxK[i] && k <= bestK+2; k++ {
					ks[i] = k
					if v := score(ks); v < best {
						best, bestK = v, k
					}
				}
				ks[i] = bestK
			}
		}
	}
	out.Harmonics = ks

	// ARMA orders of the errors, on the regression's residual series.
	final := calendar.Design{Stamp: m.Calendar.Stamp}
	for i, p := range use {
		final.Effects = append(final.Effects, calendar.Cycle{Period: p, Harmonics: ks[i]})
	}
	final.Effects = append(final.Effects, m.Calendar.Effects...)
	s.MaxSP, s.MaxSQ, s.SD, s.Regressors, s.Calendar = -1, -1, NoDifferencing, nil, calendar.Design{}
	if d == 0 {
		s.D = NoDifferencing
	} else {
		s.D = d
	}
	u, err := glsResidualSeries(y, colsFor(ks), d)
	if err != nil {
		return nil, err
	}
	sr, err := s.search(ctx, u)
	if err != nil {
		return nil, err
	}
	c := sr.Model.Spec()
	spec := Spec{P: c.P, D: d, Q: c.Q, Constant: c.Constant, Calendar: final}
	f, err := spec.fit(ctx, y)
	if err != nil {
		return nil, err
	}
	out.Fitted = f
	return out, nil
}

func columnsOf(cs []calendar.Column) [][]float64 {
	out := make([][]float64, len(cs))
	for j, c := range cs {
		out[j] = c.Values
	}
	return out
}

// diffRows returns (1−B)^d applied to v (length n − d; NaN propagates).
func diffRows(v []float64, d int) []float64 {
	w := append([]float64(nil), v...)
	for range d {
		for i := len(w) - 1; i > 0; i-- {
			w[i] -= w[i-1]
		}
		w = w[1:]
	}
	return w
}

// screenDesign returns the rows of the screening regression: y and the
// columns differenced d times, then filtered by 1 − φ₁B − φ₂B (for
// d = 0 a constant column is added), keeping rows with y observed.
func screenDesign(y []float64, cols [][]float64, d int, phi []float64) (*mat.Dense, *mat.VecDense) {
	yd := diffRows(y, d)
	xs := make([][]float64, 0, len(cols)+1)
	if d == 0 {
		one := make([]float64, len(y))
		for i := range one {
			one[i] = 1
		}
		xs = append(xs, one)
	}
	for _, c := range cols {
		xs = append(xs, diffRows(c, d))
	}
	p := len(phi)
	filt := func(v []float64, t int) float64 {
		s := v[t]
		for i, f := range phi {
			s -= f * v[t-i-1]
		}
		return s
	}
	var rows []int
	for t := p; t < len(yd); t++ {
		if !math.IsNaN(filt(yd, t)) {
			rows = append(rows, t)
		}
	}
	x := mat.NewDense(max(len(rows), 1), max(len(xs), 1), nil)
	z := mat.NewVecDense(max(len(rows), 1), nil)
	for r, t := range rows {
		z.SetVec(r, filt(yd, t))
		for j, c := range xs {
			x.Set(r, j, filt(c, t))
		}
	}
	if len(rows) == 0 {
		return nil, nil
	}
	return x, z
}

// olsResiduals solves the least-squares problem and returns the residual
// vector (nil when it cannot be solved).
func olsResiduals(x *mat.Dense, z *mat.VecDense) []float64 {
	if x == nil {
		return nil
	}
	r, c := x.Dims()
	if r <= c {
		return nil
	}
	var qr mat.QR
	qr.Factorize(x)
	var b mat.VecDense
	if err := qr.SolveVecTo(&b, false, z); err != nil {
		return nil
	}
	var fit mat.VecDense
	fit.MulVec(x, &b)
	out := make([]float64, r)
	for i := range out {
		out[i] = z.AtVec(i) - fit.AtVec(i)
	}
	return out
}

// screenAR estimates the AR(2) error coefficients of the screen from the
// residuals of the largest regression (least squares, with a zero
// fallback when they are not stationary or cannot be computed).
func screenAR(y []float64, cols [][]float64, d int) []float64 {
	res := olsResiduals(screenDesign(y, cols, d, nil))
	if len(res) < 10 {
		return nil
	}
	x := mat.NewDense(len(res)-2, 2, nil)
	z := mat.NewVecDense(len(res)-2, nil)
	for t := 2; t < len(res); t++ {
		x.Set(t-2, 0, res[t-1])
		x.Set(t-2, 1, res[t-2])
		z.SetVec(t-2, res[t])
	}
	var qr mat.QR
	qr.Factorize(x)
	var b mat.VecDense
	if err := qr.SolveVecTo(&b, false, z); err != nil {
		return nil
	}
	phi := []float64{b.AtVec(0), b.AtVec(1)}
	if !arStationary(phi) {
		return nil
	}
	return phi
}

// screenAICc is the AICc of the regression on cols with AR(φ) errors
// after d differences, β by least squares on the filtered rows
// (conditional Gaussian likelihood, σ² concentrated out).
func screenAICc(y []float64, cols [][]float64, d int, phi []float64) float64 {
	x, z := screenDesign(y, cols, d, phi)
	res := olsResiduals(x, z)
	if res == nil {
		return math.Inf(1)
	}
	m := float64(len(res))
	rss := 0.0
	for _, v := range res {
		rss += v * v
	}
	_, c := x.Dims()
	k := float64(c + len(phi) + 1)
	if !(rss > 0) || m-k-1 <= 0 {
		return math.Inf(1)
	}
	ll := -0.5 * m * (math.Log(2*math.Pi*rss/m) + 1)
	return -2*ll + 2*k + 2*k*(k+1)/(m-k-1)
}

// glsResidualSeries returns y minus its least-squares regression on cols
// (fitted on the d-times differenced data, so that with d > 0 only the
// seasonal part is removed), as a series for choosing the ARMA orders.
func glsResidualSeries(y almanac.Series, cols [][]float64, d int) (almanac.Series, error) {
	x, z := screenDesign(y.Values, cols, d, nil)
	if x == nil {
		return almanac.Series{}, fmt.Errorf("arima: harmonic regression: %w: no observed values after differencing", almanac.ErrTooShort)
	}
	r, c := x.Dims()
	if r <= c {
		return almanac.Series{}, fmt.Errorf("arima: harmonic regression: %w: %d rows for %d columns", almanac.ErrTooShort, r, c)
	}
	var qr mat.QR
	qr.Factorize(x)
	var b mat.VecDense
	if err := qr.SolveVecTo(&b, false, z); err != nil {
		return almanac.Series{}, fmt.Errorf("arima: harmonic regression: %w: %v", ErrCollinear, err)
	}
	off := 0
	if d == 0 {
		off = 1 // the constant stays in the series
	}
	u := y.Clone()
	for i := range u.Values {
		for j, col := range cols {
			u.Values[i] -= b.AtVec(off+j) * col[i]
		}
	}
	return u, nil
}
