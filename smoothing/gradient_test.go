package smoothing

import (
	"math"
	"slices"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestGradient compares the adjoint gradient with forward-mode
// differentiation and with central finite differences of the objective,
// for every model form and both kinds of bounds, at the start values
// with coordinate k moved by 0.01·(k mod 3 − 1).
func TestGradient(t *testing.T) {
	y := airPassengers(t).Head(60)
	for _, e := range []ErrorType{AdditiveError, MultiplicativeError} {
		for tr := NoTrend; tr <= DampedMultiplicativeTrend; tr++ {
			for _, se := range []SeasonType{NoSeason, AdditiveSeason, MultiplicativeSeason} {
				for _, bd := range []Bounds{UsualBounds, AdmissibleBounds} {
					sp := Spec{Error: e, Trend: tr, Season: se, Bounds: bd}
					t.Run(sp.String()+"/"+bd.String(), func(t *testing.T) {
						f, err := sp.resolve(y)
						if err != nil {
							t.Fatal(err)
						}
						ys := y.Slice()
						for i := range ys {
							ys[i] /= 200
						}
						p := sp.newProblem(f, ys, scaling{s0: 200, d: 1})
						x := p.start()
						for k := range x {
							x[k] += 0.01 * float64(k%3-1)
						}
						g := make([]float64, len(x))
						fv := p.objectiveGrad(x, g)
						gf := make([]float64, len(x))
						// The value passes of the linear-trend forms
						// arrange the recursion differently (adjoint.go):
						// equal to rounding.
						if ff := p.objectiveGradForward(x, gf); math.Abs(ff-fv) > 1e-12*math.Abs(ff) {
							t.Fatalf("forward-mode value %.17g, adjoint pass %.17g", ff, fv)
						}
						numtest.Slice(t, "adjoint vs forward-mode gradient", g, gf, 1e-10, 1e-8)
						if fv >= penalty {
							t.Skip("start outside the domain")
						}
						if fo := objectiveByFilter(p, x); math.Abs(fo-fv) > 1e-12*math.Abs(fo) {
							t.Fatalf("objectiveGrad value %.17g, form.filter gives %.17g", fv, fo)
						}
						xp := slices.Clone(x)
						for k := range x {
							h := 1e-6 * math.Max(1, math.Abs(x[k]))
							xp[k] = x[k] + h
							fp := p.objective(xp)
							xp[k] = x[k] - h
							fm := p.objective(xp)
							xp[k] = x[k]
							fd := (fp - fm) / (2 * h)
							if math.Abs(fd-g[k]) > 1e-4*math.Max(1, math.Abs(fd)) {
								t.Errorf("d/dx[%d]: analytic %.8g, finite difference %.8g", k, g[k], fd)
							}
						}
					})
				}
			}
		}
	}
}

// objectiveByFilter is the objective computed with form.filter (the
// recursion Fitted uses), an independent check on the value pass of the
// adjoint gradient.
func objectiveByFilter(p *problem, x []float64) float64 {
	par, l0, b0, ok := p.decode(x)
	if !ok || (p.bounds != UsualBounds && !admissible(p.f, par)) ||
		(p.f.trend.multiplicative() && !(b0 > 0)) || (p.f.multiplicativeLevel() && !(l0 > 0)) {
		return penalty
	}
	sse, sumlog, _, _, ok := p.f.filter(p.y, par, l0, b0, p.ws, 0, nil)
	if !ok {
		return penalty
	}
	v := float64(len(p.y))*math.Log(math.Max(sse, 1e-300)) + 2*sumlog
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return penalty
	}
	return v
}
