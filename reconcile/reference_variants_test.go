package reconcile_test

import (
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/almanac-go/almanac/internal/reftest"
	"gonum.org/v1/gonum/mat"
)

// TestReferenceConventions runs the reference handlers on forms of
// fixture that the shared README allows but that the files at hand do not
// show, so that a fixture added later is understood: the present fixtures
// with their nodes in another order, without levels, parents or dates (at
// frequency 52), with every node renamed (grouped aggregates no longer
// "factor=value"), with only some methods and only the inputs those need,
// with a tolerance per key; the lung-deaths data under other names; and a
// grouped structure without interaction aggregates, which NewGrouped
// cannot build. The variants are made by relabelling the reference files,
// which leaves every expected value as the reference computed it, except
// the last, whose expected values are invented property-test data
// computed here from the published closed forms (Gross & Sohl 1990 for
// bottom-up, Hyndman et al. 2011 for OLS).
func TestReferenceConventions(t *testing.T) {
	dir := t.TempDir()
	src, err := filepath.Glob("testdata/reference/*.json")
	if err != nil || len(src) == 0 {
		t.Fatalf("no fixtures: %v", err)
	}
	write := func(doc map[string]any, suffix string) {
		doc["case"] = doc["case"].(string) + "_" + suffix
		b, err := json.Marshal(doc)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, doc["case"].(string)+".json"), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	load := func(path string) map[string]any {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		var doc map[string]any
		if err := json.Unmarshal(b, &doc); err != nil {
			t.Fatal(err)
		}
		return doc
	}
	for _, path := range src {
		switch load(path)["kind"] {
		case "reconciliation":
			write(reordered(load(path)), "reordered")
			write(bare(load(path)), "bare")
			write(renamed(load(path)), "renamed")
			write(subset(load(path)), "subset")
		case "hierarchy_data":
			write(renamedData(load(path)), "renamed")
		}
	}
	write(groupedWithoutInteractions(t), "variant")
	reftest.Run(t, dir, map[string]reftest.Handler{
		"hierarchy_data": checkHierarchyData,
		"reconciliation": checkReconciliation,
	})
}

func at(doc map[string]any, path string) any {
	var cur any = doc
	for _, p := range strings.Split(path, ".") {
		cur = cur.(map[string]any)[p]
	}
	return cur
}

// permuteCols reorders the columns of a JSON matrix: new column k is old
// column perm[k].
func permuteCols(m any, perm []int) []any {
	rows := m.([]any)
	out := make([]any, len(rows))
	for i, r := range rows {
		old := r.([]any)
		nr := make([]any, len(perm))
		for k, p := range perm {
			nr[k] = old[p]
		}
		out[i] = nr
	}
	return out
}

func permuteList(l any, perm []int) []any {
	old := l.([]any)
	out := make([]any, len(perm))
	for k, p := range perm {
		out[k] = old[p]
	}
	return out
}

// reordered lists the aggregates in reverse order (the top last among
// them) and the bottom series in reverse order, permuting every matrix
// alike.
func reordered(doc map[string]any) map[string]any {
	spec := doc["spec"].(map[string]any)
	nodes := spec["nodes"].([]any)
	n := len(nodes)
	var aggs, bottoms []int
	for i, e := range nodes {
		node := e.(map[string]any)
		bs := node["bottoms"].([]any)
		if len(bs) == 1 && bs[0] == node["name"] {
			bottoms = append(bottoms, i)
		} else {
			aggs = append(aggs, i)
		}
	}
	slices.Reverse(aggs)
	slices.Reverse(bottoms)
	perm := append(append([]int(nil), aggs...), bottoms...)
	na := n - len(bottoms)
	bperm := make([]int, len(bottoms))
	for j, p := range bottoms {
		bperm[j] = p - na
	}
	spec["nodes"] = permuteList(nodes, perm)
	spec["summing_matrix"] = permuteCols(permuteList(spec["summing_matrix"], perm), bperm)
	for _, key := range []string{"history", "residuals", "base_forecasts"} {
		if spec[key] != nil {
			spec[key] = permuteCols(spec[key], perm)
		}
	}
	expect := doc["expect"].(map[string]any)
	for key, v := range expect {
		switch {
		case strings.HasSuffix(key, "_p"):
			expect[key] = permuteList(v, bperm)
		case key == "mint_shrink_lambda":
		default:
			expect[key] = permuteCols(v, perm)
		}
	}
	return doc
}

// bare drops levels, parents and the dataset's dates, at frequency 52.
func bare(doc map[string]any) map[string]any {
	for _, e := range at(doc, "spec.nodes").([]any) {
		node := e.(map[string]any)
		delete(node, "level")
		delete(node, "parent")
	}
	if ds, ok := doc["dataset"].(map[string]any); ok {
		delete(ds, "start")
		delete(ds, "end")
		ds["frequency"] = 52.0
	}
	return doc
}

// renamed gives every node a name of no particular form.
func renamed(doc map[string]any) map[string]any {
	nodes := at(doc, "spec.nodes").([]any)
	names := map[string]string{}
	for i, e := range nodes {
		names[e.(map[string]any)["name"].(string)] = fmt.Sprintf("node %02d", len(nodes)-i)
	}
	for _, e := range nodes {
		node := e.(map[string]any)
		node["name"] = names[node["name"].(string)]
		if p, ok := node["parent"].(string); ok {
			node["parent"] = names[p]
		}
		bs := node["bottoms"].([]any)
		for k, b := range bs {
			bs[k] = names[b.(string)]
		}
	}
	return doc
}

// subset keeps only bottom-up, OLS and WLS (structural) — methods that
// need neither residuals nor history, which are removed — with a
// tolerance entry of its own for each.
func subset(doc map[string]any) map[string]any {
	expect := doc["expect"].(map[string]any)
	for key := range expect {
		if key != "bottom_up" && key != "ols" && key != "wls_structural" {
			delete(expect, key)
		}
	}
	spec := doc["spec"].(map[string]any)
	delete(spec, "residuals")
	delete(spec, "history")
	tol := doc["tolerance"].(map[string]any)
	star := tol["*"]
	delete(tol, "*")
	for key := range expect {
		tol[key] = star
	}
	return doc
}

// renamedData renames the series of a hierarchy_data fixture and lists
// the bottom series first in S.
func renamedData(doc map[string]any) map[string]any {
	sm := at(doc, "spec.summing_matrix").(map[string]any)
	rows := sm["rows"].([]any)
	names := map[string]string{}
	for i, r := range rows {
		names[r.(string)] = fmt.Sprintf("series-%c", 'a'+i)
	}
	rn := func(l []any) {
		for i, v := range l {
			l[i] = names[v.(string)]
		}
	}
	rn(rows)
	rn(sm["cols"].([]any))
	h := at(doc, "spec.hierarchy").(map[string]any)
	h["total"] = names[h["total"].(string)]
	rn(h["bottom"].([]any))
	series := doc["series"].(map[string]any)
	renamedSeries := map[string]any{}
	for k, v := range series {
		renamedSeries[names[k]] = v
	}
	doc["series"] = renamedSeries
	expect := doc["expect"].(map[string]any)
	tol := doc["tolerance"].(map[string]any)
	for old, nw := range names {
		key := "max_abs_diff_" + old + "_minus_sum"
		if v, ok := expect[key]; ok {
			delete(expect, key)
			expect["max_abs_diff_"+nw+"_minus_sum"] = v
		}
		if v, ok := tol[key]; ok {
			delete(tol, key)
			tol["max_abs_diff_"+nw+"_minus_sum"] = v
		}
	}
	// Bottom series first, the total last.
	perm := make([]int, len(rows))
	for i := range perm {
		perm[i] = (i + 1) % len(rows)
	}
	sm["rows"] = permuteList(rows, perm)
	sm["S"] = permuteList(sm["S"], perm)
	return doc
}

// groupedWithoutInteractions: three factors of two values each, eight
// bottom series, aggregates for the total and each factor's values but
// none for pairs of factors. Invented inputs; expected values from the
// closed forms evaluated here with gonum (bottom-up: S times the bottom
// forecasts; OLS: S (S'S)⁻¹ S' ŷ).
func groupedWithoutInteractions(t *testing.T) map[string]any {
	type node struct {
		name    string
		bottoms []string
	}
	var bottoms []string
	for _, a := range []string{"a1", "a2"} {
		for _, b := range []string{"b1", "b2"} {
			for _, c := range []string{"c1", "c2"} {
				bottoms = append(bottoms, a+"/"+b+"/"+c)
			}
		}
	}
	nodes := []node{{"all", bottoms}}
	for _, v := range []string{"a1", "a2", "b1", "b2", "c1", "c2"} {
		var bs []string
		for _, b := range bottoms {
			if slices.Contains(strings.Split(b, "/"), v) {
				bs = append(bs, b)
			}
		}
		nodes = append(nodes, node{"group " + v, bs})
	}
	for _, b := range bottoms {
		nodes = append(nodes, node{b, []string{b}})
	}
	n, m := len(nodes), len(bottoms)
	s := mat.NewDense(n, m, nil)
	var jsonNodes, sRows []any
	for i, nd := range nodes {
		var bl []any
		for _, b := range nd.bottoms {
			bl = append(bl, b)
			s.Set(i, slices.Index(bottoms, b), 1)
		}
		jsonNodes = append(jsonNodes, map[string]any{"name": nd.name, "parent": nil, "bottoms": bl})
		sRows = append(sRows, mat.Row(nil, i, s))
	}
	rng := rand.New(rand.NewPCG(2027, 12))
	base := mat.NewDense(3, n, nil)
	for i := 0; i < 3; i++ {
		for j := 0; j < n; j++ {
			base.Set(i, j, 10*float64(len(nodes[j].bottoms))+rng.NormFloat64())
		}
	}
	var bu mat.Dense
	bu.Mul(base.Slice(0, 3, n-m, n), s.T())
	var sts, inv, g, b, ols mat.Dense
	sts.Mul(s.T(), s)
	if err := inv.Inverse(&sts); err != nil {
		t.Fatal(err)
	}
	g.Mul(&inv, s.T())
	b.Mul(base, g.T())
	ols.Mul(&b, s.T())
	rowsOfJSON := func(x mat.Matrix) []any {
		var out []any
		for _, r := range rowsOf(x) {
			out = append(out, r)
		}
		return out
	}
	return map[string]any{
		"case":      "invented_grouped_no_interactions",
		"package":   "reconcile",
		"kind":      "reconciliation",
		"reference": "invented property-test data; closed forms evaluated with gonum in this test",
		"call":      "bottom_up = base[:, bottoms] S'; ols = base G' S', G = (S'S)^-1 S'",
		"dataset":   map[string]any{"name": "invented", "frequency": 4.0},
		"spec": map[string]any{
			"structure":      "grouped",
			"nodes":          jsonNodes,
			"summing_matrix": sRows,
			"base_forecasts": rowsOfJSON(base),
		},
		"expect":    map[string]any{"bottom_up": rowsOfJSON(&bu), "ols": rowsOfJSON(&ols)},
		"tolerance": map[string]any{"*": map[string]any{"abs": 1e-9, "rel": 1e-9, "why": "closed forms"}},
	}
}
