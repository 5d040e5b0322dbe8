package reconcile

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// Forecasts reconciles one base forecast per node (in the structure's
// node order) and returns one coherent forecast per node, with a central
// interval at each level (percentages in (0, 100)). FromFits does the
// same starting from fitted models.
//
// Point forecasts are reconciled as by Reconcile. The distributions are
// reconciled as follows:
//
//   - When every base forecast carries sample paths (*almanac.Sample),
//     they are first made joint as spec.Draw says. By default
//     (JointBootstrap, or JointGaussian) each node's paths give the error
//     covariance of its own steps, and new joint paths for all nodes are
//     drawn from it with innovations that carry the cross-series
//     dependence of spec.Residuals (see Draw); spec.Paths sets their
//     number (default: as many as the base forecast with the most paths).
//     With IndependentPaths, path k of every node is taken as one joint
//     draw as given. Each joint draw is then reconciled by the same map
//     as the point forecasts, and the reconciled forecasts carry the
//     reconciled paths (Panagiotelis, Gamakumara, Athanasopoulos &
//     Hyndman 2023).
//   - When every base forecast is Gaussian (*almanac.Normal), the base
//     covariance at step t is Σ_t = D_t R D_t, with D_t the base
//     standard deviations and R the correlation matrix of the residual
//     covariance (the sample one for MethodMinTSample, the shrinkage one
//     otherwise); with IndependentPaths R is the identity. The reconciled
//     forecasts are Gaussian with covariance S G_t Σ_t G_t' S' (G_t the
//     map at step t).
//   - Otherwise the reconciled forecasts carry no distribution, and asking
//     for levels is an error wrapping almanac.ErrNoDistribution.
//
// Except with IndependentPaths, distributions therefore need
// spec.Residuals (an error wrapping almanac.ErrEmpty says so): without
// them nothing is known about how the nodes' errors move together, and
// treating them as independent makes the bands of totals too narrow.
//
// NonNegative works with sample paths (each path is projected) but not
// with Gaussian forecasts, whose non-negative reconciliation is not
// Gaussian (error wrapping almanac.ErrInvalid).
//
// Errors also wrap ErrDimension with almanac.ErrLength (wrong number of
// forecasts, different horizons, different path counts with
// IndependentPaths), almanac.ErrFrequency or almanac.ErrInvalid
// (different frequencies or start times, an unknown Draw, negative
// Paths), almanac.ErrLevel, almanac.ErrHorizon, almanac.ErrTooShort (fewer
// than 10 complete residual rows, or fewer than 2 complete paths of a
// node, for the joint draws), almanac.ErrNonFinite (an answer beyond the
// float64 range), and everything Reconcile returns.
func Forecasts(st Structure, fcs []almanac.Forecast, spec Spec, levels ...float64) ([]almanac.Forecast, error) {
	c, err := coreOf(st)
	if err != nil {
		return nil, err
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return nil, fmt.Errorf("reconcile: %w", err)
	}
	if err := checkDrawSpec(spec); err != nil {
		return nil, err
	}
	n := c.n()
	if len(fcs) != n {
		return nil, fmt.Errorf("reconcile: %w: %w: %d forecasts for %d nodes", ErrDimension, almanac.ErrLength, len(fcs), n)
	}
	h := len(fcs[0].Mean)
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("reconcile: %w", err)
	}
	base := mat.NewDense(h, n, nil)
	for i, f := range fcs {
		if len(f.Mean) != h {
			return nil, fmt.Errorf("reconcile: %w: %w: forecast of %q has %d steps, the first has %d", ErrDimension, almanac.ErrLength, c.names[i], len(f.Mean), h)
		}
		if !f.Freq.Equal(fcs[0].Freq) {
			return nil, fmt.Errorf("reconcile: %w: forecast of %q is %v, the first is %v", almanac.ErrFrequency, c.names[i], f.Freq, fcs[0].Freq)
		}
		if !f.Start.Equal(fcs[0].Start) {
			return nil, fmt.Errorf("reconcile: %w: forecast of %q starts at %v, the first at %v", almanac.ErrInvalid, c.names[i], f.Start, fcs[0].Start)
		}
		base.SetCol(i, f.Mean)
	}
	y, err := baseRows(c, base)
	if err != nil {
		return nil, err
	}
	p, err := newPlan(st, spec, y)
	if err != nil {
		return nil, err
	}
	means, err := p.apply(y)
	if err != nil {
		return nil, err
	}
	dists, err := reconcileDists(p, spec, fcs, h)
	if err != nil {
		return nil, err
	}
	if dists == nil && len(levels) > 0 {
		return nil, fmt.Errorf("reconcile: %w: intervals need every base forecast to carry sample paths, or every one a Gaussian distribution", almanac.ErrNoDistribution)
	}
	out := make([]almanac.Forecast, n)
	for i := range out {
		mean := mat.Col(nil, i, means)
		var d almanac.Distribution
		if dists != nil {
			d = dists[i]
		}
		out[i], err = almanac.NewForecast(fcs[i].Start, fcs[i].Freq, mean, d, levels...)
		if err != nil {
			return nil, fmt.Errorf("reconcile: %w", err)
		}
		if err := checkBounds(out[i], c.names[i]); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// checkBounds returns an error wrapping almanac.ErrNonFinite when an
// interval bound of f is not a finite number (a band reaching beyond the
// float64 range).
func checkBounds(f almanac.Forecast, node string) error {
	for _, iv := range f.Intervals {
		for t := range iv.Lower {
			if lo, hi := iv.Lower[t], iv.Upper[t]; math.IsInf(lo, 0) || math.IsNaN(lo) || math.IsInf(hi, 0) || math.IsNaN(hi) {
				return fmt.Errorf("reconcile: %w: the %v%% band of node %q at step %d is [%v, %v], beyond the float64 range", almanac.ErrNonFinite, iv.Level, node, t+1, lo, hi)
			}
		}
	}
	return nil
}

// reconcileDists returns one reconciled distribution per node, or nil
// when the base distributions are not all of one supported kind.
func reconcileDists(p *plan, spec Spec, fcs []almanac.Forecast, h int) ([]almanac.Distribution, error) {
	var samples []*almanac.Sample
	var normals []*almanac.Normal
	for _, f := range fcs {
		switch d := f.Dist.(type) {
		case *almanac.Sample:
			if d != nil {
				samples = append(samples, d)
			}
		case *almanac.Normal:
			if d != nil {
				normals = append(normals, d)
			}
		}
	}
	switch {
	case len(samples) == len(fcs):
		paths := make([][][]float64, len(samples))
		for i, s := range samples {
			paths[i] = s.Paths
		}
		if spec.Draw != IndependentPaths {
			means := make([][]float64, len(fcs))
			for i, f := range fcs {
				means[i] = f.Mean
			}
			joint, err := jointPaths(p.c, p.method, means, paths, spec, h)
			if err != nil {
				return nil, err
			}
			paths = joint
		}
		return reconcileSamples(p, paths, h)
	case len(normals) == len(fcs):
		if spec.NonNegative {
			return nil, fmt.Errorf("reconcile: %w: non-negative reconciliation of Gaussian forecasts is not Gaussian; give sample paths instead", almanac.ErrInvalid)
		}
		return reconcileNormals(p, spec, normals, h)
	}
	return nil, nil
}

// reconcileSamples reconciles path k of every node as one joint draw
// (paths[node][k][step]).
func reconcileSamples(p *plan, given [][][]float64, h int) ([]almanac.Distribution, error) {
	c := p.c
	n := c.n()
	np := len(given[0])
	if np == 0 {
		return nil, fmt.Errorf("reconcile: %w: the sample of %q has no paths", almanac.ErrEmpty, c.names[0])
	}
	for i, s := range given {
		if len(s) != np {
			return nil, fmt.Errorf("reconcile: %w: %w: %q has %d sample paths, %q has %d", ErrDimension, almanac.ErrLength, c.names[i], len(s), c.names[0], np)
		}
		for k, path := range s {
			if len(path) < h {
				return nil, fmt.Errorf("reconcile: %w: %w: path %d of %q has %d steps, need %d", ErrDimension, almanac.ErrLength, k, c.names[i], len(path), h)
			}
		}
	}
	paths := make([][][]float64, n) // paths[node][k][t]
	for i := range paths {
		flat := make([]float64, np*h)
		paths[i] = make([][]float64, np)
		for k := range paths[i] {
			paths[i][k] = flat[k*h : (k+1)*h : (k+1)*h]
		}
	}
	y := make([]float64, n)
	rec := make([]float64, n)
	w := p.newWork()
	for k := 0; k < np; k++ {
		for t := 0; t < h; t++ {
			for i, s := range given {
				v := s[k][t]
				if err := finite(c, "sample path value", v, t, i); err != nil {
					return nil, err
				}
				y[i] = v
			}
			bad, err := p.rowTo(rec, y, t, w)
			if err != nil {
				return nil, err
			}
			if bad >= 0 {
				return nil, notRepresentable(fmt.Sprintf("reconciled sample path %d", k), c.names[bad], t)
			}
			for i, v := range rec {
				paths[i][k][t] = v
			}
		}
	}
	out := make([]almanac.Distribution, n)
	for i := range out {
		out[i] = &almanac.Sample{Paths: paths[i]}
	}
	return out, nil
}

func reconcileNormals(p *plan, spec Spec, normals []*almanac.Normal, h int) ([]almanac.Distribution, error) {
	c := p.c
	n := c.n()
	for i, d := range normals {
		if len(d.Mean) < h || len(d.SD) < h {
			return nil, fmt.Errorf("reconcile: %w: %w: the distribution of %q has fewer than %d steps", ErrDimension, almanac.ErrLength, c.names[i], h)
		}
		for t := 0; t < h; t++ {
			if sd := d.SD[t]; !(sd >= 0) || math.IsInf(sd, 0) {
				return nil, fmt.Errorf("reconcile: %w: standard deviation %v of %q at step %d", almanac.ErrNonFinite, sd, c.names[i], t+1)
			}
		}
	}
	// Correlation of the base forecast errors: R = (1 − λ) Z'Z/T + λ I,
	// Z the residuals standardised by √W1_ii (λ = 0 for the sample
	// covariance). Kept in this factored form, so a variance costs O(nT)
	// rather than O(n²).
	var zt *mat.Dense // n × T
	var lambda float64
	if spec.Draw != IndependentPaths {
		if absent(spec.Residuals) {
			return nil, fmt.Errorf("reconcile: %w: the correlation of Gaussian base forecasts comes from the in-sample residuals of every node (Spec.Residuals, e.g. from ResidualMatrix); Draw: IndependentPaths treats them as independent", almanac.ErrEmpty)
		}
		kind := Shrinkage
		if p.method == MethodMinTSample {
			kind = SampleCovariance
		}
		est, err := estimateCov(c, spec.Residuals, kind)
		if err != nil {
			return nil, err
		}
		rows := est.rows // in the unit of est.W
		lambda = est.Lambda
		zt = mat.NewDense(n, len(rows), nil)
		for k := 0; k < n; k++ {
			sd := math.Sqrt(est.W.At(k, k))
			row := zt.RawRowView(k)
			for t, r := range rows {
				row[t] = r[k] / sd
			}
		}
	}
	means := make([][]float64, n)
	sds := make([][]float64, n)
	for i := range means {
		means[i] = make([]float64, h)
		sds[i] = make([]float64, h)
	}
	y := make([]float64, n)
	rec := make([]float64, n)
	sd := make([]float64, n)
	w := p.newWork()
	var sg0 *mat.Dense
	var sg mat.Dense
	for t := 0; t < h; t++ {
		for i, d := range normals {
			y[i] = d.Mean[t]
			sd[i] = d.SD[t]
		}
		bad, err := p.rowTo(rec, y, t, w)
		if err != nil {
			return nil, err
		}
		if bad >= 0 {
			return nil, notRepresentable("reconciled mean", c.names[bad], t)
		}
		// M = S G_t D_t; variance of node i = m_i R m_i'. The standard
		// deviations are divided by a power of two 2^e (scale.go) so that
		// their squares cannot overflow.
		if t == 0 || p.split != nil && !p.split.fixed {
			sg0 = sumRows(c, p.gAt(t))
		}
		e := expOf(sd)
		scaleInto(sd, sd, e)
		sg.CloneFrom(sg0)
		for i := 0; i < n; i++ {
			row := sg.RawRowView(i)
			for k := range row {
				row[k] *= sd[k]
			}
		}
		for i := 0; i < n; i++ {
			means[i][t] = rec[i]
		}
		for i := 0; i < n; i++ {
			var v float64
			for _, x := range sg.RawRowView(i) {
				v += x * x
			}
			sds[i][t] = v
		}
		if zt != nil {
			a := mulSerial(&sg, zt)
			_, T := zt.Dims()
			for i := 0; i < n; i++ {
				var v float64
				for _, x := range a.RawRowView(i) {
					v += x * x
				}
				sds[i][t] = lambda*sds[i][t] + (1-lambda)*v/float64(T)
			}
		}
		for i := 0; i < n; i++ {
			v := math.Ldexp(math.Sqrt(max(sds[i][t], 0)), e)
			if math.IsInf(v, 0) {
				return nil, notRepresentable("reconciled standard deviation", c.names[i], t)
			}
			sds[i][t] = v
		}
	}
	out := make([]almanac.Distribution, n)
	for i := range out {
		out[i] = &almanac.Normal{Mean: means[i], SD: sds[i]}
	}
	return out, nil
}
