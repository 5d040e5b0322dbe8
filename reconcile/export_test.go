package reconcile

import (
	"testing"

	"gonum.org/v1/gonum/mat"
)

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

// custom is a structure given node by node, for the reference test's
// fixtures that the public constructors cannot express (a grouped
// structure with only some of its aggregates, say).
type custom struct{ c core }

func (s *custom) Len() int                      { return s.c.n() }
func (s *custom) NumBottom() int                { return s.c.m }
func (s *custom) Names() []string               { return append([]string(nil), s.c.names...) }
func (s *custom) Index(name string) (int, bool) { i, ok := s.c.index[name]; return i, ok }
func (s *custom) Level(i int) int               { return s.c.level(i) }
func (s *custom) NumLevels() int                { return s.c.nlevels }
func (s *custom) LevelNodes(level int) []int    { return s.c.levelNodes(level) }
func (s *custom) Bottoms(i int) []int           { return s.c.bottomsOf(i) }
func (s *custom) Summing() *mat.Dense           { return s.c.summing() }
func (s *custom) tree() *core                   { return &s.c }

// NewCustomStructure builds a structure from node names, levels and the
// bottom positions (0..m−1, ascending) under each node; the last m nodes
// are the bottom series, in bottom order.
func NewCustomStructure(names []string, levels []int, bottoms [][]int, m int) Structure {
	s := &custom{}
	s.c.names = append([]string(nil), names...)
	s.c.levels = append([]int(nil), levels...)
	s.c.bottoms = bottoms
	s.c.m = m
	s.c.parents = make([]int, len(names))
	for i := range s.c.parents {
		s.c.parents[i] = -1
	}
	s.c.finish()
	return s
}
