package smoothing

import (
	"context"
	"math"
	"testing"
)

// convolutionVariance is the O(H²) form of the class 2 and 3 variances
// (Hyndman, Koehler, Ord & Snyder 2005; recalled from memory, see
// Fitted.Variance): θ_h = μ_h² + σ² Σ_{j=1}^{h−1} c_j² θ_{h−j}, in
// internal units.
func convolutionVariance(m *Fitted, H int) []float64 {
	method := m.IntervalMethod()
	p, f := m.Params, m.f
	cj := func(j int) float64 {
		c := p.Alpha
		if f.trend != NoTrend {
			phiJ := float64(j)
			if f.trend == DampedTrend {
				phiJ = 0
				pw := 1.0
				for range j {
					pw *= p.Phi
					phiJ += pw
				}
			}
			c += p.Beta * phiJ
		}
		if method != Approximate && f.season != NoSeason && j%f.m == 0 {
			c += p.Gamma
		}
		return c
	}
	s2 := m.Sigma2
	mu := make([]float64, H)
	tp := make([]float64, H)
	m.pointForecast(mu, tp)
	if method == Approximate {
		mu = tp
	}
	theta := make([]float64, H)
	v := make([]float64, H)
	n := m.series.Len()
	for h := range H {
		th := mu[h] * mu[h]
		for j := 1; j <= h; j++ {
			c := cj(j)
			th += s2 * c * c * theta[h-j]
		}
		theta[h] = th
		if method == ExactVariance {
			v[h] = (1+s2)*th - mu[h]*mu[h]
			continue
		}
		s := m.ring[(n+h)%f.m]
		k := float64(h / f.m)
		g := p.Gamma
		v[h] = s * s * (th*(1+s2)*math.Pow(1+g*g*s2, k) - mu[h]*mu[h])
	}
	return v
}

// TestVarianceMatchesConvolution: the moment propagation of varianceZ
// (linear in H) equals the published convolution form (quadratic in H)
// for every class 2 and class 3 model, to rounding.
func TestVarianceMatchesConvolution(t *testing.T) {
	y := airPassengers(t)
	for _, sp := range []Spec{
		{Error: MultiplicativeError},
		{Error: MultiplicativeError, Trend: AdditiveTrend},
		{Error: MultiplicativeError, Trend: DampedTrend},
		{Error: MultiplicativeError, Season: AdditiveSeason},
		{Error: MultiplicativeError, Trend: AdditiveTrend, Season: AdditiveSeason},
		{Error: MultiplicativeError, Trend: DampedTrend, Season: AdditiveSeason},
		{Error: MultiplicativeError, Season: MultiplicativeSeason},
		{Error: MultiplicativeError, Trend: AdditiveTrend, Season: MultiplicativeSeason},
		{Error: MultiplicativeError, Trend: DampedTrend, Season: MultiplicativeSeason},
	} {
		t.Run(sp.String(), func(t *testing.T) {
			fit, err := sp.fit(context.Background(), y)
			if err != nil {
				t.Fatal(err)
			}
			const H = 60
			got := fit.varianceZ(H)
			want := convolutionVariance(fit, H)
			for h := range H {
				if math.Abs(got[h]-want[h]) > 1e-9*math.Abs(want[h]) {
					t.Errorf("h=%d: %.15g, convolution %.15g", h+1, got[h], want[h])
				}
			}
		})
	}
}
