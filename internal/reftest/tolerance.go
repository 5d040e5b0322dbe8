package reftest

import (
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// Tolerance is one entry of a fixture's "tolerance" object.
type Tolerance struct {
	Key      string  // the entry's key, e.g. "acf" for the path "acf.values"
	Abs, Rel float64 // pass when |got − want| ≤ Abs + Rel·|want| (absent = 0)
	// Bar is a one-sided requirement written as a formula, e.g.
	// "go_llf >= expect - 1e-9 * abs(expect)"; see BarRel.
	Bar string
	// Informative is true for an entry with only a "why": it is not a
	// pass/fail criterion, and the quantity is not compared.
	Informative bool
}

// ToleranceAt returns the tolerance for the quantity at path below
// "expect" (for example "acf.values"), following the convention of the
// shared reference README: a key names a path below expect, and a key
// naming an object applies to everything inside it. It tries path, then
// each parent ("acf"), then the catch-all key "*". It fails t when the
// fixture has none of them: no comparison without a tolerance from the
// fixture.
func (f *Fixture) ToleranceAt(t testing.TB, path string) Tolerance {
	t.Helper()
	v, _ := f.Get("tolerance")
	m, _ := v.(map[string]any)
	keys := []string{}
	for p := path; p != ""; {
		keys = append(keys, p)
		i := strings.LastIndex(p, ".")
		if i < 0 {
			break
		}
		p = p[:i]
	}
	keys = append(keys, "*")
	for _, k := range keys {
		e, ok := m[k].(map[string]any)
		if !ok {
			continue
		}
		tol := Tolerance{Key: k}
		_, hasAbs := e["abs"]
		_, hasRel := e["rel"]
		tol.Abs, _ = toFloat(e["abs"])
		tol.Rel, _ = toFloat(e["rel"])
		if !hasAbs {
			tol.Abs = 0
		}
		if !hasRel {
			tol.Rel = 0
		}
		tol.Bar, _ = e["bar"].(string)
		tol.Informative = !hasAbs && !hasRel && tol.Bar == ""
		return tol
	}
	t.Fatalf("%s: no tolerance for %q (tried %q)", f.Case, path, keys)
	return Tolerance{}
}

var barRel = regexp.MustCompile(`>=\s*expect\s*-\s*([0-9.eE+-]+)\s*\*\s*abs\(expect\)\s*$`)

// BarRel returns r for a bar of the form "X >= expect - r * abs(expect)"
// (the form of the shared fixtures' likelihood bars). It fails t for any
// other form, so that a bar is never silently replaced by a guess.
func (tol Tolerance) BarRel(t testing.TB) float64 {
	t.Helper()
	m := barRel.FindStringSubmatch(tol.Bar)
	if m == nil {
		t.Fatalf("tolerance %q: bar %q is not of the form \"X >= expect - r * abs(expect)\"", tol.Key, tol.Bar)
	}
	r, err := strconv.ParseFloat(m[1], 64)
	if err != nil {
		t.Fatalf("tolerance %q: bar %q: %v", tol.Key, tol.Bar, err)
	}
	return r
}

// String describes the tolerance for messages.
func (tol Tolerance) String() string {
	switch {
	case tol.Informative:
		return fmt.Sprintf("%s: informative only", tol.Key)
	case tol.Bar != "":
		return fmt.Sprintf("%s: bar %s", tol.Key, tol.Bar)
	}
	return fmt.Sprintf("%s: abs %g, rel %g", tol.Key, tol.Abs, tol.Rel)
}
