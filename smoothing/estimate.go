package smoothing

import (
	"math"

	"github.com/almanac-go/almanac/internal/seasonal"
)

// Search boxes for estimated smoothing parameters (see Bounds).
const (
	boxLo    = 1e-4
	boxHi    = 1 - 1e-4
	phiLo    = 0.8
	phiHi    = 0.98
	admAlpha = 2 - 1e-4
	admBeta  = 4 - 1e-4
	admGamma = 2 - 1e-4
	penalty  = 1e100 // objective outside the model's domain
)

// problem is the likelihood of one model on one (scaled) series, with a
// workspace: evaluating it does not allocate.
type problem struct {
	f      form
	y      []float64 // scaled observations
	bounds Bounds

	// Which quantities are estimated, and the fixed values (scaled).
	estA, estB, estG, estP, estL, estT, estS bool
	fix                                      Params
	fixL, fixT                               float64
	fixS                                     []float64 // chronological, scaled

	ws []float64   // seasonal ring, length m
	aw *adjWork    // gradient workspace (sized by prepare)
	ls *lineSearch // BFGS driver and its buffers (made on first use)
	// h0 is the diagonal of the BFGS searches' initial inverse Hessian
	// (curvature), set by the first search of the problem.
	h0 []float64

	// stall, when positive, cuts the next BFGS search off after that
	// many iterations and sends optimise to its fallback (a test hook).
	stall int
	// maxIter, when positive, limits the BFGS iterations (screening).
	maxIter int
}

// prepare sizes the gradient workspace.
func (p *problem) prepare() { p.aw = newAdjWork(len(p.y), p.f.m) }

// squash maps the optimiser's unbounded coordinate to (0, 1) for a
// bounded parameter: ½(1 + sin u). Unlike a logistic map it has no flat
// tail, so a parameter that reaches a bound can come back (the periodic
// transform for box constraints, common practice). dsquash is its
// derivative and unsquash an inverse.
func squash(u float64) float64   { return 0.5 * (1 + math.Sin(u)) }
func dsquash(u float64) float64  { return 0.5 * math.Cos(u) }
func unsquash(r float64) float64 { return math.Asin(2*r - 1) }

// dim returns the length of the optimiser's vector.
func (p *problem) dim() int {
	d := 0
	for _, e := range []bool{p.estA, p.estB, p.estG, p.estP, p.estL, p.estT} {
		if e {
			d++
		}
	}
	if p.estS {
		d += p.f.m - 1
	}
	return d
}

// params decodes the smoothing parameters from x (starting at x[0]) and
// returns them with the number of entries used.
func (p *problem) params(x []float64) (Params, int) {
	par := p.fix
	i := 0
	usual := p.bounds != AdmissibleBounds
	if p.estA {
		if usual {
			par.Alpha = boxLo + (boxHi-boxLo)*squash(x[i])
		} else {
			par.Alpha = boxLo + (admAlpha-boxLo)*squash(x[i])
		}
		i++
	}
	if p.estB {
		if usual {
			par.Beta = par.Alpha * (boxLo + (boxHi-boxLo)*squash(x[i]))
		} else {
			par.Beta = boxLo + (admBeta-boxLo)*squash(x[i])
		}
		i++
	}
	if p.estG {
		if usual {
			par.Gamma = (1 - par.Alpha) * (boxLo + (boxHi-boxLo)*squash(x[i]))
		} else {
			par.Gamma = boxLo + (admGamma-boxLo)*squash(x[i])
		}
		i++
	}
	if p.estP {
		par.Phi = phiLo + (phiHi-phiLo)*squash(x[i])
		i++
	}
	return par, i
}

// decode fills p.ws with the initial seasonal ring and returns the
// parameters and the initial level and trend.
func (p *problem) decode(x []float64) (par Params, l0, b0 float64, ok bool) {
	par, i := p.params(x)
	l0, b0 = p.fixL, p.fixT
	if p.estL {
		l0 = x[i]
		i++
	}
	if p.estT {
		b0 = x[i]
		i++
	}
	if p.f.season == NoSeason {
		return par, l0, b0, true
	}
	m := p.f.m
	if !p.estS {
		copy(p.ws, p.fixS)
		return par, l0, b0, true
	}
	sum := 0.0
	for k := 0; k < m-1; k++ {
		p.ws[k] = x[i+k]
		sum += x[i+k]
	}
	if p.f.season == AdditiveSeason {
		p.ws[m-1] = -sum
	} else {
		p.ws[m-1] = float64(m) - sum
		for _, v := range p.ws {
			if !(v > 0) {
				return par, l0, b0, false
			}
		}
	}
	return par, l0, b0, true
}

// objective is the function minimised: n·log(Σe²) + 2Σlog ŷ, i.e.
// −2·loglik up to a constant. It is the value pass of the adjoint
// gradient (adjoint.go), which runs the recursion of form.filter with the
// same arithmetic. It does not allocate.
func (p *problem) objective(x []float64) float64 { return p.value(x) }

// multiplicativeLevel reports whether the level must stay positive.
func (f form) multiplicativeLevel() bool {
	return f.err == MultiplicativeError || f.trend.multiplicative() || f.season == MultiplicativeSeason
}

// admissible reports whether the parameters lie in the forecastability
// region of the linear state-space form: all eigenvalues of the discount
// matrix D = F − g·w' inside the unit circle (Hyndman, Koehler, Ord &
// Snyder 2008, ch. 10), apart from the unit eigenvalue that seasonal
// models always have (the level/season redundancy removed by the
// normalisation). The characteristic polynomial of D, with that root
// divided out, was derived for this package from the eigenvector
// equations of D for the state (ℓ, b, s_1..s_m):
//
//	Q(z) = (1 + z + … + z^{m−1})·[(φ − z)(1 − α − z) + φβz] − γ(φ − z)
//
// (φ = β = 0 without a trend; without a season Q(z) = (φ − z)(1 − α − z)
// + φβz). TestSchurStable checks it against the eigenvalues of D computed
// by gonum. Roots are tested with the Schur–Cohn recursion, which needs
// no root finding and no allocation. The same conditions are applied to
// the multiplicative forms (common practice).
func admissible(f form, p Params) bool {
	phi, beta := 0.0, 0.0
	if f.trend != NoTrend {
		phi, beta = 1, p.Beta
		if f.trend.damped() {
			phi = p.Phi
		}
	}
	alpha := p.Alpha
	var buf [MaxPeriod + 2]float64
	if f.season == NoSeason || f.m < 2 {
		c := buf[:3]
		c[0] = phi * (1 - alpha)
		c[1] = -(1 + phi - alpha - phi*beta)
		c[2] = 1
		return schurStable(c, 1e-10)
	}
	m := f.m
	gamma := p.Gamma
	c := buf[:m+2]
	c[0] = phi * (1 - alpha - gamma)
	c[1] = alpha - phi*alpha + phi*beta + gamma - 1
	for k := 2; k < m; k++ {
		c[k] = alpha - phi*alpha + phi*beta
	}
	c[m] = alpha + phi*beta - phi
	c[m+1] = 1
	return schurStable(c, 1e-10)
}

// schurStable reports whether every root of the polynomial with ascending
// coefficients c lies in the closed disc of radius 1+tol, by the
// Schur–Cohn step-down recursion (Schur 1917; Cohn 1922): with a_d the
// leading and a_0 the constant coefficient, all roots lie inside the unit
// circle iff |a_0| < |a_d| and all roots of (a_d·A(z) − a_0·A*(z))/z do.
// The tolerance is applied by testing A((1+tol)z). c is overwritten.
func schurStable(c []float64, tol float64) bool {
	if len(c) > MaxPeriod+2 {
		panic("smoothing: schurStable: polynomial degree above MaxPeriod+1") // internal invariant
	}
	r := 1 + tol
	pw := 1.0
	for k := range c {
		c[k] *= pw
		pw *= r
	}
	for d := len(c) - 1; d > 0; d-- {
		a0, ad := c[0], c[d]
		if !(math.Abs(a0) < math.Abs(ad)) {
			return false
		}
		var tmp [MaxPeriod + 2]float64
		for i := 0; i < d; i++ {
			tmp[i] = ad*c[i+1] - a0*c[d-1-i]
		}
		copy(c, tmp[:d])
		// c now has degree d−1 (entries 0..d−1); rescale to avoid
		// overflow.
		mx := 0.0
		for i := 0; i < d; i++ {
			mx = math.Max(mx, math.Abs(c[i]))
		}
		if mx == 0 || math.IsNaN(mx) {
			return false
		}
		for i := 0; i < d; i++ {
			c[i] /= mx
		}
	}
	return true
}

// startValues returns heuristic initial states for the scaled series y:
// seasonal states from a classical decomposition of the first few full
// seasons (internal/seasonal, R decompose conventions), then level and
// trend from a least-squares line through the first ten seasonally
// adjusted values (in the spirit of Hyndman, Koehler, Snyder & Grose
// 2002, section 2.6).
func startValues(f form, y []float64) (l0, b0 float64, s []float64) {
	n := len(y)
	adj := make([]float64, min(n, max(10, 2*f.m)))
	copy(adj, y)
	if f.season != NoSeason {
		s = make([]float64, f.m)
		mult := f.season == MultiplicativeSeason
		k := min(n/f.m, 4) * f.m
		res, err := seasonal.Classical(y[:k], f.m, mult)
		ok := err == nil
		if ok {
			for _, v := range res.Figure {
				if math.IsNaN(v) || (mult && !(v > 0)) {
					ok = false
				}
			}
		}
		for j := range s {
			switch {
			case ok:
				s[j] = res.Figure[j]
			case mult:
				s[j] = 1
			default:
				s[j] = 0
			}
		}
		for t := range adj {
			if mult {
				adj[t] /= s[t%f.m]
			} else {
				adj[t] -= s[t%f.m]
			}
		}
	}
	k := min(len(adj), 10)
	// Least squares of adj[t] on (1, t+1), t = 0..k-1; value at t = 0 is
	// the level before the first observation.
	var sx, sy, sxx, sxy float64
	for t := 0; t < k; t++ {
		x := float64(t + 1)
		sx += x
		sy += adj[t]
		sxx += x * x
		sxy += x * adj[t]
	}
	fk := float64(k)
	slope := 0.0
	if den := fk*sxx - sx*sx; k > 1 && den != 0 {
		slope = (fk*sxy - sx*sy) / den
	}
	icept := (sy - slope*sx) / fk
	switch {
	case f.trend == NoTrend:
		l0 = sy / fk
	case f.trend.multiplicative():
		l0 = icept
		if l0 <= 0 {
			l0 = adj[0]
		}
		b0 = 1 + slope/l0
		b0 = math.Min(math.Max(b0, 0.8), 1.2)
	default:
		l0, b0 = icept, slope
	}
	return l0, b0, s
}
