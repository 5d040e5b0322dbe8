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

// MLObjective exposes the log-likelihood evaluated from precomputed logs,
// the objective of LambdaML, for allocation tests.
func MLObjective(logs []float64) func(float64) float64 {
	return func(l float64) float64 { return llfFromLogs(logs, false, l) }
}
