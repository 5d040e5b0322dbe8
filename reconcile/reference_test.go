package reconcile_test

import (
	"math"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// TestReference checks every fixture in testdata/reference (copied
// unchanged from the shared reference set; format and formulas in its
// README, "Package reconcile"). The reconciliation fixtures hold numpy
// 1.24.2 evaluations of the published closed forms (bottom-up and
// top-down proportions: Gross & Sohl 1990; forecast proportions:
// Athanasopoulos, Ahmed & Hyndman 2009; OLS: Hyndman et al. 2011; WLS:
// Athanasopoulos et al. 2017; MinT and the Schäfer–Strimmer shrinkage:
// Wickramasuriya, Athanasopoulos & Hyndman 2019); the lung-deaths data are
// R's datasets ldeaths, mdeaths and fdeaths.
//
// The handlers follow the README's conventions rather than the files at
// hand: any number of nodes in any order, hierarchies (parent links given
// or implied by the bottom sets) and grouped structures (with or without
// levels, with or without interaction aggregates, any naming), every
// documented method key present or absent (middle-out at any level), the
// inputs read only when a present key needs them, datasets with or
// without dates and of any frequency (neither matters to reconciliation),
// and tolerances taken from the fixture only. An expected key the test
// does not know fails it.
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"hierarchy_data": checkHierarchyData,
		"reconciliation": checkReconciliation,
	})
}

// tolerance is the fixture's rule for one expected value: pass when
// |got − want| ≤ abs + rel·|want|. An entry with only a "why" is
// informative: differences are logged, not failed (README, "File
// format").
type tolerance struct {
	abs, rel float64
	info     bool
	key      string
}

// tolFor resolves the tolerance of expect.<path>: the entry named by the
// path itself, else by its nearest enclosing path, else "*". Without any
// entry the comparison is exact (never a looser default). A one-sided
// "bar" has no meaning for the arithmetic checked here and fails.
func tolFor(t *testing.T, f *reftest.Fixture, path string) tolerance {
	t.Helper()
	v, _ := f.Get("tolerance")
	entries, _ := v.(map[string]any)
	keys := []string{path}
	for p := path; strings.Contains(p, "."); {
		p = p[:strings.LastIndex(p, ".")]
		keys = append(keys, p)
	}
	keys = append(keys, "*")
	for _, k := range keys {
		e, ok := entries[k].(map[string]any)
		if !ok {
			continue
		}
		if _, bar := e["bar"]; bar {
			t.Fatalf("tolerance %q is a one-sided bar; no reconciliation result has one", k)
		}
		_, hasAbs := e["abs"]
		_, hasRel := e["rel"]
		abs, rel, _ := f.Tol(k)
		return tolerance{abs: abs, rel: rel, info: !hasAbs && !hasRel, key: k}
	}
	return tolerance{key: "(none: exact)"}
}

func (tl tolerance) scalar(t *testing.T, name string, got, want float64) {
	t.Helper()
	if tl.info {
		if !numtest.Close(got, want, 0, 0) {
			t.Logf("%s: %v, reference %v (tolerance %q is informative)", name, got, want, tl.key)
		}
		return
	}
	numtest.Scalar(t, name, got, want, tl.abs, tl.rel)
}

func (tl tolerance) matrix(t *testing.T, name string, got [][]float64, want [][]float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d rows, want %d", name, len(got), len(want))
	}
	for i := range want {
		if len(got[i]) != len(want[i]) {
			t.Fatalf("%s: row %d has %d values, want %d", name, i, len(got[i]), len(want[i]))
		}
		for j := range want[i] {
			tl.scalar(t, name+"["+strconv.Itoa(i)+"]["+strconv.Itoa(j)+"]", got[i][j], want[i][j])
		}
	}
}

func denseOf(t *testing.T, rows [][]float64) *mat.Dense {
	t.Helper()
	if len(rows) == 0 || len(rows[0]) == 0 {
		t.Fatal("empty matrix in the fixture")
	}
	d := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		if len(r) != len(rows[0]) {
			t.Fatalf("ragged matrix in the fixture: row %d has %d values, row 0 %d", i, len(r), len(rows[0]))
		}
		d.SetRow(i, r)
	}
	return d
}

func rowsOf(m mat.Matrix) [][]float64 {
	r, c := m.Dims()
	out := make([][]float64, r)
	for i := range out {
		out[i] = make([]float64, c)
		for j := range out[i] {
			out[i][j] = m.At(i, j)
		}
	}
	return out
}

func stringsAt(t *testing.T, f *reftest.Fixture, path string) []string {
	t.Helper()
	v, ok := f.Get(path)
	if !ok {
		t.Fatalf("no %s", path)
	}
	arr, ok := v.([]any)
	if !ok {
		t.Fatalf("%s is %T, not an array", path, v)
	}
	out := make([]string, len(arr))
	for i, e := range arr {
		if out[i], ok = e.(string); !ok {
			t.Fatalf("%s[%d] is %T, not a string", path, i, e)
		}
	}
	return out
}

// fixtureStructure is a structure as a fixture describes it: node names
// in the fixture's order, the bottom names (the last m nodes), each
// node's set of bottoms, and optionally levels and parents.
type fixtureStructure struct {
	names, bottomNames []string
	bottoms            [][]int // fixture bottom positions under each node
	levels             []int   // nil when the fixture gives none
	parents            []string
	hasParents         bool
}

func (fs *fixtureStructure) n() int { return len(fs.names) }
func (fs *fixtureStructure) m() int { return len(fs.bottomNames) }

// summing returns the fixture's S from the bottom sets.
func (fs *fixtureStructure) summing() [][]float64 {
	s := make([][]float64, fs.n())
	for i, bs := range fs.bottoms {
		s[i] = make([]float64, fs.m())
		for _, j := range bs {
			s[i][j] = 1
		}
	}
	return s
}

// custom returns the structure in the fixture's own node order, through
// the test-only constructor.
func (fs *fixtureStructure) custom() reconcile.Structure {
	levels := fs.levels
	if levels == nil {
		levels = make([]int, fs.n())
		for i, bs := range fs.bottoms {
			switch {
			case len(bs) == fs.m():
				levels[i] = 0
			case i >= fs.n()-fs.m():
				levels[i] = 2
			default:
				levels[i] = 1
			}
		}
	}
	return reconcile.NewCustomStructure(fs.names, levels, fs.bottoms, fs.m())
}

func setKey(bs []int) string {
	parts := make([]string, len(bs))
	for i, b := range bs {
		parts[i] = strconv.Itoa(b)
	}
	return strings.Join(parts, ",")
}

// parentsFromSets gives each node, when the fixture names no parents, the
// node one level up (when levels are given) whose bottom set contains its
// own, choosing the smallest such set; a node whose set equals that of a
// node listed before it (a single child) takes the nearest such node.
func (fs *fixtureStructure) parentsFromSets(t *testing.T) []string {
	out := make([]string, fs.n())
	for i, bi := range fs.bottoms {
		best := -1
		for k, bk := range fs.bottoms {
			if k == i || !isSubset(bi, bk) || len(bk) == len(bi) && k > i {
				continue
			}
			if fs.levels != nil && fs.levels[k] != fs.levels[i]-1 {
				continue
			}
			if best < 0 || len(bk) < len(fs.bottoms[best]) || len(bk) == len(fs.bottoms[best]) && k > best {
				best = k
			}
		}
		if best >= 0 {
			out[i] = fs.names[best]
		}
	}
	return out
}

func isSubset(a, b []int) bool {
	set := map[int]bool{}
	for _, x := range b {
		set[x] = true
	}
	for _, x := range a {
		if !set[x] {
			return false
		}
	}
	return true
}

// mapping relates our structure to the fixture's: ours[perm[k]] is
// fixture node k.
type mapping struct {
	st   reconcile.Structure
	h    *reconcile.Hierarchy // nil unless st is one
	perm []int
}

// toOurs reorders the columns of a fixture matrix (one per fixture node)
// into our node order.
func (mp mapping) toOurs(x *mat.Dense) *mat.Dense {
	r, c := x.Dims()
	out := mat.NewDense(r, c, nil)
	for k := 0; k < c; k++ {
		for i := 0; i < r; i++ {
			out.Set(i, mp.perm[k], x.At(i, k))
		}
	}
	return out
}

// toFixture reorders the columns of one of our matrices into the
// fixture's node order.
func (mp mapping) toFixture(x mat.Matrix) [][]float64 {
	r, _ := x.Dims()
	out := make([][]float64, r)
	for i := range out {
		out[i] = make([]float64, len(mp.perm))
		for k, p := range mp.perm {
			out[i][k] = x.At(i, p)
		}
	}
	return out
}

// bottomPerm returns, for each fixture bottom j, our bottom position.
func (mp mapping) bottomPerm(fs *fixtureStructure) []int {
	n, m := fs.n(), fs.m()
	out := make([]int, m)
	for j := range out {
		out[j] = mp.perm[n-m+j] - (n - m)
	}
	return out
}

// checkAgainst compares our structure with the fixture's: every node has
// the fixture's bottom set (so S agrees up to the node order), and the
// fixture's levels when it gives them.
func (mp mapping) checkAgainst(t *testing.T, fs *fixtureStructure) {
	t.Helper()
	n, m := fs.n(), fs.m()
	if mp.st.Len() != n || mp.st.NumBottom() != m {
		t.Fatalf("our structure has %d nodes and %d bottom series, the fixture %d and %d", mp.st.Len(), mp.st.NumBottom(), n, m)
	}
	for k := n - m; k < n; k++ {
		if mp.perm[k] < n-m {
			t.Fatalf("fixture bottom %q is not a bottom series of ours", fs.names[k])
		}
	}
	bp := mp.bottomPerm(fs)
	s := mp.st.Summing()
	want := fs.summing()
	for k := 0; k < n; k++ {
		for j := 0; j < m; j++ {
			if got := s.At(mp.perm[k], bp[j]); got != want[k][j] {
				t.Fatalf("S[%s][%s] = %v, the fixture has %v", fs.names[k], fs.bottomNames[j], got, want[k][j])
			}
		}
		if fs.levels != nil {
			if got := mp.st.Level(mp.perm[k]); got != fs.levels[k] {
				t.Errorf("level of %s = %d, the fixture has %d", fs.names[k], got, fs.levels[k])
			}
		}
	}
}

// byName maps fixture nodes to ours by name.
func byName(t *testing.T, st reconcile.Structure, names []string) []int {
	t.Helper()
	perm := make([]int, len(names))
	for k, name := range names {
		i, ok := st.Index(name)
		if !ok {
			t.Fatalf("node %q of the fixture is not in our structure", name)
		}
		perm[k] = i
	}
	return perm
}

// hierarchyOf builds the fixture's tree with NewHierarchy (parents from
// the fixture, or implied by the bottom sets) and checks HierarchyFromPaths
// gives the same S.
func hierarchyOf(t *testing.T, fs *fixtureStructure) mapping {
	t.Helper()
	parents := fs.parents
	if !fs.hasParents {
		parents = fs.parentsFromSets(t)
	}
	links := make([]reconcile.Link, fs.n())
	for i, name := range fs.names {
		links[i] = reconcile.Link{Name: name, Parent: parents[i]}
	}
	h, err := reconcile.NewHierarchy(links...)
	if err != nil {
		t.Fatal(err)
	}
	mp := mapping{st: h, h: h, perm: byName(t, h, fs.names)}
	mp.checkAgainst(t, fs)

	// The same tree from paths must give the same S, up to node order.
	parent := map[string]string{}
	for i, name := range fs.names {
		parent[name] = parents[i]
	}
	var paths []string
	for _, name := range fs.bottomNames {
		var parts []string
		for v := name; v != ""; v = parent[v] {
			parts = append([]string{v}, parts...)
		}
		paths = append(paths, strings.Join(parts, "\x1f"))
	}
	hp, err := reconcile.HierarchyFromPaths(paths, "\x1f")
	if err != nil {
		t.Fatal(err)
	}
	// HierarchyFromPaths names nodes by their paths; the last part is
	// the fixture's name.
	pathNames := hp.Names()
	for i, p := range pathNames {
		pathNames[i] = p[strings.LastIndex(p, "\x1f")+1:]
	}
	perm := make([]int, fs.n())
	for k, name := range fs.names {
		perm[k] = slices.Index(pathNames, name)
		if perm[k] < 0 {
			t.Fatalf("HierarchyFromPaths lost node %q", name)
		}
	}
	mapping{st: hp, perm: perm}.checkAgainst(t, fs)
	return mp
}

// groupedOf builds the fixture's grouped structure with NewGrouped when
// its aggregates are those NewGrouped makes (the total, every value of
// every factor and every combination for proper subsets of factors);
// otherwise it uses the fixture's structure as given (logged), so the
// methods are checked on it either way.
func groupedOf(t *testing.T, fs *fixtureStructure) mapping {
	t.Helper()
	n, m := fs.n(), fs.m()
	// Single-factor aggregates: neither the total nor a bottom series, and
	// not the intersection of two larger aggregates.
	isAgg := func(i int) bool { return len(fs.bottoms[i]) < m && i < n-m }
	var single []int
	for i := 0; i < n-m; i++ {
		if !isAgg(i) {
			continue
		}
		if fs.levels != nil {
			if fs.levels[i] == 1 {
				single = append(single, i)
			}
			continue
		}
		inter := false
		for a := 0; a < n-m && !inter; a++ {
			for b := a + 1; b < n-m && !inter; b++ {
				if a == i || b == i || !isAgg(a) || !isAgg(b) || len(fs.bottoms[a]) <= len(fs.bottoms[i]) || len(fs.bottoms[b]) <= len(fs.bottoms[i]) {
					continue
				}
				inter = setKey(intersect(fs.bottoms[a], fs.bottoms[b])) == setKey(fs.bottoms[i])
			}
		}
		if !inter {
			single = append(single, i)
		}
	}
	// Factors: greedy groups of pairwise disjoint aggregates, in node
	// order, each covering every bottom series.
	var groups [][]int
	for _, i := range single {
		placed := false
		for g := range groups {
			disjoint := true
			for _, k := range groups[g] {
				disjoint = disjoint && len(intersect(fs.bottoms[i], fs.bottoms[k])) == 0
			}
			if disjoint {
				groups[g] = append(groups[g], i)
				placed = true
				break
			}
		}
		if !placed {
			groups = append(groups, []int{i})
		}
	}
	fallback := func(why string) mapping {
		t.Logf("NewGrouped cannot express this structure (%s); checking the methods on the fixture's structure as given", why)
		perm := make([]int, n)
		for k := range perm {
			perm[k] = k
		}
		mp := mapping{st: fs.custom(), perm: perm}
		mp.checkAgainst(t, fs)
		return mp
	}
	if len(groups) == 0 {
		return fallback("no factor found")
	}
	factors := make([]string, len(groups))
	values := make([][]string, m) // values[bottom][factor]
	for j := range values {
		values[j] = make([]string, len(groups))
	}
	for g, members := range groups {
		covered := 0
		factors[g] = "factor" + strconv.Itoa(g)
		for q, i := range members {
			name := fs.names[i]
			value := name
			if fac, v, ok := strings.Cut(name, "="); ok && !strings.Contains(v, "|") {
				if q == 0 {
					factors[g] = fac
				}
				value = v
			}
			for _, j := range fs.bottoms[i] {
				values[j][g] = value
				covered++
			}
		}
		if covered != m {
			return fallback("the aggregates of factor " + factors[g] + " do not cover every bottom series")
		}
	}
	g, err := reconcile.NewGrouped(factors, values)
	if err != nil {
		return fallback(err.Error())
	}
	if g.Len() != n {
		return fallback("NewGrouped makes " + strconv.Itoa(g.Len()) + " nodes, the fixture has " + strconv.Itoa(n))
	}
	// Match nodes by their bottom sets (our bottom j is fixture bottom j).
	ours := map[string][]int{}
	for i := 0; i < g.Len(); i++ {
		ours[setKey(g.Bottoms(i))] = append(ours[setKey(g.Bottoms(i))], i)
	}
	perm := make([]int, n)
	for k := 0; k < n; k++ {
		cands := ours[setKey(fs.bottoms[k])]
		if len(cands) == 0 {
			return fallback("node " + fs.names[k] + " has no counterpart")
		}
		perm[k] = cands[0]
		ours[setKey(fs.bottoms[k])] = cands[1:]
	}
	mp := mapping{st: g, perm: perm}
	mp.checkAgainst(t, fs)
	return mp
}

func intersect(a, b []int) []int {
	set := map[int]bool{}
	for _, x := range b {
		set[x] = true
	}
	var out []int
	for _, x := range a {
		if set[x] {
			out = append(out, x)
		}
	}
	return out
}

// checkHierarchyData: data of a total and its parts, and the aggregation
// identity in them. Source of the present fixture: R datasets ldeaths =
// mdeaths + fdeaths (uk_lung_deaths; the identity was verified in R, max
// |diff| = 0). The structure comes from spec.summing_matrix (rows, cols,
// S), and from spec.hierarchy (total and bottom) through NewHierarchy
// when given; every aggregate row r with an expect key
// max_abs_diff_<r>_minus_sum is checked over the complete time points.
func checkHierarchyData(t *testing.T, f *reftest.Fixture) {
	rowNames := stringsAt(t, f, "spec.summing_matrix.rows")
	colNames := stringsAt(t, f, "spec.summing_matrix.cols")
	sm := f.Matrix(t, "spec.summing_matrix.S")
	n, m := len(rowNames), len(colNames)
	if len(sm) != n {
		t.Fatalf("S has %d rows for %d names", len(sm), n)
	}
	// Our node order puts the bottom series last, in the order of cols.
	isBottom := map[string]int{}
	for j, c := range colNames {
		isBottom[c] = j
	}
	fs := &fixtureStructure{bottomNames: colNames}
	var aggRows []int
	for r, name := range rowNames {
		if _, ok := isBottom[name]; !ok {
			aggRows = append(aggRows, r)
		}
	}
	order := append([]int(nil), aggRows...)
	for _, c := range colNames {
		r := slices.Index(rowNames, c)
		if r < 0 {
			t.Fatalf("bottom series %q has no row in S", c)
		}
		order = append(order, r)
	}
	if len(order) != n {
		t.Fatalf("S has %d rows: %d aggregates and %d bottom series expected", n, len(aggRows), m)
	}
	for _, r := range order {
		fs.names = append(fs.names, rowNames[r])
		if len(sm[r]) != m {
			t.Fatalf("row %s of S has %d entries for %d columns", rowNames[r], len(sm[r]), m)
		}
		var bs []int
		for j, v := range sm[r] {
			switch v {
			case 1:
				bs = append(bs, j)
			case 0:
			default:
				t.Fatalf("S[%s][%d] = %v, not 0 or 1", rowNames[r], j, v)
			}
		}
		fs.bottoms = append(fs.bottoms, bs)
	}
	perm := make([]int, n)
	for k := range perm {
		perm[k] = k
	}
	mp := mapping{st: fs.custom(), perm: perm}
	if f.Has("spec.hierarchy") {
		total := f.String("spec.hierarchy.total")
		links := []reconcile.Link{{Name: total}}
		for _, b := range stringsAt(t, f, "spec.hierarchy.bottom") {
			links = append(links, reconcile.Link{Name: b, Parent: total})
		}
		h, err := reconcile.NewHierarchy(links...)
		if err != nil {
			t.Fatal(err)
		}
		mp = mapping{st: h, h: h, perm: byName(t, h, fs.names)}
	}
	mp.checkAgainst(t, fs)

	// The aggregation identity in the data, through our structure:
	// history minus its bottom-up reconciliation, on the time points
	// where every series is present.
	cols := make([][]float64, n)
	T := -1
	for k, name := range fs.names {
		cols[k] = f.Floats(t, "series."+name)
		if T >= 0 && len(cols[k]) != T {
			t.Fatalf("series %s has %d values, another %d", name, len(cols[k]), T)
		}
		T = len(cols[k])
	}
	var complete [][]float64
	for tt := 0; tt < T; tt++ {
		row := make([]float64, n)
		ok := true
		for k := range cols {
			row[k] = cols[k][tt]
			ok = ok && !math.IsNaN(row[k])
		}
		if ok {
			complete = append(complete, row)
		}
	}
	if len(complete) == 0 {
		t.Fatal("no time point at which every series is present")
	}
	hist := mp.toOurs(denseOf(t, complete))
	bu, err := reconcile.BottomUp(mp.st, hist)
	if err != nil {
		t.Fatal(err)
	}
	worst := make([]float64, n) // per fixture node
	for k := range worst {
		for tt := range complete {
			worst[k] = math.Max(worst[k], math.Abs(hist.At(tt, mp.perm[k])-bu.At(tt, mp.perm[k])))
		}
	}
	v, _ := f.Get("expect")
	expect, _ := v.(map[string]any)
	keyRe := regexp.MustCompile(`^max_abs_diff_(.+)_minus_sum$`)
	holds := true
	for key := range expect {
		sub := keyRe.FindStringSubmatch(key)
		if sub == nil {
			continue
		}
		k := slices.Index(fs.names, sub[1])
		if k < 0 {
			t.Errorf("expect.%s names no series of the fixture", key)
			continue
		}
		tl := tolFor(t, f, key)
		tl.scalar(t, key, worst[k], f.Float(t, "expect."+key))
		holds = holds && worst[k] <= tl.abs
	}
	for key, want := range expect {
		switch {
		case keyRe.MatchString(key):
		case key == "aggregation_identity_holds":
			if want != holds {
				t.Errorf("aggregation identity holds = %v, the fixture says %v", holds, want)
			}
		default:
			t.Errorf("expect.%s is not checked by this test", key)
		}
	}
}

// readNodes reads spec.nodes (name, level, parent, bottoms; README,
// "Reconciliation").
func readNodes(t *testing.T, f *reftest.Fixture) *fixtureStructure {
	t.Helper()
	v, _ := f.Get("spec.nodes")
	arr, ok := v.([]any)
	if !ok || len(arr) == 0 {
		t.Fatal("spec.nodes missing or empty")
	}
	fs := &fixtureStructure{hasParents: true}
	levels := make([]int, 0, len(arr))
	var sets [][]string
	for i, e := range arr {
		node, ok := e.(map[string]any)
		if !ok {
			t.Fatalf("spec.nodes[%d] is %T", i, e)
		}
		name, _ := node["name"].(string)
		if name == "" {
			t.Fatalf("spec.nodes[%d] has no name", i)
		}
		fs.names = append(fs.names, name)
		if l, ok := node["level"].(float64); ok {
			levels = append(levels, int(l))
		}
		p, has := node["parent"]
		ps, _ := p.(string)
		fs.parents = append(fs.parents, ps)
		fs.hasParents = fs.hasParents && has && (p == nil || ps != "")
		bl, _ := node["bottoms"].([]any)
		var set []string
		for _, b := range bl {
			s, _ := b.(string)
			set = append(set, s)
		}
		sets = append(sets, set)
	}
	if len(levels) == len(arr) {
		fs.levels = levels
	}
	// The bottom series: nodes whose only bottom is themselves (README:
	// they come last).
	for i, set := range sets {
		if len(set) == 1 && set[0] == fs.names[i] {
			fs.bottomNames = append(fs.bottomNames, fs.names[i])
		} else if len(fs.bottomNames) > 0 {
			t.Fatalf("aggregate %q after a bottom series; the README puts bottom nodes last", fs.names[i])
		}
	}
	if len(fs.bottomNames) == 0 {
		t.Fatal("no bottom series in spec.nodes")
	}
	for i, set := range sets {
		var bs []int
		for _, b := range set {
			j := slices.Index(fs.bottomNames, b)
			if j < 0 {
				t.Fatalf("node %q lists %q, which is not a bottom series", fs.names[i], b)
			}
			bs = append(bs, j)
		}
		sort.Ints(bs)
		fs.bottoms = append(fs.bottoms, bs)
	}
	// A top whose parent is null and every other node's null too means a
	// grouped structure (no parents at all).
	tops := 0
	for _, p := range fs.parents {
		if p == "" {
			tops++
		}
	}
	fs.hasParents = fs.hasParents && tops == 1
	return fs
}

func checkReconciliation(t *testing.T, f *reftest.Fixture) {
	fs := readNodes(t, f)
	var mp mapping
	switch kind := f.String("spec.structure"); kind {
	case "hierarchy":
		mp = hierarchyOf(t, fs)
	case "grouped":
		mp = groupedOf(t, fs)
	default:
		t.Fatalf("unknown spec.structure %q", kind)
	}
	if f.Has("spec.summing_matrix") {
		want := f.Matrix(t, "spec.summing_matrix")
		got := fs.summing()
		if !slices.EqualFunc(got, want, slices.Equal[[]float64]) {
			t.Fatalf("spec.summing_matrix disagrees with the bottom sets of spec.nodes")
		}
	}

	// Inputs, read only when a present result needs them.
	lazy := func(key string) func() *mat.Dense {
		var m *mat.Dense
		return func() *mat.Dense {
			if m == nil {
				m = mp.toOurs(denseOf(t, f.Matrix(t, key)))
			}
			return m
		}
	}
	base, resid, hist := lazy("spec.base_forecasts"), lazy("spec.residuals"), lazy("spec.history")

	type method struct {
		spec func() reconcile.Spec
		// projection methods are checked in both algebraic forms
		projection bool
	}
	methods := map[string]method{
		"bottom_up":      {func() reconcile.Spec { return reconcile.Spec{Method: reconcile.MethodBottomUp} }, false},
		"ols":            {func() reconcile.Spec { return reconcile.Spec{Method: reconcile.MethodOLS} }, true},
		"wls_structural": {func() reconcile.Spec { return reconcile.Spec{Method: reconcile.MethodWLSStructural} }, true},
		"wls_variance": {func() reconcile.Spec {
			return reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: resid()}
		}, true},
		"mint_sample": {func() reconcile.Spec {
			return reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid()}
		}, true},
		"mint_shrink": {func() reconcile.Spec {
			return reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid()}
		}, true},
		"top_down_average_historical_proportions": {func() reconcile.Spec {
			return reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions, History: hist()}
		}, false},
		"top_down_proportions_of_historical_averages": {func() reconcile.Spec {
			return reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.ProportionsOfHistoricalAverages, History: hist()}
		}, false},
		"top_down_forecast_proportions": {func() reconcile.Spec {
			return reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.ForecastProportions}
		}, false},
	}
	middleOut := regexp.MustCompile(`^middle_out_level_([0-9]+)$`)
	v, _ := f.Get("expect")
	expect, _ := v.(map[string]any)
	keys := make([]string, 0, len(expect))
	for k := range expect {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, key := range keys {
		if expect[key] == nil {
			t.Errorf("expect.%s is null", key)
			continue
		}
		m, known := methods[key]
		if sub := middleOut.FindStringSubmatch(key); sub != nil {
			level, _ := strconv.Atoi(sub[1])
			m, known = method{func() reconcile.Spec {
				return reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: level}
			}, false}, true
		}
		tl := tolFor(t, f, key)
		switch {
		case known:
			forms := []string{"auto"}
			if m.projection {
				// Through S' W⁻¹ S and through U' W U.
				forms = []string{"bottom", "constraint", "auto"}
			}
			for _, form := range forms {
				t.Run(key+"/"+form, func(t *testing.T) {
					reconcile.ProjectionForms[form]()
					defer reconcile.ProjectionForms["auto"]()
					got, err := reconcile.Reconcile(mp.st, base(), m.spec())
					if err != nil {
						t.Fatal(err)
					}
					tl.matrix(t, key, mp.toFixture(got), f.Matrix(t, "expect."+key))
				})
			}
		case key == "mint_shrink_lambda":
			est, err := reconcile.EstimateCovariance(mp.st, resid(), reconcile.Shrinkage)
			if err != nil {
				t.Fatal(err)
			}
			tl.scalar(t, key, est.Lambda, f.Float(t, "expect."+key))
		case strings.HasPrefix(key, "top_down_") && strings.HasSuffix(key, "_p"):
			how := map[string]reconcile.Disaggregation{
				"top_down_average_historical_proportions_p":     reconcile.AverageHistoricalProportions,
				"top_down_proportions_of_historical_averages_p": reconcile.ProportionsOfHistoricalAverages,
			}
			d, ok := how[key]
			if !ok {
				t.Errorf("expect.%s is not checked by this test", key)
				continue
			}
			if mp.h == nil {
				t.Fatalf("expect.%s on a structure that is not a hierarchy", key)
			}
			got, err := reconcile.Proportions(mp.h, 0, hist(), d)
			if err != nil {
				t.Fatal(err)
			}
			// Proportions come in our bottom order; the fixture's is its
			// own.
			bp := mp.bottomPerm(fs)
			inFixture := make([]float64, len(bp))
			for j, p := range bp {
				inFixture[j] = got[p]
			}
			want := f.Floats(t, "expect."+key)
			if len(want) != len(inFixture) {
				t.Fatalf("%s: %d proportions, the fixture has %d", key, len(inFixture), len(want))
			}
			for j := range want {
				tl.scalar(t, key+"["+fs.bottomNames[j]+"]", inFixture[j], want[j])
			}
		default:
			t.Errorf("expect.%s is not checked by this test", key)
		}
	}
}
