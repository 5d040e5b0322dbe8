package reconcile

import (
	"fmt"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Grouped is a cross-classified (grouped) structure: every bottom series
// carries one value for each of several factors (for example region and
// product family), and there is an aggregate for the total, for every
// value of every factor, and for every combination of values of every
// proper subset of the factors (interactions, present with three or more
// factors).
//
// Node order and names: the total ("total", level 0); then the subsets of
// factors by size and, within a size, in the order of the factor indices
// ({0}, {1}, ..., {0,1}, {0,2}, ...); within a subset, one node per
// combination of values in order of first appearance among the bottom
// series, named "factor=value" joined by "|" (for example "region=east"
// or "region=east|channel=web"); the level of such a node is the subset
// size. Last come the bottom series in the order given, named by their
// values joined by "|" ("east|paper"), at level len(factors).
//
// A *Grouped is immutable and safe for concurrent use.
type Grouped struct {
	c       core
	factors []string
}

var _ Structure = (*Grouped)(nil)

// MaxFactors is the largest number of factors NewGrouped accepts. Every
// subset of the factors gets at least one aggregate, so k factors make at
// least 2^k nodes: 16 factors already make 65,536, far beyond what the
// dense projection methods can solve.
const MaxFactors = 16

// NewGrouped builds a grouped structure from the factor names and one row
// of factor values per bottom series.
//
// Errors wrap ErrNoBottom (no rows or no factors), ErrStructure (more
// than MaxFactors factors, a row of the wrong width, an empty factor name
// or value) or ErrDuplicateName (two factors of the same name, two equal
// rows, or generated names that collide).
func NewGrouped(factors []string, bottom [][]string) (*Grouped, error) {
	k := len(factors)
	if k == 0 {
		return nil, fmt.Errorf("reconcile: %w: grouped structure without factors", ErrNoBottom)
	}
	if k > MaxFactors {
		return nil, fmt.Errorf("reconcile: %w: %d factors, at most %d (k factors make at least 2^k aggregate nodes)", ErrStructure, k, MaxFactors)
	}
	if len(bottom) == 0 {
		return nil, fmt.Errorf("reconcile: %w: grouped structure without bottom series", ErrNoBottom)
	}
	seenF := map[string]bool{}
	for _, f := range factors {
		if err := checkName("factor", f); err != nil {
			return nil, err
		}
		if seenF[f] {
			return nil, fmt.Errorf("reconcile: %w: factor %q given twice", ErrDuplicateName, f)
		}
		seenF[f] = true
	}
	for r, row := range bottom {
		if len(row) != k {
			return nil, fmt.Errorf("reconcile: %w: bottom row %d has %d values for %d factors", ErrStructure, r, len(row), k)
		}
		for _, v := range row {
			if v == "" {
				return nil, fmt.Errorf("reconcile: %w: bottom row %d has an empty value", ErrStructure, r)
			}
		}
	}
	g := &Grouped{factors: append([]string(nil), factors...)}
	c := &g.c
	c.m = len(bottom)
	add := func(name string, level int, bs []int) {
		c.names = append(c.names, name)
		c.levels = append(c.levels, level)
		c.parents = append(c.parents, -1)
		c.bottoms = append(c.bottoms, bs)
	}
	all := make([]int, c.m)
	for j := range all {
		all[j] = j
	}
	add("total", 0, all)
	for size := 1; size < k; size++ {
		for _, subset := range combinations(k, size) {
			var keys []string
			members := map[string][]int{}
			for j, row := range bottom {
				parts := make([]string, len(subset))
				for q, f := range subset {
					parts[q] = factors[f] + "=" + row[f]
				}
				key := strings.Join(parts, "|")
				if _, ok := members[key]; !ok {
					keys = append(keys, key)
				}
				members[key] = append(members[key], j)
			}
			for _, key := range keys {
				add(key, size, members[key])
			}
		}
	}
	for j, row := range bottom {
		add(strings.Join(row, "|"), k, []int{j})
	}
	seen := make(map[string]bool, len(c.names))
	for _, name := range c.names {
		if seen[name] {
			return nil, fmt.Errorf("reconcile: %w: node %q occurs twice (equal bottom rows or colliding names)", ErrDuplicateName, name)
		}
		seen[name] = true
	}
	c.finish()
	return g, nil
}

// combinations returns the size-element subsets of {0..k-1} in
// lexicographic order.
func combinations(k, size int) [][]int {
	var out [][]int
	cur := make([]int, 0, size)
	var rec func(start int)
	rec = func(start int) {
		if len(cur) == size {
			out = append(out, append([]int(nil), cur...))
			return
		}
		for i := start; i < k; i++ {
			cur = append(cur, i)
			rec(i + 1)
			cur = cur[:len(cur)-1]
		}
	}
	rec(0)
	return out
}

// Factors returns the factor names.
func (g *Grouped) Factors() []string { return append([]string(nil), g.factors...) }

// Len returns the number of nodes.
func (g *Grouped) Len() int { return g.c.n() }

// NumBottom returns the number of bottom series.
func (g *Grouped) NumBottom() int { return g.c.m }

// Names returns the node names in node order.
func (g *Grouped) Names() []string { return append([]string(nil), g.c.names...) }

// Index returns the position of the named node.
func (g *Grouped) Index(name string) (int, bool) { i, ok := g.c.index[name]; return i, ok }

// Level returns the level of node i: the number of factors it is broken
// down by (0 for the total, -1 when i is out of range).
func (g *Grouped) Level(i int) int { return g.c.level(i) }

// NumLevels returns the number of levels (factors plus one).
func (g *Grouped) NumLevels() int { return g.c.nlevels }

// LevelNodes returns the nodes of one level, in node order.
func (g *Grouped) LevelNodes(level int) []int { return g.c.levelNodes(level) }

// Bottoms returns the bottom positions (0..m-1) under node i.
func (g *Grouped) Bottoms(i int) []int { return g.c.bottomsOf(i) }

// Summing returns a fresh copy of the n × m summing matrix S.
func (g *Grouped) Summing() *mat.Dense { return g.c.summing() }

func (g *Grouped) tree() *core {
	if g == nil {
		return nil
	}
	return &g.c
}
