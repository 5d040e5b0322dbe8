package stl

import (
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// TestReference checks Decompose against R's stats::stl (R 4.2.2, the
// Fortran port of the netlib code of Cleveland et al. 1990): every
// fixture in testdata/reference, copied unchanged from the shared
// reference set and from decompose/testdata/reference (the extra
// fixtures of decompose/testdata/refgen/extra_fixtures.R: an explicit
// trend window, frequency 52, a series without dates, other explicit
// arguments), with R's default jumps and with all jumps 1. Each component
// must be within the fixture's own tolerance.
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"stl": checkSTLFixture,
	})
}

func checkSTLFixture(t *testing.T, f *reftest.Fixture) {
	y := f.Floats(t, "input")
	p := Params{
		Period:   int(f.Float(t, "spec.period")),
		SWindow:  int(f.Float(t, "spec.s_window")),
		SDegree:  int(f.Float(t, "spec.s_degree")),
		SJump:    int(f.Float(t, "spec.s_jump")),
		TWindow:  int(f.Float(t, "spec.t_window")),
		TDegree:  int(f.Float(t, "spec.t_degree")),
		TJump:    int(f.Float(t, "spec.t_jump")),
		LWindow:  int(f.Float(t, "spec.l_window")),
		LDegree:  int(f.Float(t, "spec.l_degree")),
		LJump:    int(f.Float(t, "spec.l_jump")),
		Inner:    int(f.Float(t, "spec.inner")),
		Outer:    int(f.Float(t, "spec.outer")),
		Periodic: f.Doc["spec"].(map[string]any)["periodic"] == true,
	}
	// R's own defaults must give the parameters R reported (fit$win,
	// fit$deg, fit$jump, fit$inner, fit$outer) for the default-jump
	// fixtures, except those the call set explicitly (spec keys ending
	// in _arg, and s.degree).
	if f.String("spec.jumps") != "all 1" {
		sw := p.SWindow
		robust := f.Doc["spec"].(map[string]any)["robust"] == true
		d := Defaults(len(y), p.Period, sw, p.Periodic, robust)
		if p.SDegree != 0 {
			d.SDegree = p.SDegree
		}
		explicit := map[string]*int{
			"t_window_arg": &d.TWindow, "l_window_arg": &d.LWindow, "t_degree_arg": &d.TDegree, "l_degree_arg": &d.LDegree,
			"s_jump_arg": &d.SJump, "t_jump_arg": &d.TJump, "l_jump_arg": &d.LJump, "inner_arg": &d.Inner, "outer_arg": &d.Outer,
		}
		resolved := map[string]int{
			"t_window_arg": p.TWindow, "l_window_arg": p.LWindow, "t_degree_arg": p.TDegree, "l_degree_arg": p.LDegree,
			"s_jump_arg": p.SJump, "t_jump_arg": p.TJump, "l_jump_arg": p.LJump, "inner_arg": p.Inner, "outer_arg": p.Outer,
		}
		for key := range f.Doc["spec"].(map[string]any) {
			if field, ok := explicit[key]; ok {
				*field = resolved[key]
				// R derives the default jump and low-pass degree from the
				// window and trend degree given.
				switch key {
				case "t_window_arg":
					if !f.Has("spec.t_jump_arg") {
						d.TJump = ceilTenth(d.TWindow)
					}
				case "l_window_arg":
					if !f.Has("spec.l_jump_arg") {
						d.LJump = ceilTenth(d.LWindow)
					}
				case "t_degree_arg":
					if !f.Has("spec.l_degree_arg") {
						d.LDegree = d.TDegree
					}
				}
			}
		}
		if d != p {
			t.Errorf("Defaults = %+v, R used %+v", d, p)
		}
	}
	s, tr, r, w, err := Decompose(y, p)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		got  []float64
	}{{"seasonal", s}, {"trend", tr}, {"remainder", r}, {"weights", w}} {
		want := f.Floats(t, "expect."+c.name)
		tol := f.ToleranceAt(t, c.name)
		if tol.Informative {
			continue
		}
		numtest.Slice(t, c.name, c.got, want, tol.Abs, tol.Rel)
	}
}
