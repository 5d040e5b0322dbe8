package reftest

import (
	"math"
	"os"
	"path/filepath"
	"testing"
)

const sample = `{"case": "tiny", "kind": "demo", "reference": "hand", "call": "none",
 "input": [1, null, 3.5],
 "expect": {"m": [[1, 2], [3, null]], "name": "x", "v": 2.5},
 "tolerance": {"expect.v": {"abs": 1e-9, "rel": 1e-6, "why": "t"}, "info": {"why": "only"}}}`

func TestLoadAndAccess(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "tiny.json")
	if err := os.WriteFile(path, []byte(sample), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if f.Case != "tiny" || f.Kind != "demo" || f.Reference != "hand" {
		t.Errorf("header = %q %q %q", f.Case, f.Kind, f.Reference)
	}
	in := f.Floats(t, "input")
	if len(in) != 3 || in[0] != 1 || !math.IsNaN(in[1]) || in[2] != 3.5 {
		t.Errorf("input = %v, want [1 NaN 3.5]", in)
	}
	if v := f.Float(t, "expect.v"); v != 2.5 {
		t.Errorf("expect.v = %v", v)
	}
	m := f.Matrix(t, "expect.m")
	if len(m) != 2 || m[1][0] != 3 || !math.IsNaN(m[1][1]) {
		t.Errorf("expect.m = %v", m)
	}
	if v, ok := f.Get("expect.m.1.0"); !ok || v.(float64) != 3 {
		t.Errorf("Get(expect.m.1.0) = %v, %v", v, ok)
	}
	if f.Has("expect.nothing") || !f.Has("expect.name") || f.String("expect.name") != "x" {
		t.Error("Has/String wrong")
	}
	abs, rel, ok := f.Tol("expect.v")
	if !ok || abs != 1e-9 || rel != 1e-6 {
		t.Errorf("Tol = %v %v %v", abs, rel, ok)
	}
	if abs, rel, ok := f.Tol("info"); !ok || abs != 0 || rel != 0 {
		t.Errorf("informative Tol = %v %v %v, want 0 0 true", abs, rel, ok)
	}
	if _, _, ok := f.Tol("missing"); ok {
		t.Error("Tol of a missing key reported ok")
	}
}

func TestLoadRejectsFixtureWithoutKind(t *testing.T) {
	path := filepath.Join(t.TempDir(), "bad.json")
	if err := os.WriteFile(path, []byte(`{"case": "c"}`), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(path); err == nil {
		t.Error("fixture without kind accepted")
	}
}

func TestToleranceAt(t *testing.T) {
	f := &Fixture{Case: "c", Doc: map[string]any{"tolerance": map[string]any{
		"acf":        map[string]any{"abs": 1e-13, "why": "closed form"},
		"acf.values": map[string]any{"rel": 1e-9},
		"pacf":       map[string]any{"why": "only informative"},
		"llf":        map[string]any{"bar": "go_llf >= expect - 1e-9 * abs(expect)"},
		"*":          map[string]any{"abs": 1e-6, "rel": 1e-6},
	}}}
	for _, tt := range []struct {
		path     string
		key      string
		abs, rel float64
		info     bool
	}{
		{"acf.values", "acf.values", 0, 1e-9, false},
		{"acf.lags", "acf", 1e-13, 0, false},
		{"pacf.values", "pacf", 0, 0, true},
		{"me", "*", 1e-6, 1e-6, false},
	} {
		got := f.ToleranceAt(t, tt.path)
		if got.Key != tt.key || got.Abs != tt.abs || got.Rel != tt.rel || got.Informative != tt.info {
			t.Errorf("%s: %+v", tt.path, got)
		}
	}
	if r := f.ToleranceAt(t, "llf").BarRel(t); r != 1e-9 {
		t.Errorf("bar factor %v", r)
	}
}
