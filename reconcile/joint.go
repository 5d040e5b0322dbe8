package reconcile

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// Draw chooses how the forecast errors of the nodes are tied together when
// distributions are reconciled. Totals are sums, so their spread depends
// on how their parts' errors move together: related products and regions
// usually err in the same direction.
type Draw int

const (
	// DrawAuto is the default: JointBootstrap.
	DrawAuto Draw = iota
	// JointBootstrap makes joint sample paths for the whole structure.
	// Each node keeps the error structure of its own model over the
	// horizon (the variances of its steps and their covariances, from its
	// own sample paths); the nodes are tied together by resampling whole
	// time points of the in-sample residuals: all nodes' residuals at one
	// time point, drawn at random, drive the same step of one joint path
	// (Panagiotelis, Gamakumara, Athanasopoulos & Hyndman 2023). The
	// paths then carry the residuals' cross-series correlation, including
	// any skew or heavy tails they share. Needs Spec.Residuals with at
	// least 10 time points at which every node has one. A node whose
	// residuals do not vary there (a series constant so far) is drawn
	// independently of the others, with standard normal innovations.
	JointBootstrap
	// JointGaussian is JointBootstrap with Gaussian draws in place of the
	// resampled time points: their correlation is that of the covariance
	// the reconciliation estimates from the residuals (the sample
	// covariance for MethodMinTSample, the shrinkage estimate otherwise),
	// so it is smoother than the bootstrap when there are few time points.
	// No node's residuals may be all zero (else ErrSingular).
	JointGaussian
	// IndependentPaths ties nothing together: FromFits draws each node's
	// paths from its own model on a random stream of its own, so the
	// nodes' errors are independent, and Forecasts takes path k of every
	// node as one joint draw as given (right only for paths that are
	// joint already). Gaussian base forecasts are then treated as
	// independent too. Independent errors make the band of every
	// aggregate too narrow whenever the errors of its parts are
	// positively correlated: for two parts with equal variance and
	// correlation ρ, the variance of their total is understated by the
	// factor 1 + ρ (half of it when they move together), and the more
	// parts, the worse. Use it only for paths that are already joint, or
	// to see the effect.
	IndependentPaths
)

var drawNames = [...]string{"auto", "joint bootstrap", "joint Gaussian", "independent paths"}

// String returns "auto", "joint bootstrap", "joint Gaussian" or
// "independent paths", or "Draw(n)" for other values.
func (d Draw) String() string {
	if d >= 0 && int(d) < len(drawNames) {
		return drawNames[d]
	}
	return fmt.Sprintf("Draw(%d)", int(d))
}

const (
	// defaultPaths is the number of sample paths FromFits draws per node
	// when Spec.Paths is 0.
	defaultPaths = 1000
	// minJointRows is the fewest common residual time points the joint
	// draws accept: with fewer the resampled cross-series dependence rests
	// on too few observations (our choice, stated in the docs).
	minJointRows = 10
)

// FromFits forecasts h steps from one fitted model per node (in the
// structure's node order) and reconciles the forecasts with their
// distributions, in one call: it draws Spec.Paths sample paths per node
// (1000 by default) from each model's almanac.Simulator (or takes the
// paths of its forecast when it has no simulator), ties the nodes together
// as Spec.Draw says — by default joint paths from the models' in-sample
// residuals (JointBootstrap) — and passes the forecasts to Forecasts with
// spec. The result is one forecast per node with reconciled sample paths
// and an interval for each level.
//
// When Spec.Residuals is nil the residuals are the fits' own, on the
// data's scale (ResidualMatrix), so the default method is MinT with the
// shrinkage covariance. The fits must be of series covering the same time
// points: their residuals are matched row by row, and their forecasts must
// start at the same time.
//
// The random streams are seeded from Spec.Seed: the same fits and Spec
// give bit-identical forecasts. FromFits starts no goroutines; it checks
// ctx between nodes and returns ctx.Err() when it is cancelled.
//
// Errors wrap ErrDimension with almanac.ErrLength (not one fit per node,
// residual series of different lengths), almanac.ErrInvalid (a nil fit,
// negative Spec.Paths, an unknown Draw), almanac.ErrNoDistribution (a
// model that can neither simulate nor give sample paths), the model's own
// forecasting and simulation errors (wrapped with the node's name),
// almanac.ErrTooShort (fewer than 10 time points at which every node has
// a residual, for the joint draws), and everything Forecasts returns.
func FromFits(ctx context.Context, st Structure, fits []almanac.Fitted, h int, spec Spec, levels ...float64) ([]almanac.Forecast, error) {
	c, err := coreOf(st)
	if err != nil {
		return nil, err
	}
	n := c.n()
	if len(fits) != n {
		return nil, fmt.Errorf("reconcile: %w: %w: %d fitted models for %d nodes", ErrDimension, almanac.ErrLength, len(fits), n)
	}
	for i, f := range fits {
		if f == nil {
			return nil, fmt.Errorf("reconcile: %w: the fitted model of node %q is nil", almanac.ErrInvalid, c.names[i])
		}
	}
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("reconcile: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return nil, fmt.Errorf("reconcile: %w", err)
	}
	if err := checkDrawSpec(spec); err != nil {
		return nil, err
	}
	np := spec.Paths
	if np == 0 {
		np = defaultPaths
	}
	if absent(spec.Residuals) {
		r, err := ResidualMatrix(st, fits)
		if err != nil {
			return nil, err
		}
		spec.Residuals = r
	}
	fcs := make([]almanac.Forecast, n)
	for i, f := range fits {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		point, err := f.Forecast(h)
		if err != nil {
			return nil, fmt.Errorf("reconcile: forecast of node %q (%s): %w", c.names[i], f, err)
		}
		var paths [][]float64
		if sim, ok := f.(almanac.Simulator); ok {
			paths, err = sim.Simulate(h, np, rand.NewPCG(spec.Seed, uint64(i)+1))
			if err != nil {
				return nil, fmt.Errorf("reconcile: sample paths of node %q (%s): %w", c.names[i], f, err)
			}
		} else if paths = point.SamplePaths(); paths == nil {
			return nil, fmt.Errorf("reconcile: %w: the model of node %q (%s) can neither simulate (almanac.Simulator) nor give sample paths", almanac.ErrNoDistribution, c.names[i], f)
		}
		fcs[i], err = almanac.NewForecast(point.Start, point.Freq, point.Mean, &almanac.Sample{Paths: paths})
		if err != nil {
			return nil, fmt.Errorf("reconcile: node %q (%s): %w", c.names[i], f, err)
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return Forecasts(st, fcs, spec, levels...)
}

// FromBatch is FromFits for the results of almanac.BatchFit, one per node
// in the structure's node order (their keys are not consulted). A result
// that failed is an error wrapping almanac.ErrNotFitted and the result's
// own error, naming the node, since a structure cannot be reconciled with
// a node missing.
func FromBatch(ctx context.Context, st Structure, results []almanac.BatchResult, h int, spec Spec, levels ...float64) ([]almanac.Forecast, error) {
	c, err := coreOf(st)
	if err != nil {
		return nil, err
	}
	if len(results) != c.n() {
		return nil, fmt.Errorf("reconcile: %w: %w: %d batch results for %d nodes", ErrDimension, almanac.ErrLength, len(results), c.n())
	}
	fits := make([]almanac.Fitted, len(results))
	for i, r := range results {
		switch {
		case r.Err != nil:
			return nil, fmt.Errorf("reconcile: node %q (series %q): %w: %w", c.names[i], r.Key, almanac.ErrNotFitted, r.Err)
		case r.Fitted == nil:
			return nil, fmt.Errorf("reconcile: node %q (series %q): %w: no fitted model", c.names[i], r.Key, almanac.ErrNotFitted)
		}
		fits[i] = r.Fitted
	}
	return FromFits(ctx, st, fits, h, spec, levels...)
}

func checkDrawSpec(spec Spec) error {
	if spec.Draw < DrawAuto || spec.Draw > IndependentPaths {
		return fmt.Errorf("reconcile: %w: unknown draw %v", almanac.ErrInvalid, spec.Draw)
	}
	if spec.Paths < 0 {
		return fmt.Errorf("reconcile: %w: %d sample paths", almanac.ErrInvalid, spec.Paths)
	}
	return nil
}

// jointPaths returns joint base sample paths, paths[node][k][step], for
// every node: path k of node i is
//
//	ŷ_i + L_i z_i^(k),
//
// where ŷ_i is the node's point forecast, L_i the lower-triangular
// (causal) Cholesky factor of the h × h covariance of the node's own
// sample paths, and z^(k) an h × n array of innovations whose rows (one
// per step, drawn independently) carry the cross-series dependence: a
// residual time point resampled at random and standardised node by node
// (JointBootstrap), or a Gaussian vector with the correlation of the
// reconciliation's covariance estimate (JointGaussian).
//
// For a linear model with Gaussian errors, L_i = σ_i Ψ_i with Ψ_i the
// model's lower-triangular matrix of impulse responses, so the paths have
// exactly the model's h-step covariance, and node i's innovation at step s
// is correlated with node j's at the same step only — as in the models
// themselves.
func jointPaths(c *core, method Method, means [][]float64, samples [][][]float64, spec Spec, h int) ([][][]float64, error) {
	n := c.n()
	if absent(spec.Residuals) {
		return nil, fmt.Errorf("reconcile: %w: joint sample paths need the in-sample residuals of every node (Spec.Residuals, e.g. from ResidualMatrix) to tie the nodes together; Draw: IndependentPaths reconciles the paths as given", almanac.ErrEmpty)
	}
	rows, err := completeRows(c, spec.Residuals, "residuals")
	if err != nil {
		return nil, err
	}
	T := len(rows)
	if T < minJointRows {
		return nil, fmt.Errorf("reconcile: %w: joint sample paths need at least %d time points at which every node has a residual, have %d", almanac.ErrTooShort, minJointRows, T)
	}
	np := spec.Paths
	if np == 0 {
		for _, s := range samples {
			np = max(np, len(s))
		}
	}
	rng := rand.New(rand.NewPCG(spec.Seed, 0))
	// The innovations: node i's at step s of path k is
	// zb[idx[k·h+s]][i] (bootstrap) or zg[(k·h+s)·n+i] (Gaussian).
	var zb [][]float64
	var idx []int
	var zg []float64
	constant := make([]bool, n)
	switch spec.Draw {
	case DrawAuto, JointBootstrap:
		zb = standardised(c, rows, constant)
		idx = make([]int, np*h)
		for j := range idx {
			idx[j] = rng.IntN(T)
		}
	case JointGaussian:
		kind := Shrinkage
		if method == MethodMinTSample {
			kind = SampleCovariance
		}
		if zg, err = gaussianInnovations(c, spec.Residuals, kind, np*h, rng); err != nil {
			return nil, err
		}
	default:
		return nil, fmt.Errorf("reconcile: %w: unknown draw %v", almanac.ErrInvalid, spec.Draw)
	}
	out := make([][][]float64, n)
	zi := make([]float64, h)
	for i := range out {
		l, e, err := pathFactor(samples[i], h)
		if err != nil {
			return nil, fmt.Errorf("reconcile: node %q: %w", c.names[i], err)
		}
		flat := make([]float64, np*h)
		out[i] = make([][]float64, np)
		for k := range out[i] {
			for s := range zi {
				switch {
				case zg != nil:
					zi[s] = zg[(k*h+s)*n+i]
				case constant[i]:
					// Independent of the other nodes: nothing in the
					// residuals ties this node to them.
					zi[s] = rng.NormFloat64()
				default:
					zi[s] = zb[idx[k*h+s]][i]
				}
			}
			path := flat[k*h : (k+1)*h : (k+1)*h]
			for t := range path {
				var v float64
				for s, a := range l[t*h : t*h+t+1] {
					v += a * zi[s]
				}
				x := means[i][t] + math.Ldexp(v, e)
				if math.IsInf(x, 0) || math.IsNaN(x) {
					return nil, fmt.Errorf("reconcile: %w: joint sample path %d of node %q at step %d is beyond the float64 range", almanac.ErrNonFinite, k, c.names[i], t+1)
				}
				path[t] = x
			}
			out[i][k] = path
		}
	}
	return out, nil
}

// standardised returns the complete residual rows with every node's
// column centred and divided by its standard deviation (denominator T, so
// that resampling the rows gives innovations of mean 0 and variance 1
// exactly). Each column is first divided by a power of two of its own
// (scale.go), so residuals near the float64 limit cannot overflow. A
// column that does not vary is marked in constant (and left zero).
func standardised(c *core, rows [][]float64, constant []bool) [][]float64 {
	n, T := c.n(), len(rows)
	out := make([][]float64, T)
	for t := range out {
		out[t] = make([]float64, n)
	}
	col := make([]float64, T)
	for i := 0; i < n; i++ {
		for t, r := range rows {
			col[t] = r[i]
		}
		scaleInto(col, col, expOf(col))
		var mean float64
		for _, v := range col {
			mean += v
		}
		mean /= float64(T)
		var ss float64
		for _, v := range col {
			ss += (v - mean) * (v - mean)
		}
		sd := math.Sqrt(ss / float64(T))
		if !(sd > 0) {
			// Residuals that do not vary (a series constant so far, such
			// as a discontinued item's zeros) say nothing about how the
			// node moves with the others.
			constant[i] = true
			continue
		}
		for t, v := range col {
			out[t][i] = (v - mean) / sd
		}
	}
	return out
}

// gaussianInnovations returns count Gaussian vectors of length n (flat,
// vector j at [j·n, (j+1)·n)) with the correlation R of the covariance
// estimate of the given kind: R = (1 − λ) Z'Z/T + λ I with Z the
// residuals divided by √W1_ii. With few residual rows (T ≤ n/2) they are
// drawn in that factored form, √((1 − λ)/T) Z'u + √λ v with u, v
// standard normal, at O(nT) per vector; otherwise as L g with L the
// (semi-definite) Cholesky factor of R and g standard normal, at O(n²/2)
// per vector.
func gaussianInnovations(c *core, residuals mat.Matrix, kind Covariance, count int, rng *rand.Rand) ([]float64, error) {
	est, err := estimateCov(c, residuals, kind)
	if err != nil {
		return nil, err
	}
	n, T := c.n(), len(est.rows)
	zt := make([]float64, n*T) // zt[i*T+t]
	for i := 0; i < n; i++ {
		sd := math.Sqrt(est.W.At(i, i))
		for t, r := range est.rows {
			zt[i*T+t] = r[i] / sd
		}
	}
	out := make([]float64, count*n)
	if 2*T <= n {
		a, b := math.Sqrt((1-est.Lambda)/float64(T)), math.Sqrt(est.Lambda)
		u := make([]float64, T)
		for j := 0; j < count; j++ {
			for t := range u {
				u[t] = rng.NormFloat64()
			}
			dst := out[j*n : (j+1)*n]
			for i := range dst {
				var s float64
				for t, x := range zt[i*T : (i+1)*T] {
					s += x * u[t]
				}
				dst[i] = a*s + b*rng.NormFloat64()
			}
		}
		return out, nil
	}
	r := make([]float64, n*n) // lower triangle of R, row major
	for i := 0; i < n; i++ {
		zi := zt[i*T : (i+1)*T]
		for k := 0; k < i; k++ {
			var s float64
			for t, x := range zt[k*T : (k+1)*T] {
				s += zi[t] * x
			}
			r[i*n+k] = (1 - est.Lambda) * s / float64(T)
		}
		r[i*n+i] = 1
	}
	l := cholSemidefinite(r, n)
	g := make([]float64, n)
	for j := 0; j < count; j++ {
		for i := range g {
			g[i] = rng.NormFloat64()
		}
		dst := out[j*n : (j+1)*n]
		for i := range dst {
			var s float64
			for k, x := range l[i*n : i*n+i+1] {
				s += x * g[k]
			}
			dst[i] = s
		}
	}
	return out, nil
}

// pathFactor returns the lower-triangular Cholesky factor L (h × h, row
// major) of the covariance of the complete sample paths given (those with
// no NaN in the first h steps), in the unit 2^e: the covariance is
// L L'·2^(2e). Paths are divided by a power of two first (scale.go). A
// positive semi-definite covariance (a step without spread, or one that
// follows from the steps before it) gets zero columns where its pivots
// vanish.
func pathFactor(paths [][]float64, h int) (l []float64, e int, err error) {
	var ok [][]float64
	var m float64
	for k, p := range paths {
		if len(p) < h {
			return nil, 0, fmt.Errorf("%w: %w: sample path %d has %d steps, need %d", ErrDimension, almanac.ErrLength, k, len(p), h)
		}
		complete := true
		for _, v := range p[:h] {
			if math.IsInf(v, 0) {
				return nil, 0, fmt.Errorf("%w: sample path %d holds %v", almanac.ErrNonFinite, k, v)
			}
			if math.IsNaN(v) {
				complete = false
				break
			}
			m = max(m, math.Abs(v))
		}
		if complete {
			ok = append(ok, p[:h])
		}
	}
	N := len(ok)
	if N < 2 {
		return nil, 0, fmt.Errorf("%w: %d complete sample paths of %d steps; the joint draw needs at least 2 to measure the spread of the node's errors", almanac.ErrTooShort, N, h)
	}
	e = expOfMax(m)
	mean := make([]float64, h)
	x := make([]float64, N*h)
	for k, p := range ok {
		for t, v := range p {
			s := math.Ldexp(v, -e)
			x[k*h+t] = s
			mean[t] += s
		}
	}
	for t := range mean {
		mean[t] /= float64(N)
	}
	for k := 0; k < N; k++ {
		row := x[k*h : (k+1)*h]
		for t := range row {
			row[t] -= mean[t]
		}
	}
	cov := make([]float64, h*h) // lower triangle, row major
	for k := 0; k < N; k++ {
		row := x[k*h : (k+1)*h]
		for t := 0; t < h; t++ {
			if row[t] == 0 {
				continue
			}
			ct := cov[t*h : t*h+t+1]
			for s := range ct {
				ct[s] += row[t] * row[s]
			}
		}
	}
	for j := range cov {
		cov[j] /= float64(N - 1)
	}
	return cholSemidefinite(cov, h), e, nil
}

// cholSemidefinite returns the lower-triangular factor L of the positive
// semi-definite h × h matrix whose lower triangle a holds (row major):
// the usual Cholesky recursion, with a pivot not above 1e-12 times its
// diagonal entry taken as zero and its column set to zero (common
// practice for semi-definite matrices).
func cholSemidefinite(a []float64, h int) []float64 {
	l := make([]float64, h*h)
	for j := 0; j < h; j++ {
		d := a[j*h+j]
		for k := 0; k < j; k++ {
			d -= l[j*h+k] * l[j*h+k]
		}
		if !(d > 1e-12*a[j*h+j]) {
			continue // column j stays zero
		}
		ljj := math.Sqrt(d)
		l[j*h+j] = ljj
		for i := j + 1; i < h; i++ {
			v := a[i*h+j]
			for k := 0; k < j; k++ {
				v -= l[i*h+k] * l[j*h+k]
			}
			l[i*h+j] = v / ljj
		}
	}
	return l
}
