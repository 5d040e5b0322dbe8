package almanac

// GuerreroObjective exposes Guerrero's criterion (the coefficient of
// variation as a function of λ) for allocation tests.
func GuerreroObjective(y []float64, period int) (func(float64) float64, error) {
	g, err := guerreroSubseries(y, period)
	if err != nil {
		return nil, err
	}
	return g.cv, nil
}

// BrentMin exposes the univariate minimiser for tests.
var BrentMin = brentMin
