package reconcile

import (
	"fmt"

	"github.com/almanac-go/almanac"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Structure is an aggregation structure: n nodes (series), the last m of
// which are the bottom series; every node is the sum of the bottom series
// under it. Both *Hierarchy and *Grouped implement it; the interface is
// sealed.
//
// Node order is fixed by the constructor and is the column order of every
// matrix the methods of this package take and return.
type Structure interface {
	// Len returns n, the number of nodes.
	Len() int
	// NumBottom returns m, the number of bottom series (the last m
	// nodes).
	NumBottom() int
	// Names returns the node names in node order.
	Names() []string
	// Index returns the position of the named node.
	Index(name string) (int, bool)
	// Level returns the level of node i (0 for the top).
	Level(i int) int
	// NumLevels returns the number of levels.
	NumLevels() int
	// LevelNodes returns the nodes of one level, in node order.
	LevelNodes(level int) []int
	// Bottoms returns the bottom positions (0..m-1, ascending) under
	// node i.
	Bottoms(i int) []int
	// Summing returns a fresh copy of the n × m summing matrix S.
	Summing() *mat.Dense

	tree() *core
}

// core is the shared representation of a structure.
type core struct {
	names    []string
	index    map[string]int
	levels   []int
	parents  []int   // -1 for the top and for every node of a grouped structure
	children [][]int // hierarchy only
	bottoms  [][]int // bottom positions under each node, ascending
	m        int
	nlevels  int
	sCols    [][]int // for each bottom position, the nodes that contain it
}

// finish builds the derived tables once names, levels, parents and
// bottoms are set.
func (c *core) finish() {
	n := len(c.names)
	c.index = make(map[string]int, n)
	for i, name := range c.names {
		c.index[name] = i
	}
	c.sCols = make([][]int, c.m)
	for i, bs := range c.bottoms {
		for _, j := range bs {
			c.sCols[j] = append(c.sCols[j], i)
		}
	}
	c.nlevels = 0
	for _, l := range c.levels {
		c.nlevels = max(c.nlevels, l+1)
	}
}

func (c *core) n() int { return len(c.names) }

func (c *core) bottomNode(j int) int { return c.n() - c.m + j }

func (c *core) level(i int) int {
	if i < 0 || i >= len(c.levels) {
		return -1
	}
	return c.levels[i]
}

func (c *core) levelNodes(level int) []int {
	var out []int
	for i, l := range c.levels {
		if l == level {
			out = append(out, i)
		}
	}
	return out
}

func (c *core) bottomsOf(i int) []int {
	if i < 0 || i >= len(c.bottoms) {
		return nil
	}
	return slices.Clone(c.bottoms[i])
}

// summing builds the dense S on demand; the structure itself keeps only
// the sparse lists of bottom series under each node.
func (c *core) summing() *mat.Dense {
	s := mat.NewDense(c.n(), c.m, nil)
	for i, bs := range c.bottoms {
		for _, j := range bs {
			s.Set(i, j, 1)
		}
	}
	return s
}

// aggregateRow writes the sums S·b of one vector of bottom values into
// dst (length n).
func (c *core) aggregateRow(dst, b []float64) {
	for i, bs := range c.bottoms {
		var s float64
		for _, j := range bs {
			s += b[j]
		}
		dst[i] = s
	}
}

func checkName(pkgWhat, name string) error {
	if name == "" {
		return fmt.Errorf("reconcile: %w: %s with an empty name", ErrStructure, pkgWhat)
	}
	return nil
}

// coreOf returns the representation behind st, or an error wrapping
// almanac.ErrInvalid for a nil structure or one not made by a
// constructor.
func coreOf(st Structure) (*core, error) {
	if st == nil {
		return nil, fmt.Errorf("reconcile: %w: nil structure", almanac.ErrInvalid)
	}
	c := st.tree()
	if c == nil || c.n() == 0 || c.index == nil {
		return nil, fmt.Errorf("reconcile: %w: empty structure (build it with NewHierarchy, HierarchyFromPaths or NewGrouped)", almanac.ErrInvalid)
	}
	return c, nil
}
