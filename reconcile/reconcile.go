package reconcile

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// Method is a reconciliation method.
type Method int

const (
	// MethodAuto is the default: MethodMinTShrink when Spec.Residuals is
	// set, MethodWLSStructural otherwise (a nil matrix, including a typed
	// nil such as (*mat.Dense)(nil), is not set).
	MethodAuto Method = iota
	// MethodBottomUp keeps the bottom-level base forecasts and adds them
	// up.
	MethodBottomUp
	// MethodTopDown splits the top-level base forecast among the bottom
	// series (Spec.Disaggregation); hierarchies only.
	MethodTopDown
	// MethodMiddleOut keeps the base forecasts at Spec.Level, splits them
	// downwards (Spec.Disaggregation) and adds them up above;
	// hierarchies only.
	MethodMiddleOut
	// MethodOLS is the projection with W = I (Hyndman, Ahmed,
	// Athanasopoulos & Shang 2011).
	MethodOLS
	// MethodWLSStructural is the projection with W = diag(S 1), the
	// number of bottom series under each node (Athanasopoulos, Hyndman,
	// Kourentzes & Petropoulos 2017).
	MethodWLSStructural
	// MethodWLSVariance is the projection with W = diag(W1), the
	// residual variances (Spec.Residuals required).
	MethodWLSVariance
	// MethodMinTSample is MinT with the sample covariance W1 of the
	// residuals (Wickramasuriya, Athanasopoulos & Hyndman 2019).
	MethodMinTSample
	// MethodMinTShrink is MinT with the shrinkage covariance (see
	// EstimateCovariance).
	MethodMinTShrink
)

var methodNames = [...]string{"auto", "bottom-up", "top-down", "middle-out", "OLS", "WLS (structural)", "WLS (variance)", "MinT (sample)", "MinT (shrinkage)"}

// String returns the method's name as used in messages ("bottom-up",
// "OLS", "MinT (shrinkage)", ...), or "Method(n)" for other values.
func (m Method) String() string {
	if m >= 0 && int(m) < len(methodNames) {
		return methodNames[m]
	}
	return fmt.Sprintf("Method(%d)", int(m))
}

// Spec is a reconciliation method with its inputs. The zero value is the
// automatic choice (MethodAuto): for example
//
//	reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid}
//	reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: 1}
//	reconcile.Spec{Residuals: resid, NonNegative: true}
//
// Matrices have one column per node, in the structure's node order.
type Spec struct {
	Method Method
	// Residuals are the in-sample one-step errors of the base models,
	// T × n; needed by MethodWLSVariance and the MinT methods. Rows with
	// a NaN are dropped.
	Residuals mat.Matrix
	// History is the observed data, T × n; needed by the historical
	// Disaggregation choices. Rows with a NaN are dropped.
	History mat.Matrix
	// Disaggregation is how MethodTopDown and MethodMiddleOut split
	// forecasts; the zero value means ForecastProportions.
	Disaggregation Disaggregation
	// Level is the level kept by MethodMiddleOut (0 = the top, which is
	// top-down). Other methods ignore it.
	Level int
	// NonNegative asks for non-negative bottom-level forecasts: the
	// minimiser of the method's weighted distance to the base forecasts
	// over the non-negative coherent forecasts (bottom-up and the
	// projection methods only).
	NonNegative bool

	// The fields below matter only where distributions are reconciled
	// (Forecasts, FromFits, FromBatch); Reconcile ignores them.

	// Draw is how the nodes' forecast errors are tied together; the zero
	// value is JointBootstrap, which needs Residuals. See Draw.
	Draw Draw
	// Paths is the number of joint sample paths to make: by default
	// 1000 in FromFits and FromBatch, and in Forecasts as many as the
	// base forecast with the most paths carries. Negative is invalid.
	// IndependentPaths in Forecasts keeps the paths given and ignores
	// Paths.
	Paths int
	// Seed seeds the random streams (math/rand/v2 PCG): the same Seed and
	// inputs give bit-identical paths. FromFits draws node i's paths with
	// rand.NewPCG(Seed, i+1) and ties the nodes together with
	// rand.NewPCG(Seed, 0).
	Seed uint64
}

// plan is a resolved Spec: the map from base forecasts to reconciled
// bottom-level forecasts.
type plan struct {
	c      *core
	method Method
	g      *mat.Dense // fixed linear map (m × n), or nil
	split  *splitMap  // top-down / middle-out, or nil
	nn     *nnSolver  // non-negative projection, or nil
	// bottomUp marks the bottom-up map (no matrix); clip its
	// non-negative version.
	bottomUp, clip bool
}

func newPlan(st Structure, spec Spec, y [][]float64) (*plan, error) {
	c, err := coreOf(st)
	if err != nil {
		return nil, err
	}
	method := spec.Method
	if method == MethodAuto {
		method = MethodWLSStructural
		if !absent(spec.Residuals) {
			method = MethodMinTShrink
		}
	}
	p := &plan{c: c, method: method}
	n := c.n()
	switch method {
	case MethodBottomUp:
		// No matrix: the bottom-level base forecasts are copied (and,
		// for NonNegative, clipped at zero: the nearest non-negative
		// point in the identity metric of the bottom level).
		p.bottomUp = true
		p.clip = spec.NonNegative
		return p, nil
	case MethodTopDown, MethodMiddleOut:
		if spec.NonNegative {
			return nil, fmt.Errorf("reconcile: %w: NonNegative applies to bottom-up and the projection methods, not %v", almanac.ErrInvalid, method)
		}
		level := 0
		if method == MethodMiddleOut {
			level = spec.Level
		}
		s, err := newSplitMap(c, level, spec.Disaggregation, spec.History, y)
		if err != nil {
			return nil, err
		}
		p.split = s
		return p, nil
	}
	var diag []float64
	var full mat.Symmetric
	switch method {
	case MethodOLS:
		diag = make([]float64, n)
		for i := range diag {
			diag[i] = 1
		}
	case MethodWLSStructural:
		diag = make([]float64, n)
		for i := range diag {
			diag[i] = float64(len(c.bottoms[i]))
		}
	case MethodWLSVariance, MethodMinTSample, MethodMinTShrink:
		kind := map[Method]Covariance{MethodWLSVariance: DiagonalVariance, MethodMinTSample: SampleCovariance, MethodMinTShrink: Shrinkage}[method]
		est, err := estimateCov(c, spec.Residuals, kind)
		if err != nil {
			return nil, err
		}
		if method == MethodWLSVariance {
			diag = make([]float64, n)
			for i := range diag {
				diag[i] = est.W.At(i, i)
			}
		} else {
			full = est.W
		}
	default:
		return nil, fmt.Errorf("reconcile: %w: unknown method %v", almanac.ErrInvalid, method)
	}
	w, err := newWeights(c, diag, full, method.String())
	if err != nil {
		return nil, err
	}
	gm, err := newGLSMap(c, w, spec.NonNegative, method.String())
	if err != nil {
		return nil, err
	}
	p.g = gm.g
	if spec.NonNegative {
		p.nn = newNNSolver(gm.q, gm.x)
	}
	return p, nil
}

// bottomsTo writes the reconciled bottom-level values for base vector y
// at step t into dst (length m).
func (p *plan) bottomsTo(dst, y []float64, t int) error {
	switch {
	case p.bottomUp:
		na := p.c.n() - p.c.m
		for j := range dst {
			v := y[na+j]
			if p.clip && v < 0 {
				v = 0
			}
			dst[j] = v
		}
		return nil
	case p.split != nil:
		coef := p.split.row(t)
		for j := range dst {
			dst[j] = coef[j] * y[p.split.src[j]]
		}
		return nil
	case p.nn != nil:
		p.linear(dst, y)
		neg := false
		for _, v := range dst {
			neg = neg || v < 0
		}
		if !neg {
			// The unconstrained optimum is feasible, hence optimal.
			return nil
		}
		return p.nn.solve(dst, y)
	}
	p.linear(dst, y)
	return nil
}

func (p *plan) linear(dst, y []float64) {
	m, n := p.g.Dims()
	for j := 0; j < m; j++ {
		row := p.g.RawRowView(j)
		var s float64
		for i := 0; i < n; i++ {
			s += row[i] * y[i]
		}
		dst[j] = s
	}
}

// gAt returns the linear map (m × n) applied at step t.
func (p *plan) gAt(t int) *mat.Dense {
	c := p.c
	if p.bottomUp {
		g := mat.NewDense(c.m, c.n(), nil)
		for j := 0; j < c.m; j++ {
			g.Set(j, c.bottomNode(j), 1)
		}
		return g
	}
	if p.split == nil {
		return p.g
	}
	g := mat.NewDense(c.m, c.n(), nil)
	coef := p.split.row(t)
	for j, a := range p.split.src {
		g.Set(j, a, coef[j])
	}
	return g
}

// rowWork is the workspace of rowTo.
type rowWork struct {
	y, b []float64
}

func (p *plan) newWork() *rowWork {
	return &rowWork{y: make([]float64, p.c.n()), b: make([]float64, p.c.m)}
}

// rowTo writes the reconciled values of the base vector y (length n) at
// step t into dst (length n). It works on y·2^(−e), e the exponent of
// max |y|, and multiplies the result back (see scale.go), so only a
// result beyond the float64 range fails: then bad is that node and err
// nil, for the caller to describe.
func (p *plan) rowTo(dst, y []float64, t int, w *rowWork) (bad int, err error) {
	e := expOf(y)
	scaleInto(w.y, y, e)
	if err := p.bottomsTo(w.b, w.y, t); err != nil {
		return -1, err
	}
	p.c.aggregateRow(dst, w.b)
	return unscale(dst, e), nil
}

// apply reconciles every row of y, returning an h × n matrix.
func (p *plan) apply(y [][]float64) (*mat.Dense, error) {
	c := p.c
	out := mat.NewDense(len(y), c.n(), nil)
	w := p.newWork()
	for t, row := range y {
		bad, err := p.rowTo(out.RawRowView(t), row, t, w)
		if err != nil {
			return nil, err
		}
		if bad >= 0 {
			return nil, notRepresentable("reconciled forecast", c.names[bad], t)
		}
	}
	return out, nil
}

// Reconcile returns coherent forecasts (h × n) from the base forecasts
// base (h × n, one row per step and one column per node in the
// structure's order) by the method in spec.
//
// Errors wrap almanac.ErrEmpty (no base forecasts), ErrDimension with
// almanac.ErrLength (a matrix of the wrong width), almanac.ErrMissing /
// almanac.ErrNonFinite (NaN / ±Inf base forecasts), almanac.ErrInvalid
// (an unknown method, top-down on a grouped structure, a bad level,
// NonNegative with top-down), the covariance errors of
// EstimateCovariance, ErrSingular, ErrProportion or ErrNoConvergence.
func Reconcile(st Structure, base mat.Matrix, spec Spec) (*mat.Dense, error) {
	c, err := coreOf(st)
	if err != nil {
		return nil, err
	}
	y, err := baseRows(c, base)
	if err != nil {
		return nil, err
	}
	p, err := newPlan(st, spec, y)
	if err != nil {
		return nil, err
	}
	return p.apply(y)
}

// BottomUp returns the bottom-up reconciliation of base (h × n): the
// bottom-level base forecasts, added up.
func BottomUp(st Structure, base mat.Matrix) (*mat.Dense, error) {
	return Reconcile(st, base, Spec{Method: MethodBottomUp})
}

// TopDown splits the top's base forecast among the bottom series by the
// given disaggregation; history (T × n) is needed only for the
// historical proportions and may be nil otherwise.
func TopDown(h *Hierarchy, base mat.Matrix, how Disaggregation, history mat.Matrix) (*mat.Dense, error) {
	if h == nil {
		return nil, fmt.Errorf("reconcile: %w: nil hierarchy", almanac.ErrInvalid)
	}
	return Reconcile(h, base, Spec{Method: MethodTopDown, Disaggregation: how, History: history})
}

// MiddleOut keeps the base forecasts of the nodes at level (and of any
// shallower leaves), splits them downwards by the given disaggregation
// and adds them up above the level.
func MiddleOut(h *Hierarchy, level int, base mat.Matrix, how Disaggregation, history mat.Matrix) (*mat.Dense, error) {
	if h == nil {
		return nil, fmt.Errorf("reconcile: %w: nil hierarchy", almanac.ErrInvalid)
	}
	return Reconcile(h, base, Spec{Method: MethodMiddleOut, Level: level, Disaggregation: how, History: history})
}

// OLS returns the OLS reconciliation of base (W = I).
func OLS(st Structure, base mat.Matrix) (*mat.Dense, error) {
	return Reconcile(st, base, Spec{Method: MethodOLS})
}

// WLSStructural returns the WLS reconciliation with structural scaling,
// W = diag(S 1).
func WLSStructural(st Structure, base mat.Matrix) (*mat.Dense, error) {
	return Reconcile(st, base, Spec{Method: MethodWLSStructural})
}

// WLSVariance returns the WLS reconciliation with variance scaling,
// W = diag(W1), W1 the uncentred residual covariance.
func WLSVariance(st Structure, base mat.Matrix, residuals mat.Matrix) (*mat.Dense, error) {
	return Reconcile(st, base, Spec{Method: MethodWLSVariance, Residuals: residuals})
}

// MinT returns the minimum-trace reconciliation of base with the
// covariance of the base forecast errors estimated from residuals
// (T × n) by cov (CovarianceAuto means Shrinkage).
func MinT(st Structure, base mat.Matrix, residuals mat.Matrix, cov Covariance) (*mat.Dense, error) {
	switch cov {
	case CovarianceAuto, Shrinkage:
		return Reconcile(st, base, Spec{Method: MethodMinTShrink, Residuals: residuals})
	case SampleCovariance:
		return Reconcile(st, base, Spec{Method: MethodMinTSample, Residuals: residuals})
	case DiagonalVariance:
		return Reconcile(st, base, Spec{Method: MethodWLSVariance, Residuals: residuals})
	}
	return nil, fmt.Errorf("reconcile: %w: unknown covariance estimator %v", almanac.ErrInvalid, cov)
}

// BottomMap returns the m × n matrix G of a linear method, so that the
// reconciled forecasts are S G ŷ for every base vector ŷ. Methods whose
// map depends on the base forecasts (forecast proportions) or that are not
// linear (NonNegative) give an error wrapping almanac.ErrInvalid.
func BottomMap(st Structure, spec Spec) (*mat.Dense, error) {
	if spec.NonNegative {
		return nil, fmt.Errorf("reconcile: %w: non-negative reconciliation is not a linear map", almanac.ErrInvalid)
	}
	if (spec.Method == MethodTopDown || spec.Method == MethodMiddleOut) &&
		(spec.Disaggregation == DisaggregationAuto || spec.Disaggregation == ForecastProportions) {
		return nil, fmt.Errorf("reconcile: %w: the forecast-proportion map depends on the base forecasts", almanac.ErrInvalid)
	}
	p, err := newPlan(st, spec, nil)
	if err != nil {
		return nil, err
	}
	return mat.DenseCopyOf(p.gAt(0)), nil
}

// ReconciledCovariance returns S G W G' S' (n × n), the covariance of
// reconciled forecasts whose base forecast errors have covariance w
// (n × n), for the linear map g (m × n, e.g. from BottomMap).
func ReconciledCovariance(st Structure, g mat.Matrix, w mat.Symmetric) (*mat.SymDense, error) {
	c, err := coreOf(st)
	if err != nil {
		return nil, err
	}
	if absent(g) || absent(w) {
		return nil, fmt.Errorf("reconcile: %w: nil argument", almanac.ErrInvalid)
	}
	n, m := c.n(), c.m
	if r, k := g.Dims(); r != m || k != n {
		return nil, fmt.Errorf("reconcile: %w: %w: G is %d × %d, want %d × %d", ErrDimension, almanac.ErrLength, r, k, m, n)
	}
	if w.SymmetricDim() != n {
		return nil, fmt.Errorf("reconcile: %w: %w: W is %d × %d, want %d × %d", ErrDimension, almanac.ErrLength, w.SymmetricDim(), w.SymmetricDim(), n, n)
	}
	// G and W divided by powers of two 2^eg and 2^ew (scale.go), so that
	// the products cannot overflow; the result is S G W G' S'·2^(2eg+ew).
	gd := mat.DenseCopyOf(g)
	wd := mat.DenseCopyOf(w)
	eg, ew := expOf(gd.RawMatrix().Data), expOf(wd.RawMatrix().Data)
	scaleInto(gd.RawMatrix().Data, gd.RawMatrix().Data, eg)
	scaleInto(wd.RawMatrix().Data, wd.RawMatrix().Data, ew)
	sg := sumRows(c, gd)     // S G, n × n
	tmp := mulSerial(sg, wd) // S G W, n × n
	out := mat.NewSymDense(n, nil)
	for i := 0; i < n; i++ {
		ti := tmp.RawRowView(i)
		for j := i; j < n; j++ {
			sj := sg.RawRowView(j)
			var s float64
			for k := range ti {
				s += ti[k] * sj[k]
			}
			v := math.Ldexp(s, 2*eg+ew)
			if math.IsInf(v, 0) || math.IsNaN(v) {
				return nil, fmt.Errorf("reconcile: %w: the reconciled covariance of %q and %q is beyond the float64 range", almanac.ErrNonFinite, c.names[i], c.names[j])
			}
			out.SetSym(i, j, v)
		}
	}
	return out, nil
}
