package almanac

import "fmt"

// Criterion is an information criterion for choosing among models fitted
// by maximum likelihood to the same data; smaller is better. The zero
// value is AICc. Programs should not rely on the numeric values of the
// constants.
type Criterion int

// Information criteria.
const (
	// AICc is Akaike's criterion with the small-sample correction
	// (Hurvich & Tsai 1989): AIC + 2k(k+1)/(n−k−1).
	AICc Criterion = iota
	// AIC is Akaike's criterion, −2 log L + 2k.
	AIC
	// BIC is Schwarz's Bayesian criterion, −2 log L + k log n.
	BIC
)

// String returns "AICc", "AIC" or "BIC", or "Criterion(n)" for an unknown
// value.
func (c Criterion) String() string {
	switch c {
	case AICc:
		return "AICc"
	case AIC:
		return "AIC"
	case BIC:
		return "BIC"
	}
	return fmt.Sprintf("Criterion(%d)", int(c))
}

// Valid reports whether c is one of the defined criteria.
func (c Criterion) Valid() bool { return c >= AICc && c <= BIC }

// Choose returns whichever of the three values c names (aicc for AICc and
// for an unknown value).
func (c Criterion) Choose(aicc, aic, bic float64) float64 {
	switch c {
	case AIC:
		return aic
	case BIC:
		return bic
	}
	return aicc
}
