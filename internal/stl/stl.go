package stl

import (
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac/internal/scaling"
)

// Params are the settings of one STL run, in R's terms. Every field is
// used as given (Defaults fills them the way R does); spans below 3 are
// raised to 3 and even spans to the next odd number inside Decompose.
type Params struct {
	Period  int // observations per cycle, ≥ 2
	SWindow int // seasonal (cycle-subseries) loess span, ≥ 1
	SDegree int // 0 or 1
	SJump   int // ≥ 1
	TWindow int // trend loess span, ≥ 1
	TDegree int // 0 or 1
	TJump   int // ≥ 1
	LWindow int // low-pass loess span, ≥ 1
	LDegree int // 0 or 1
	LJump   int // ≥ 1
	Inner   int // inner iterations per pass, ≥ 1
	Outer   int // robustness passes, ≥ 0 (0 = not robust)
	// Periodic replaces the seasonal component by its cycle means after
	// the run (R's s.window = "periodic"; Defaults then sets SWindow to
	// 10n+1 and SDegree to 0).
	Periodic bool
	// ExactMedian scales the robustness weights by six times the exact
	// median of |remainder|. By default the scale is what R's partial
	// sort leaves at the two middle positions, which for an even number
	// of observations is not always the median (see robustnessWeights).
	ExactMedian bool
}

// nextOdd is R's nextodd: round half to even, then add 1 if even.
func nextOdd(x float64) int {
	r := int(math.RoundToEven(x))
	if r%2 == 0 {
		r++
	}
	return r
}

// TrendWindow returns R's default trend span for a period and seasonal
// span: nextodd(ceiling(1.5·period / (1 − 1.5/sWindow))). It is 3 when
// sWindow ≤ 1.5 (where R's formula turns negative and the Fortran raises
// the span to 3).
func TrendWindow(period, sWindow int) int {
	if float64(sWindow) <= 1.5 {
		return 3
	}
	return nextOdd(math.Ceil(1.5 * float64(period) / (1 - 1.5/float64(sWindow))))
}

// Defaults returns R's stl defaults for n observations: with periodic,
// SWindow = 10n+1 and SDegree = 0; otherwise SWindow = sWindow and
// SDegree = 0. TDegree = LDegree = 1, TWindow by TrendWindow, LWindow =
// nextodd(period), each jump ceiling(window/10), and Inner, Outer = 2, 0
// (1, 15 when robust).
func Defaults(n, period, sWindow int, periodic, robust bool) Params {
	p := Params{Period: period, SWindow: sWindow, Periodic: periodic, TDegree: 1, LDegree: 1}
	if periodic {
		p.SWindow = 10*n + 1
	}
	p.TWindow = TrendWindow(period, p.SWindow)
	p.LWindow = nextOdd(float64(period))
	p.SJump = ceilTenth(p.SWindow)
	p.TJump = ceilTenth(p.TWindow)
	p.LJump = ceilTenth(p.LWindow)
	if robust {
		p.Inner, p.Outer = 1, 15
	} else {
		p.Inner, p.Outer = 2, 0
	}
	return p
}

func ceilTenth(w int) int { return int(math.Ceil(float64(w) / 10)) }

// Effective returns p with the spans raised to at least 3 and to the next
// odd number, as Decompose uses them.
func (p Params) Effective() Params {
	p.SWindow = oddAtLeast3(p.SWindow)
	p.TWindow = oddAtLeast3(p.TWindow)
	p.LWindow = oddAtLeast3(p.LWindow)
	return p
}

func oddAtLeast3(w int) int {
	w = max(w, 3)
	if w%2 == 0 {
		w++
	}
	return w
}

// Validate checks p for a series of n observations. The error wraps
// ErrPeriod, ErrTooShort or ErrParams.
func (p Params) Validate(n int) error {
	if p.Period < 2 {
		return fmt.Errorf("stl: %w: period %d", ErrPeriod, p.Period)
	}
	if n <= 2*p.Period {
		return fmt.Errorf("stl: %w: %d observations, need more than two full periods (> %d)", ErrTooShort, n, 2*p.Period)
	}
	for _, c := range []struct {
		name     string
		v, lo    int
		isDegree bool
	}{
		{"seasonal window", p.SWindow, 1, false},
		{"trend window", p.TWindow, 1, false},
		{"low-pass window", p.LWindow, 1, false},
		{"seasonal degree", p.SDegree, 0, true},
		{"trend degree", p.TDegree, 0, true},
		{"low-pass degree", p.LDegree, 0, true},
		{"seasonal jump", p.SJump, 1, false},
		{"trend jump", p.TJump, 1, false},
		{"low-pass jump", p.LJump, 1, false},
		{"inner iterations", p.Inner, 1, false},
		{"outer iterations", p.Outer, 0, false},
	} {
		if c.v < c.lo || (c.isDegree && c.v > 1) {
			if c.isDegree {
				return fmt.Errorf("stl: %w: %s %d, must be 0 or 1", ErrParams, c.name, c.v)
			}
			return fmt.Errorf("stl: %w: %s %d, must be at least %d", ErrParams, c.name, c.v, c.lo)
		}
	}
	return nil
}

// Workspace holds the scratch memory of Decompose so that repeated runs
// on series of similar length do not allocate. The zero value is ready to
// use. A Workspace must not be used by two goroutines at once.
type Workspace struct {
	work [5][]float64 // n + 2·period each, as the Fortran's work(n+2np, 5)
	ys   []float64    // the data rescaled by a power of two
	rw   []float64    // robustness weights
	sel  []float64    // scratch for the median
	kern kernel       // tabulated tricube weights
}

func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}

func (w *Workspace) resize(n, period int) {
	m := n + 2*period
	for i := range w.work {
		w.work[i] = grow(w.work[i], m)
	}
	w.rw = grow(w.rw, n)
	w.ys = grow(w.ys, n)
	w.sel = grow(w.sel, n)
}

// Decompose runs STL on y with parameters p and returns freshly allocated
// components. See Workspace.DecomposeTo.
func Decompose(y []float64, p Params) (seasonal, trend, remainder, weights []float64, err error) {
	n := len(y)
	seasonal = make([]float64, n)
	trend = make([]float64, n)
	remainder = make([]float64, n)
	weights = make([]float64, n)
	var w Workspace
	if err := w.DecomposeTo(seasonal, trend, remainder, weights, y, p); err != nil {
		return nil, nil, nil, nil, err
	}
	return seasonal, trend, remainder, weights, nil
}

// DecomposeTo runs STL on y with parameters p, writing the components
// into seasonal, trend, remainder and weights (each of length len(y)).
// The error wraps ErrLength, ErrNonFinite, ErrPeriod, ErrTooShort,
// ErrParams or ErrOverflow; on error the outputs are unspecified.
//
// The computation runs on y·2^k, with k chosen (internal/scaling) so that
// the largest |y| is near 2^256, and the components are scaled back by
// 2^−k. STL is equivariant under scaling and multiplying by a power of
// two is exact, so the result is bit for bit the same as without the
// rescaling whenever that would neither overflow nor underflow; data near
// the float64 limit (1e308) no longer overflow inside the smoothers. A
// component that does not fit in a float64 once scaled back (for example
// a remainder of 2e308) gives ErrOverflow.
func (w *Workspace) DecomposeTo(seasonal, trend, remainder, weights, y []float64, p Params) error {
	n := len(y)
	if len(seasonal) != n || len(trend) != n || len(remainder) != n || len(weights) != n {
		return fmt.Errorf("stl: %w: output buffers must have length %d", ErrLength, n)
	}
	if err := p.Validate(n); err != nil {
		return err
	}
	for i, v := range y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("stl: %w: %v at index %d", ErrNonFinite, v, i)
		}
	}
	q := p.Effective()
	w.resize(n, q.Period)
	k := scaling.Exponent(y)
	ys := scaling.Scale(w.ys[:n], y, k)
	if err := w.run(ys, q, seasonal, trend, weights); err != nil {
		return err
	}
	if p.Periodic {
		cycleMeans(seasonal, q.Period)
	}
	for i := range ys {
		remainder[i] = ys[i] - seasonal[i] - trend[i]
	}
	for _, c := range [][]float64{seasonal, trend, remainder} {
		scaling.Scale(c, c, -k)
	}
	for _, c := range []struct {
		name string
		x    []float64
	}{{"seasonal", seasonal}, {"trend", trend}, {"remainder", remainder}} {
		if !scaling.Finite(c.x) {
			return fmt.Errorf("stl: %w: the %s component exceeds the float64 range", ErrOverflow, c.name)
		}
	}
	return nil
}

// cycleMeans replaces s by its mean over each position modulo period.
func cycleMeans(s []float64, period int) {
	n := len(s)
	for j := 0; j < period && j < n; j++ {
		sum, c := 0.0, 0
		for i := j; i < n; i += period {
			sum += s[i]
			c++
		}
		m := sum / float64(c)
		// Second pass as R's mean() does, to recover the rounding of
		// the first sum.
		t := 0.0
		for i := j; i < n; i += period {
			t += s[i] - m
		}
		m += t / float64(c)
		for i := j; i < n; i += period {
			s[i] = m
		}
	}
}

// run is the Fortran subroutine stl: Outer+1 passes of stlstp with the
// robustness weights updated in between. It returns an error wrapping
// ErrOverflow when a fit is not finite (which the rescaling in
// DecomposeTo rules out for finite data; the check keeps NaN away from
// the partial sort, which assumes ordered values and would run past the
// ends of its array on NaN).
func (w *Workspace) run(y []float64, p Params, season, trend, rw []float64) error {
	n := len(y)
	for i := range trend {
		trend[i] = 0
	}
	userw := false
	for k := 0; ; {
		w.step(y, p, userw, rw, season, trend)
		k++
		if k > p.Outer {
			break
		}
		fit := w.work[0][:n]
		for i := range fit {
			fit[i] = trend[i] + season[i]
		}
		if !robustnessWeights(rw, y, fit, w.sel[:n], p.ExactMedian) {
			return fmt.Errorf("stl: %w: the fit of robustness pass %d is not finite", ErrOverflow, k)
		}
		userw = true
	}
	if p.Outer <= 0 {
		for i := range rw {
			rw[i] = 1
		}
	}
	return nil
}

// step is the Fortran stlstp: Inner inner iterations.
func (w *Workspace) step(y []float64, p Params, userw bool, rw, season, trend []float64) {
	n, np := len(y), p.Period
	w1, w2, w3, w4 := w.work[0], w.work[1], w.work[2], w.work[3]
	for range p.Inner {
		for i := 0; i < n; i++ {
			w1[i] = y[i] - trend[i]
		}
		subseries(w1[:n], np, p.SWindow, p.SDegree, p.SJump, userw, rw, w2, w3, w4, w.work[4], &w.kern)
		lowPassMA(w2[:n+2*np], np, w3, w1)
		smooth(w3[:n], p.LWindow, p.LDegree, p.LJump, false, w4, w1[:n], &w.kern)
		for i := 0; i < n; i++ {
			season[i] = w2[np+i] - w1[i]
		}
		for i := 0; i < n; i++ {
			w1[i] = y[i] - season[i]
		}
		smooth(w1[:n], p.TWindow, p.TDegree, p.TJump, userw, rw, trend, &w.kern)
	}
}

// robustnessWeights is the Fortran stlrwt: bisquare weights of
// |y − fit| scaled by cmad = 3·(r[mid1] + r[mid2]), where r is partially
// ordered by psort at the 1-based positions mid1 = n/2+1 and
// mid2 = n−mid1+1. For odd n that is six times the median. For even n it
// is six times the mean of the two middle order statistics whenever psort
// places both, but psort is handed the positions in decreasing order and
// then, for about one sample in ten (measured on random samples of 24 to
// 1000 values), leaves at mid1 a value that is not the (n/2+1)-th order
// statistic, sometimes far above it. R's results depend on that, so it is
// kept by default (without it the robust reference fixtures differ from R
// by about 1e-4).
//
// With exact, the two middle order statistics are found by sorting, so
// cmad is six times the median.
//
// It returns false, leaving rw unchanged, when a residual is NaN or ±Inf:
// neither sort can order those (psort would index outside a on NaN).
func robustnessWeights(rw, y, fit, scratch []float64, exact bool) bool {
	n := len(y)
	for i := range scratch {
		r := math.Abs(y[i] - fit[i])
		if !(r <= math.MaxFloat64) { // NaN or +Inf
			return false
		}
		scratch[i] = r
	}
	mid := [2]int{n/2 + 1, 0}
	mid[1] = n - mid[0] + 1
	if exact {
		slices.Sort(scratch)
	} else {
		psort(scratch, mid[:])
	}
	cmad := 3.0 * (scratch[mid[0]-1] + scratch[mid[1]-1])
	c9 := 0.999 * cmad
	c1 := 0.001 * cmad
	for i := range rw {
		r := math.Abs(y[i] - fit[i])
		switch {
		case r <= c1:
			rw[i] = 1
		case r <= c9:
			u := r / cmad
			u = 1 - u*u
			rw[i] = u * u
		default:
			rw[i] = 0
		}
	}
	return true
}

// subseries is the Fortran stlss: loess of each cycle-subseries of y
// (length n), extended by one point at each end, written into season
// (length n + 2·np). w1..w3 are scratch of length ≥ n/np + 3.
func subseries(y []float64, np, ns, isdeg, nsjump int, userw bool, rw, season, w1, w2, w3 []float64, kc *kernel) {
	n := len(y)
	for j := 1; j <= np; j++ {
		k := (n-j)/np + 1
		for i := 1; i <= k; i++ {
			w1[i-1] = y[(i-1)*np+j-1]
		}
		if userw {
			for i := 1; i <= k; i++ {
				w3[i-1] = rw[(i-1)*np+j-1]
			}
		}
		smooth(w1[:k], ns, isdeg, nsjump, userw, w3, w2[1:k+1], kc)
		lo := newLoess(w1[:k], ns, isdeg, userw, w3, kc)
		nright := min(ns, k)
		v, ok := lo.at(0, 1, nright)
		if ok {
			w2[0] = v
		} else {
			w2[0] = w2[1]
		}
		nleft := max(1, k-ns+1)
		v, ok = lo.at(k+1, nleft, k)
		if ok {
			w2[k+1] = v
		} else {
			w2[k+1] = w2[k]
		}
		for m := 1; m <= k+2; m++ {
			season[(m-1)*np+j-1] = w2[m-1]
		}
	}
}

// lowPassMA is the Fortran stlfts: moving averages of lengths np, np and
// 3 of x (length N), written to out (length N − 2np); tmp is scratch.
func lowPassMA(x []float64, np int, out, tmp []float64) {
	n := len(x)
	movingAverage(out[:n-np+1], x, np)
	movingAverage(tmp[:n-2*np+2], out[:n-np+1], np)
	movingAverage(out[:n-2*np], tmp[:n-2*np+2], 3)
}

// movingAverage is the Fortran stlma: running means of length l of x into
// ave (length len(x) − l + 1), updated by subtracting and adding.
func movingAverage(ave, x []float64, l int) {
	fl := float64(l)
	v := 0.0
	for i := 0; i < l; i++ {
		v += x[i]
	}
	ave[0] = v / fl
	for j := 1; j < len(ave); j++ {
		v = v - x[j-1] + x[j+l-1]
		ave[j] = v / fl
	}
}

// smooth is the Fortran stless: loess of y (length n) with span length,
// degree ideg, evaluated every njump points and linearly interpolated,
// into ys; kc caches the kernel weights.
func smooth(y []float64, length, ideg, njump int, userw bool, rw, ys []float64, kc *kernel) {
	n := len(y)
	if n < 2 {
		ys[0] = y[0]
		return
	}
	newnj := min(njump, n-1)
	if ideg == 0 && newnj == 1 && length < n && smoothConst(y, length, userw, rw, ys, kc) {
		return
	}
	var nleft, nright int
	lo := newLoess(y, length, ideg, userw, rw, kc)
	at := func(i int) {
		v, ok := lo.at(i, nleft, nright)
		if ok {
			ys[i-1] = v
		} else {
			ys[i-1] = y[i-1]
		}
	}
	switch {
	case length >= n:
		nleft, nright = 1, n
		for i := 1; i <= n; i += newnj {
			at(i)
		}
	case newnj == 1:
		nsh := (length + 1) / 2
		nleft, nright = 1, length
		for i := 1; i <= n; i++ {
			if i > nsh && nright != n {
				nleft++
				nright++
			}
			at(i)
		}
	default:
		nsh := (length + 1) / 2
		for i := 1; i <= n; i += newnj {
			switch {
			case i < nsh:
				nleft, nright = 1, length
			case i >= n-nsh+1:
				nleft, nright = n-length+1, n
			default:
				nleft, nright = i-nsh+1, length+i-nsh
			}
			at(i)
		}
	}
	if newnj == 1 {
		return
	}
	for i := 1; i <= n-newnj; i += newnj {
		delta := (ys[i+newnj-1] - ys[i-1]) / float64(newnj)
		for j := i + 1; j <= i+newnj-1; j++ {
			ys[j-1] = ys[i-1] + delta*float64(j-i)
		}
	}
	k := ((n-1)/newnj)*newnj + 1
	if k != n {
		// The Fortran keeps the window of the last evaluated point.
		at(n)
		if k != n-1 {
			delta := (ys[n-1] - ys[k-1]) / float64(n-k)
			for j := k + 1; j <= n-1; j++ {
				ys[j-1] = ys[k-1] + delta*float64(j-k)
			}
		}
	}
}

// smoothConst is smooth for degree 0, every point evaluated (njump 1)
// and a span shorter than the series: the case of the cycle-subseries,
// whose smoother R runs with degree 0 and jump 1 by default. It computes
// what loess.at computes at each point, in the same order, without a
// call per point. It returns false, having written nothing, when the
// span's bandwidths are beyond the tabulated ones.
//
// Where the window is whole (span points centred on i, bandwidth
// h = (span − 1)/2), its two end points are at distance h and have
// weight 0 (tricube: 0 beyond 0.999h): they add nothing to the sums and
// are left out.
func smoothConst(y []float64, length int, userw bool, rw, ys []float64, kc *kernel) bool {
	n := len(y)
	if length-1 > maxTabH || length%2 == 0 {
		return false
	}
	nsh := (length + 1) / 2
	ys = ys[:n]
	// The first and last nsh − 1 points: windows [1, length] and
	// [n − length + 1, n].
	for i := 1; i < nsh; i++ {
		ys[i-1] = constAt(y, rw, userw, kc, i, 1, length)
	}
	for i := n - nsh + 2; i <= n; i++ {
		ys[i-1] = constAt(y, rw, userw, kc, i, n-length+1, n)
	}
	h := nsh - 1
	kt := kc.tab(h)
	tw := kt.w[1 : 2*h]
	m := len(tw)
	for i := nsh; i <= n-nsh+1; i++ {
		lo := i - h + 1
		yw := y[lo-1 : lo-1+m]
		var s0, sy float64
		if userw {
			rr := rw[lo-1 : lo-1+m]
			for j, w := range tw {
				w *= rr[j]
				s0 += w
				sy += w * yw[j]
			}
		} else {
			for j, w := range tw {
				s0 += w
				sy += w * yw[j]
			}
		}
		if s0 <= 0 {
			ys[i-1] = y[i-1]
		} else {
			ys[i-1] = sy / s0
		}
	}
	return true
}

// constAt is loess.at for degree 0 at x0 with the window [nleft,
// nright], the value of y there when every weight is zero.
func constAt(y, rw []float64, userw bool, kc *kernel, x0, nleft, nright int) float64 {
	hi := max(x0-nleft, nright-x0)
	kt := kc.tab(hi)
	m := nright - nleft + 1
	off := hi - x0
	tw := kt.w[nleft+off : nleft+off+m]
	yw := y[nleft-1 : nleft-1+m]
	yw = yw[:len(tw)]
	var s0, sy float64
	if userw {
		rr := rw[nleft-1 : nleft-1+m]
		rr = rr[:len(tw)]
		for j, w := range tw {
			w *= rr[j]
			s0 += w
			sy += w * yw[j]
		}
	} else {
		for j, w := range tw {
			s0 += w
			sy += w * yw[j]
		}
	}
	if s0 <= 0 {
		return y[x0-1]
	}
	return sy / s0
}

// at is the Fortran stlest: the loess fit at position xs = x0
// (1-based; a whole number in every call, as in the Fortran)
// from y[nleft-1 .. nright-1], with tricube weights (times rw when
// userw), degree 0 or 1. ok is false when every weight is zero.
//
// The Fortran normalises the weights, then makes separate passes for the
// weighted mean position, the weighted spread and the fit. Here one pass
// accumulates the weighted sums in coordinates centred on xs and the
// degree-1 correction is applied in closed form: the same estimator with
// a different order of rounding (agreement with R to about 1e-13
// relative), and faster.
//
// A loess value holds what is fixed for one smoother (the series, span,
// degree and weights), at evaluates it at one point.
type loess struct {
	y, rw []float64
	rng   float64 // n − 1
	extra int     // (length − n)/2 when the span exceeds n, else 0
	ideg  int
	userw bool
	kc    *kernel
}

func newLoess(y []float64, length, ideg int, userw bool, rw []float64, kc *kernel) loess {
	n := len(y)
	l := loess{y: y, rw: rw, rng: float64(n) - 1, ideg: ideg, userw: userw, kc: kc}
	if length > n {
		l.extra = (length - n) / 2
	}
	return l
}

func (l *loess) at(x0, nleft, nright int) (ys float64, ok bool) {
	y, rw, ideg, userw, kc, rng := l.y, l.rw, l.ideg, l.userw, l.kc, l.rng
	hi := max(x0-nleft, nright-x0) + l.extra
	h := float64(hi)
	var s0, sd, sdd, sy, sdy float64
	var kt *kernelTab
	if uint(hi) < uint(len(kc.tabs)) && kc.tabs[hi].w != nil {
		kt = &kc.tabs[hi]
	} else {
		kt = kc.fill(hi)
	}
	if kt != nil {
		tab := kt.w
		// Tabulated tricube weights: the same values as below, computed
		// once per distinct h. The window's weights, values and
		// robustness weights as slices of one length (no bounds tests in
		// the loops), and the distance d = j − xs counted up (exact for
		// integers); only the sums the degree needs (a degree-0 fit uses
		// s0 and sy alone, which the other sums do not touch).
		off := hi - x0
		m := nright - nleft + 1
		tw := tab[nleft+off : nleft+off+m]
		yw := y[nleft-1 : nleft-1+m]
		yw = yw[:len(tw)]
		d := float64(nleft - x0)
		// A whole window centred on x0 ends in two points at distance
		// h, whose weight is 0 (tricube: 0 beyond 0.999h): they add
		// nothing to the sums and are left out.
		whole := m == len(tab) && hi > 0
		switch {
		case ideg == 0 && userw:
			rr := rw[nleft-1 : nleft-1+m]
			rr = rr[:len(tw)]
			for j, w := range tw {
				w *= rr[j]
				s0 += w
				sy += w * yw[j]
			}
		case ideg == 0:
			for j, w := range tw {
				s0 += w
				sy += w * yw[j]
			}
		case userw:
			rr := rw[nleft-1 : nleft-1+m]
			if whole {
				tw, yw, rr = tw[1:m-1], yw[1:m-1], rr[1:m-1]
				d++
			}
			yw, rr = yw[:len(tw)], rr[:len(tw)]
			for j, w := range tw {
				w *= rr[j]
				v := yw[j]
				wd := w * d
				s0 += w
				sd += wd
				sdd += wd * d
				sy += w * v
				sdy += wd * v
				d++
			}
		case whole:
			// Unweighted: s0, Σwd and Σwd² depend on h alone and were
			// summed, in this order, with the table; w·d is tabulated
			// too.
			s0, sd, sdd = kt.s0, kt.sd, kt.sdd
			tw, yw = tw[1:m-1], yw[1:m-1]
			wd := kt.wd[1 : m-1]
			wd = wd[:len(tw)]
			for j, w := range tw {
				v := yw[j]
				sy += w * v
				sdy += wd[j] * v
			}
		default:
			for j, w := range tw {
				v := yw[j]
				wd := w * d
				s0 += w
				sd += wd
				sdd += wd * d
				sy += w * v
				sdy += wd * v
				d++
			}
		}
	} else {
		for j := nleft; j <= nright; j++ {
			d := float64(j - x0)
			w := tricube(math.Abs(d), h)
			if w == 0 {
				continue
			}
			if userw {
				w *= rw[j-1]
			}
			v := y[j-1]
			wd := w * d
			s0 += w
			sd += wd
			sdd += wd * d
			sy += w * v
			sdy += wd * v
		}
	}
	if s0 <= 0 {
		return 0, false
	}
	mean := sy / s0
	if h > 0 && ideg > 0 {
		ad := sd / s0 // weighted mean position minus xs
		c := sdd/s0 - ad*ad
		if math.Sqrt(c) > 0.001*rng {
			// ys = Σŵ y + b Σŵ (j − a) y with b = (xs − a)/c.
			return mean - ad/c*(sdy/s0-ad*mean), true
		}
	}
	return mean, true
}

// tricube is the Fortran's neighbourhood weight of a point at distance r
// with bandwidth h: 1 within 0.001h, 0 beyond 0.999h, else (1 − (r/h)³)³.
func tricube(r, h float64) float64 {
	switch {
	case r > 0.999*h:
		return 0
	case r <= 0.001*h:
		return 1
	}
	u := r / h
	u = 1 - u*u*u
	return u * u * u
}

// kernel caches the tricube weights of integer offsets −h..h for each
// whole bandwidth h up to maxTabH, computed on first use and kept (they
// depend on h alone); the smoothers of one run use a handful of
// bandwidths, alternately.
type kernel struct {
	tabs []kernelTab // tabs[h], w nil until computed
	free []float64   // unused storage for further tables, in chunks
}

// kernelTab is the table for one bandwidth h: the weights w of offsets
// d = −h..h, w·d, and the sums of w, w·d and w·d² over the whole window
// in increasing d (the sums loess.at forms for a full window without
// robustness weights, in the same order).
type kernelTab struct {
	w, wd       []float64
	s0, sd, sdd float64
}

// maxTabH bounds the tabulated bandwidths; wider windows, such as the
// periodic seasonal window of 10n+1, compute their weights directly.
const maxTabH = 1023

// tab returns the table for bandwidth h ≤ maxTabH.
func (k *kernel) tab(h int) *kernelTab {
	if uint(h) < uint(len(k.tabs)) && k.tabs[h].w != nil {
		return &k.tabs[h]
	}
	return k.fill(h)
}

// fill computes and keeps the table for bandwidth h, or returns nil when
// h exceeds maxTabH. (loess.at looks the table up in tabs first.)
func (k *kernel) fill(h int) *kernelTab {
	if h < 0 || h > maxTabH {
		return nil
	}
	if len(k.tabs) <= h {
		// Room for twice the bandwidths held so far: few allocations
		// however the bandwidths arrive. (A table already handed out
		// stays valid: its slices are not copied.)
		tabs := make([]kernelTab, min(max(h+1, 2*len(k.tabs)), maxTabH+1))
		copy(tabs, k.tabs)
		k.tabs = tabs
	}
	need := 4*h + 2 // w and wd
	if len(k.free) < need {
		k.free = make([]float64, max(need, 1024))
	}
	buf := k.free[:need:need]
	k.free = k.free[need:]
	t := &k.tabs[h]
	t.w, t.wd = buf[:2*h+1:2*h+1], buf[2*h+1:]
	d := float64(-h)
	for i := range t.w {
		w := tricube(math.Abs(d), float64(h))
		wd := w * d
		t.w[i], t.wd[i] = w, wd
		t.s0 += w
		t.sd += wd
		t.sdd += wd * d
		d++
	}
	return t
}
