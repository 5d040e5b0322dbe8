package reftest

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

// Fixture is one decoded reference file.
type Fixture struct {
	Path string
	Case string
	Kind string
	// Reference and Call name the software and the exact call that
	// produced the expected values.
	Reference string
	Call      string
	// Doc is the whole decoded document (JSON null decodes to nil).
	Doc map[string]any
}

// Handler checks one fixture.
type Handler func(t *testing.T, f *Fixture)

// Run discovers every *.json file in dir, and runs each as a subtest named
// by its "case", dispatched on "kind". It fails when dir holds no fixture
// or a fixture's kind has no handler.
func Run(t *testing.T, dir string, handlers map[string]Handler) {
	t.Helper()
	paths, err := filepath.Glob(filepath.Join(dir, "*.json"))
	if err != nil {
		t.Fatal(err)
	}
	if len(paths) == 0 {
		t.Fatalf("no reference fixtures in %s", dir)
	}
	sort.Strings(paths)
	for _, p := range paths {
		f, err := Load(p)
		if err != nil {
			t.Errorf("%s: %v", p, err)
			continue
		}
		t.Run(f.Case, func(t *testing.T) {
			h, ok := handlers[f.Kind]
			if !ok {
				t.Fatalf("fixture %s: unknown kind %q: no check is written for it", f.Path, f.Kind)
			}
			t.Logf("reference: %s; call: %s", f.Reference, f.Call)
			h(t, f)
		})
	}
}

// Load decodes one fixture file.
func Load(path string) (*Fixture, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var doc map[string]any
	if err := json.Unmarshal(b, &doc); err != nil {
		return nil, err
	}
	f := &Fixture{Path: path, Doc: doc}
	f.Case, _ = doc["case"].(string)
	f.Kind, _ = doc["kind"].(string)
	f.Reference, _ = doc["reference"].(string)
	f.Call, _ = doc["call"].(string)
	if f.Case == "" || f.Kind == "" {
		return nil, fmt.Errorf("fixture lacks case or kind")
	}
	return f, nil
}

// Get returns the value at a dotted path ("expect.forecast.mean"), and
// whether it exists. Array elements are addressed by decimal index.
func (f *Fixture) Get(path string) (any, bool) {
	var cur any = f.Doc
	for _, part := range strings.Split(path, ".") {
		switch c := cur.(type) {
		case map[string]any:
			v, ok := c[part]
			if !ok {
				return nil, false
			}
			cur = v
		case []any:
			var i int
			if _, err := fmt.Sscanf(part, "%d", &i); err != nil || i < 0 || i >= len(c) {
				return nil, false
			}
			cur = c[i]
		default:
			return nil, false
		}
	}
	return cur, true
}

// Has reports whether path exists (and is not null).
func (f *Fixture) Has(path string) bool {
	v, ok := f.Get(path)
	return ok && v != nil
}

// Float returns the number at path; null gives NaN. It fails t when the
// path is absent or not a number.
func (f *Fixture) Float(t testing.TB, path string) float64 {
	t.Helper()
	v, ok := f.Get(path)
	if !ok {
		t.Fatalf("%s: no %s", f.Case, path)
	}
	x, ok := toFloat(v)
	if !ok {
		t.Fatalf("%s: %s is %T, not a number", f.Case, path, v)
	}
	return x
}

// Floats returns the numeric array at path, with null as NaN.
func (f *Fixture) Floats(t testing.TB, path string) []float64 {
	t.Helper()
	v, ok := f.Get(path)
	if !ok {
		t.Fatalf("%s: no %s", f.Case, path)
	}
	arr, ok := v.([]any)
	if !ok {
		t.Fatalf("%s: %s is %T, not an array", f.Case, path, v)
	}
	out := make([]float64, len(arr))
	for i, e := range arr {
		x, ok := toFloat(e)
		if !ok {
			t.Fatalf("%s: %s[%d] is %T, not a number", f.Case, path, i, e)
		}
		out[i] = x
	}
	return out
}

// Matrix returns the array of numeric arrays at path (rows), null as NaN.
func (f *Fixture) Matrix(t testing.TB, path string) [][]float64 {
	t.Helper()
	v, ok := f.Get(path)
	if !ok {
		t.Fatalf("%s: no %s", f.Case, path)
	}
	rows, ok := v.([]any)
	if !ok {
		t.Fatalf("%s: %s is %T, not an array", f.Case, path, v)
	}
	out := make([][]float64, len(rows))
	for i, r := range rows {
		arr, ok := r.([]any)
		if !ok {
			t.Fatalf("%s: %s[%d] is %T, not an array", f.Case, path, i, r)
		}
		out[i] = make([]float64, len(arr))
		for j, e := range arr {
			x, ok := toFloat(e)
			if !ok {
				t.Fatalf("%s: %s[%d][%d] is not a number", f.Case, path, i, j)
			}
			out[i][j] = x
		}
	}
	return out
}

// String returns the string at path ("" when absent).
func (f *Fixture) String(path string) string {
	v, _ := f.Get(path)
	s, _ := v.(string)
	return s
}

// Tol returns the tolerance stored under "tolerance.<key>": abs and rel
// (0 when absent) and whether an entry exists. The fixture rule is: pass
// when |got − want| ≤ abs + rel·|want|.
func (f *Fixture) Tol(key string) (abs, rel float64, ok bool) {
	v, found := f.Get("tolerance")
	if !found {
		return 0, 0, false
	}
	m, _ := v.(map[string]any)
	e, found := m[key].(map[string]any)
	if !found {
		return 0, 0, false
	}
	abs, _ = toFloat(e["abs"])
	rel, _ = toFloat(e["rel"])
	if math.IsNaN(abs) {
		abs = 0
	}
	if math.IsNaN(rel) {
		rel = 0
	}
	return abs, rel, true
}

func toFloat(v any) (float64, bool) {
	switch x := v.(type) {
	case nil:
		return math.NaN(), true
	case float64:
		return x, true
	}
	return 0, false
}
