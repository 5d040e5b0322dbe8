package stl

import (
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// TestReference checks Decompose against R's stats::stl (R 4.2.2, the
// Fortran port of the netlib code of Cleveland et al. 1990): every
// fixture in testdata/reference, copied unchanged from the shared
// reference set, with R's default jumps and with all jumps 1. Each
// component must be within the fixture's own tolerance and also within
// 1e-8 absolute (the requirement).
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
	// fixtures.
	if f.String("spec.jumps") != "all 1" {
		sw := p.SWindow
		robust := f.Doc["spec"].(map[string]any)["robust"] == true
		d := Defaults(len(y), p.Period, sw, p.Periodic, robust)
		if p.SDegree != 0 {
			d.SDegree = p.SDegree
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
		abs, rel, ok := f.Tol(c.name)
		if !ok {
			t.Fatalf("fixture has no tolerance for %s", c.name)
		}
		numtest.Slice(t, c.name, c.got, want, abs, rel)
		numtest.Slice(t, c.name+" (1e-8 abs)", c.got, want, 1e-8, 0)
	}
}
