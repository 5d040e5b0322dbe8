package reconcile

import "testing"

// ProjectionForms lets the reference test run the projection methods in
// both algebraic forms.
var ProjectionForms = map[string]func(){
	"auto":       func() { forcedForm = formAuto },
	"bottom":     func() { forcedForm = formBottom },
	"constraint": func() { forcedForm = formConstraint },
}

// RowAllocs reports the allocations of reconciling one base vector with a
// prepared plan (the per-row hot loop of Reconcile and Forecasts).
func RowAllocs(st Structure, spec Spec, y []float64) (float64, error) {
	p, err := newPlan(st, spec, [][]float64{y})
	if err != nil {
		return 0, err
	}
	w := p.newWork()
	rec := make([]float64, st.Len())
	var runErr error
	allocs := testing.AllocsPerRun(50, func() {
		if _, err := p.rowTo(rec, y, 0, w); err != nil {
			runErr = err
		}
	})
	return allocs, runErr
}
