package reconcile

// ProjectionForms lets the reference test run the projection methods in
// both algebraic forms.
var ProjectionForms = map[string]func(){
	"auto":       func() { forcedForm = formAuto },
	"bottom":     func() { forcedForm = formBottom },
	"constraint": func() { forcedForm = formConstraint },
}
