// Package combine is a stand-in for the root package's model combination
// while it is being written: the equal-weight mean of several models'
// forecasts, with bands from the members' pooled sample paths. The
// automatic forecaster in package accuracy and the evaluation program use
// it through one call (Mean.Fit), so the root combination can replace it
// without touching their routes.
//
// # Method
//
// Every member is fitted to the series; a member that fails is left out
// and recorded, and the fit fails only when every member fails. The point
// forecast is the mean of the members' point forecasts (Stock & Watson
// 2004 and the M3 and M4 competitions found the plain mean hard to beat;
// common practice). The forecast distribution is the equal-weight mixture
// of the members' distributions, drawn as Paths sample paths shared out
// among the members that simulate (almanac.Simulator), so its spread
// covers the members' own uncertainty and their disagreement. When no
// member simulates, the distribution is normal with the mean of the
// members' standard deviations (taken from their 80% bands).
//
// # Concurrency
//
// Mean is a specification, safe to share; a fitted combination is
// read-only. Members are fitted one after another on the calling
// goroutine.
package combine

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/stat/distuv"
)

// Member is a model taking part in a combination.
type Member struct {
	Name  string
	Model almanac.Model
}

// Mean combines its members' forecasts by their equal-weight mean.
type Mean struct {
	Members []Member
	// Paths is the number of sample paths behind the bands; 0 means 1000.
	Paths int
	// Seed seeds the paths drawn for Forecast.
	Seed uint64
}

// Failure is a member left out of a combination.
type Failure struct {
	Name string
	Err  error
}

// Fit is a fitted combination.
type Fit struct {
	y       almanac.Series
	names   []string
	fits    []almanac.Fitted
	failed  []Failure
	paths   int
	seed    uint64
	fitted  []float64
	resid   []float64
	members string
}

var (
	_ almanac.Model     = Mean{}
	_ almanac.Simulator = (*Fit)(nil)
)

// Fit fits every member to y.
func (c Mean) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	return c.FitMembers(ctx, y)
}

// FitMembers is Fit with the concrete result type.
func (c Mean) FitMembers(ctx context.Context, y almanac.Series) (*Fit, error) {
	if len(c.Members) == 0 {
		return nil, fmt.Errorf("combine: %w: no members", almanac.ErrInvalid)
	}
	if c.Paths < 0 {
		return nil, fmt.Errorf("combine: %w: %d paths", almanac.ErrInvalid, c.Paths)
	}
	f := &Fit{y: y, paths: c.Paths, seed: c.Seed}
	if f.paths == 0 {
		f.paths = 1000
	}
	var errs []error
	for _, m := range c.Members {
		if m.Model == nil {
			return nil, fmt.Errorf("combine: %w: member %q has no model", almanac.ErrInvalid, m.Name)
		}
		fit, err := fitSafely(ctx, m.Model, y)
		if err != nil {
			if ctx.Err() != nil {
				return nil, ctx.Err()
			}
			f.failed = append(f.failed, Failure{Name: m.Name, Err: err})
			errs = append(errs, fmt.Errorf("%s: %w", m.Name, err))
			continue
		}
		f.names = append(f.names, m.Name)
		f.fits = append(f.fits, fit)
	}
	if len(f.fits) == 0 {
		return nil, fmt.Errorf("combine: every member failed: %w", errors.Join(errs...))
	}
	n := y.Len()
	f.fitted = make([]float64, n)
	f.resid = make([]float64, n)
	vals := make([][]float64, len(f.fits))
	for k, fit := range f.fits {
		vals[k] = fit.FittedValues()
	}
	for t := range n {
		s, ok := 0.0, true
		for k := range vals {
			if t >= len(vals[k]) || math.IsNaN(vals[k][t]) {
				ok = false
				break
			}
			s += vals[k][t]
		}
		if ok {
			f.fitted[t] = s / float64(len(vals))
			f.resid[t] = y.Values[t] - f.fitted[t]
		} else {
			f.fitted[t], f.resid[t] = math.NaN(), math.NaN()
		}
	}
	var sb strings.Builder
	sb.WriteString("mean(")
	for k, fit := range f.fits {
		if k > 0 {
			sb.WriteString(", ")
		}
		sb.WriteString(fit.String())
	}
	sb.WriteString(")")
	f.members = sb.String()
	return f, nil
}

func fitSafely(ctx context.Context, m almanac.Model, y almanac.Series) (fit almanac.Fitted, err error) {
	defer func() {
		if r := recover(); r != nil {
			fit, err = nil, fmt.Errorf("%w: panic: %v", almanac.ErrNotFitted, r)
		}
	}()
	fit, err = m.Fit(ctx, y)
	if err == nil && fit == nil {
		err = fmt.Errorf("%w: no fit and no error", almanac.ErrNotFitted)
	}
	return fit, err
}

// Members returns the fitted members and their names.
func (f *Fit) Members() ([]string, []almanac.Fitted) { return f.names, f.fits }

// Failed returns the members left out.
func (f *Fit) Failed() []Failure { return f.failed }

// String lists the members, e.g. "mean(ETS(A,Ad,N), ARIMA(0,1,1), Theta)".
func (f *Fit) String() string { return f.members }

// FittedValues returns the mean of the members' fitted values (NaN where
// any is NaN).
func (f *Fit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

// Residuals returns y − FittedValues.
func (f *Fit) Residuals() []float64 { return append([]float64(nil), f.resid...) }

// Forecast returns the mean of the members' forecasts with bands from
// the mixture of their distributions.
func (f *Fit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("combine: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("combine: %w", err)
	}
	mean := make([]float64, h)
	for k, fit := range f.fits {
		fc, err := fit.Forecast(h)
		if err != nil {
			return almanac.Forecast{}, fmt.Errorf("combine: member %s: %w", f.names[k], err)
		}
		if len(fc.Mean) != h {
			return almanac.Forecast{}, fmt.Errorf("combine: member %s: %w: %d forecasts for %d steps", f.names[k], almanac.ErrLength, len(fc.Mean), h)
		}
		for j, v := range fc.Mean {
			mean[j] += v / float64(len(f.fits))
		}
	}
	start := f.y.Time(f.y.Len())
	if len(levels) == 0 {
		return almanac.NewForecast(start, f.y.Freq, mean, nil)
	}
	var dist almanac.Distribution
	if paths, err := f.Simulate(h, f.paths, rand.NewPCG(f.seed, 0x5bd1e995)); err == nil {
		dist = &almanac.Sample{Paths: paths}
	} else {
		// Normal with the mean of the members' standard deviations,
		// read off their 80% bands.
		z := distuv.UnitNormal.Quantile(0.9)
		sd := make([]float64, h)
		for k, fit := range f.fits {
			fc, err := fit.Forecast(h, 80)
			if err != nil {
				return almanac.Forecast{}, fmt.Errorf("combine: %w: member %s gives no bands: %w", almanac.ErrNoDistribution, f.names[k], err)
			}
			for j := range sd {
				sd[j] += (fc.Intervals[0].Upper[j] - fc.Intervals[0].Lower[j]) / (2 * z) / float64(len(f.fits))
			}
		}
		dist = &almanac.Normal{Mean: mean, SD: sd}
	}
	fc, err := almanac.NewForecast(start, f.y.Freq, mean, dist, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("combine: %w", err)
	}
	return fc, nil
}

// Simulate draws n paths from the equal-weight mixture of the members
// that simulate: member k (in order) gives ⌊n/K⌋ paths, the first n mod K
// one more. It fails with almanac.ErrNoDistribution when no member
// simulates.
func (f *Fit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("combine: %w", err)
	}
	if n < 1 || src == nil {
		return nil, fmt.Errorf("combine: %w: %d paths or no source", almanac.ErrInvalid, n)
	}
	var sims []almanac.Simulator
	for _, fit := range f.fits {
		if s, ok := fit.(almanac.Simulator); ok {
			sims = append(sims, s)
		}
	}
	if len(sims) == 0 {
		return nil, fmt.Errorf("combine: %w: no member simulates", almanac.ErrNoDistribution)
	}
	out := make([][]float64, 0, n)
	for k, s := range sims {
		m := n / len(sims)
		if k < n%len(sims) {
			m++
		}
		if m == 0 {
			continue
		}
		p, err := s.Simulate(h, m, src)
		if err != nil {
			return nil, fmt.Errorf("combine: %w", err)
		}
		out = append(out, p...)
	}
	return out, nil
}
