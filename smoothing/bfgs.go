package smoothing

import (
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/optimize"
)

var _ optimize.NextDirectioner = (*bfgsDirection)(nil)

// bfgsDirection is the BFGS quasi-Newton direction as optimize.BFGS
// computes it — the inverse-Hessian update of Nocedal & Wright (2006,
// eq. 6.17), the initial matrix rescaled after the first step by
// sᵀy/yᵀy (their eq. 6.20), the update skipped when sᵀy = 0 — on a plain
// row-major matrix. gonum's BFGS keeps the matrix in a mat.SymDense and
// updates it through mat and BLAS calls whose argument checks and
// strides cost about seven times the arithmetic at the 2 to 17
// coordinates of an ETS model (about 21,000 instructions an iteration
// for ETS(M,Ad,M), as much as a likelihood evaluation). It plugs into
// optimize.LinesearchMethod as a NextDirectioner, like optimize.BFGS.
type bfgsDirection struct {
	dim         int
	x, g        []float64 // location and gradient of the previous iteration
	s, y, hy, u []float64 // work vectors
	h           []float64 // inverse Hessian approximation, dim×dim, row-major
	first       bool      // the next update is the first
	diag        []float64 // diagonal D of the initial inverse Hessian; nil for the identity
	buf         []float64
}

// resize sizes the workspace for dim coordinates, reusing its memory.
func (b *bfgsDirection) resize(dim int) {
	b.dim = dim
	need := dim*dim + 6*dim
	if cap(b.buf) < need {
		b.buf = make([]float64, need)
	}
	buf := b.buf[:need]
	next := func(k int) []float64 { v := buf[:k:k]; buf = buf[k:]; return v }
	b.h = next(dim * dim)
	b.x, b.g, b.s, b.y, b.hy, b.u = next(dim), next(dim), next(dim), next(dim), next(dim), next(dim)
}

// InitDirection starts from the identity: the direction is −∇f, with a
// first step of unit length.
func (b *bfgsDirection) InitDirection(loc *optimize.Location, dir []float64) float64 {
	b.resize(len(loc.X))
	copy(b.x, loc.X)
	copy(b.g, loc.Gradient)
	b.first = true
	if b.diag != nil {
		nrm := 0.0
		for i, v := range loc.Gradient {
			nrm += v * v * b.diag[i]
			dir[i] = -v * b.diag[i]
		}
		return 1 / math.Sqrt(nrm)
	}
	for i, v := range loc.Gradient {
		dir[i] = -v
	}
	return 1 / floats.Norm(dir, 2)
}

// NextDirection updates the inverse Hessian approximation H with the step
// s and the change of gradient y since the previous iteration,
//
//	H ← H + (sᵀy + yᵀHy)/(sᵀy)²·s sᵀ − (Hy sᵀ + s (Hy)ᵀ)/sᵀy,
//
// and returns the direction −H∇f with a unit step.
func (b *bfgsDirection) NextDirection(loc *optimize.Location, dir []float64) float64 {
	n := b.dim
	s, y, hy, h := b.s[:n], b.y[:n], b.hy[:n], b.h[:n*n]
	sy := 0.0
	for i := range s {
		s[i] = loc.X[i] - b.x[i]
		y[i] = loc.Gradient[i] - b.g[i]
		sy += s[i] * y[i]
	}
	if b.first {
		yy := 0.0
		for i, v := range y {
			if b.diag != nil {
				v *= math.Sqrt(b.diag[i])
			}
			yy += v * v
		}
		scale := sy / yy
		for i := range h {
			h[i] = 0
		}
		for i := 0; i < n; i++ {
			h[i*n+i] = scale
			if b.diag != nil {
				h[i*n+i] = scale * b.diag[i]
			}
		}
		b.first = false
	}
	g := loc.Gradient[:n]
	if math.Abs(sy) == 0 {
		copy(b.x, loc.X)
		copy(b.g, g)
		for i := 0; i < n; i++ {
			dir[i] = -dot(h[i*n:i*n+n], g)
		}
		return 1
	}
	// With u = c·s − v, v = Hy/sᵀy and c = (1 + yᵀHy/sᵀy)/sᵀy the update
	// is H ← H + s uᵀ − v sᵀ, so the new direction −H∇f is
	// −(H∇f + s·(uᵀ∇f) − v·(sᵀ∇f)) with the old H: one pass over H gives
	// Hy and H∇f, a second makes the update.
	hg := dir[:n]
	yhy := 0.0
	for i := 0; i < n; i++ {
		hy[i], hg[i] = dot2(h[i*n:i*n+n], y, g)
		yhy += y[i] * hy[i]
	}
	c := (1 + yhy/sy) / sy
	u, v := b.u[:n], hy
	ug, sg := 0.0, 0.0
	for j := range u {
		v[j] /= sy
		u[j] = c*s[j] - v[j]
		ug += u[j] * g[j]
		sg += s[j] * g[j]
	}
	for i := range hg {
		hg[i] = -(hg[i] + s[i]*ug - v[i]*sg)
	}
	for i := 0; i < n; i++ {
		row := h[i*n : i*n+n]
		si, vi := s[i], v[i]
		u, s := u[:len(row)], s[:len(row)]
		for j := range row {
			row[j] += si*u[j] - vi*s[j]
		}
	}
	copy(b.x, loc.X)
	copy(b.g, g)
	return 1
}

// dot returns Σ a_i·b_i over a's length (b at least as long), with two
// partial sums so that the additions do not all wait for each other.
func dot(a, b []float64) float64 {
	b = b[:len(a)]
	var v0, v1 float64
	i := 0
	for ; i+1 < len(a); i += 2 {
		v0 += a[i] * b[i]
		v1 += a[i+1] * b[i+1]
	}
	if i < len(a) {
		v0 += a[i] * b[i]
	}
	return v0 + v1
}

// dot2 returns the dot products of a with x and with y, as dot does.
func dot2(a, x, y []float64) (float64, float64) {
	x, y = x[:len(a)], y[:len(a)]
	var p0, p1, q0, q1 float64
	i := 0
	for ; i+1 < len(a); i += 2 {
		p0 += a[i] * x[i]
		q0 += a[i] * y[i]
		p1 += a[i+1] * x[i+1]
		q1 += a[i+1] * y[i+1]
	}
	if i < len(a) {
		p0 += a[i] * x[i]
		q0 += a[i] * y[i]
	}
	return p0 + p1, q0 + q1
}
