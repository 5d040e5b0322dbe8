package reconcile

import (
	"fmt"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Link names one node of a hierarchy and its parent. The single top node
// has an empty Parent.
type Link struct {
	Name   string
	Parent string
}

// Hierarchy is a tree of series: every node is the sum of its children,
// and the leaves are the bottom series. Leaves may sit at different
// depths.
//
// Node order: the aggregate (non-leaf) nodes first, top down, level by
// level (breadth first, children in the order they were given), then the
// leaves in depth-first order, so the bottom series under any node are
// contiguous. The level of a node is its depth (the top is level 0).
//
// A *Hierarchy is immutable and safe for concurrent use.
type Hierarchy struct {
	c core
}

var _ Structure = (*Hierarchy)(nil)

// NewHierarchy builds a hierarchy from parent links, in any order. Exactly
// one link must have an empty Parent (the top).
//
// Errors wrap ErrDuplicateName (a name given twice), ErrUnknownParent,
// ErrCycle (nodes not connected to the top, which with one parent per node
// means a cycle), ErrStructure (empty name, no top or several tops) or
// ErrNoBottom (no links).
func NewHierarchy(links ...Link) (*Hierarchy, error) {
	if len(links) == 0 {
		return nil, fmt.Errorf("reconcile: %w: hierarchy has no nodes", ErrNoBottom)
	}
	pos := make(map[string]int, len(links))
	for i, l := range links {
		if err := checkName("node", l.Name); err != nil {
			return nil, err
		}
		if _, dup := pos[l.Name]; dup {
			return nil, fmt.Errorf("reconcile: %w: %q", ErrDuplicateName, l.Name)
		}
		pos[l.Name] = i
	}
	top := -1
	children := make([][]int, len(links))
	for i, l := range links {
		if l.Parent == "" {
			if top >= 0 {
				return nil, fmt.Errorf("reconcile: %w: two top nodes %q and %q (a hierarchy has one)", ErrStructure, links[top].Name, l.Name)
			}
			top = i
			continue
		}
		p, ok := pos[l.Parent]
		if !ok {
			return nil, fmt.Errorf("reconcile: %w: %q names parent %q", ErrUnknownParent, l.Name, l.Parent)
		}
		children[p] = append(children[p], i)
	}
	if top < 0 {
		return nil, fmt.Errorf("reconcile: %w: no top node (a link with an empty Parent)", ErrStructure)
	}
	// Breadth-first from the top: depth of every reachable node.
	depth := make([]int, len(links))
	for i := range depth {
		depth[i] = -1
	}
	depth[top] = 0
	queue := []int{top}
	var aggregates []int
	for k := 0; k < len(queue); k++ {
		v := queue[k]
		if len(children[v]) > 0 {
			aggregates = append(aggregates, v)
		}
		for _, ch := range children[v] {
			depth[ch] = depth[v] + 1
			queue = append(queue, ch)
		}
	}
	if len(queue) != len(links) {
		for i, d := range depth {
			if d < 0 {
				return nil, fmt.Errorf("reconcile: %w: node %q is not connected to the top %q", ErrCycle, links[i].Name, links[top].Name)
			}
		}
	}
	// Leaves in depth-first order.
	var leaves []int
	var walk func(v int)
	walk = func(v int) {
		if len(children[v]) == 0 {
			leaves = append(leaves, v)
			return
		}
		for _, ch := range children[v] {
			walk(ch)
		}
	}
	walk(top)

	order := append(aggregates, leaves...)
	newPos := make([]int, len(links)) // input index -> node position
	for p, i := range order {
		newPos[i] = p
	}
	h := &Hierarchy{}
	c := &h.c
	c.m = len(leaves)
	n := len(order)
	c.names = make([]string, n)
	c.levels = make([]int, n)
	c.parents = make([]int, n)
	c.children = make([][]int, n)
	c.bottoms = make([][]int, n)
	leafPos := make(map[int]int, len(leaves))
	for j, v := range leaves {
		leafPos[v] = j
	}
	for p, i := range order {
		c.names[p] = links[i].Name
		c.levels[p] = depth[i]
		c.parents[p] = -1
		if links[i].Parent != "" {
			c.parents[p] = newPos[pos[links[i].Parent]]
		}
		for _, ch := range children[i] {
			c.children[p] = append(c.children[p], newPos[ch])
		}
	}
	// Bottoms under each node: the contiguous run of leaves in its subtree.
	var collect func(v int) []int
	collect = func(v int) []int {
		if len(children[v]) == 0 {
			return []int{leafPos[v]}
		}
		var out []int
		for _, ch := range children[v] {
			out = append(out, collect(ch)...)
		}
		return out
	}
	for p, i := range order {
		c.bottoms[p] = collect(i)
	}
	c.finish()
	return h, nil
}

// HierarchyFromPaths builds a hierarchy from one path per bottom series,
// each listing the nodes from the top down, separated by sep: for example
// "total/north/store1" with sep "/". Every path must start with the same
// top. A node is named by its path from the top ("total/north"), so equal
// component names under different parents do not collide.
//
// Errors wrap ErrStructure (empty sep, an empty component, different
// tops, a path that is also the prefix of another path), ErrDuplicateName
// (a path given twice) or ErrNoBottom (no paths).
func HierarchyFromPaths(paths []string, sep string) (*Hierarchy, error) {
	if len(paths) == 0 {
		return nil, fmt.Errorf("reconcile: %w: no paths", ErrNoBottom)
	}
	if sep == "" {
		return nil, fmt.Errorf("reconcile: %w: empty path separator", ErrStructure)
	}
	seen := map[string]bool{}
	leaf := map[string]bool{}
	var links []Link
	var topName string
	for _, p := range paths {
		parts := strings.Split(p, sep)
		for _, part := range parts {
			if part == "" {
				return nil, fmt.Errorf("reconcile: %w: path %q has an empty component", ErrStructure, p)
			}
		}
		if topName == "" {
			topName = parts[0]
		} else if parts[0] != topName {
			return nil, fmt.Errorf("reconcile: %w: path %q does not start at the top %q", ErrStructure, p, topName)
		}
		if leaf[p] {
			return nil, fmt.Errorf("reconcile: %w: path %q given twice", ErrDuplicateName, p)
		}
		if seen[p] {
			return nil, fmt.Errorf("reconcile: %w: path %q is also an aggregate of another path", ErrStructure, p)
		}
		leaf[p] = true
		for k := range parts {
			name := strings.Join(parts[:k+1], sep)
			if k < len(parts)-1 && leaf[name] {
				return nil, fmt.Errorf("reconcile: %w: path %q is also an aggregate of path %q", ErrStructure, name, p)
			}
			if seen[name] {
				continue
			}
			seen[name] = true
			parent := ""
			if k > 0 {
				parent = strings.Join(parts[:k], sep)
			}
			links = append(links, Link{Name: name, Parent: parent})
		}
	}
	return NewHierarchy(links...)
}

// Len returns the number of nodes.
func (h *Hierarchy) Len() int { return h.c.n() }

// NumBottom returns the number of bottom series (leaves).
func (h *Hierarchy) NumBottom() int { return h.c.m }

// Names returns the node names in node order.
func (h *Hierarchy) Names() []string { return append([]string(nil), h.c.names...) }

// Index returns the position of the named node.
func (h *Hierarchy) Index(name string) (int, bool) { i, ok := h.c.index[name]; return i, ok }

// Level returns the depth of node i (0 for the top, -1 when i is out of
// range).
func (h *Hierarchy) Level(i int) int { return h.c.level(i) }

// NumLevels returns the number of levels (the depth of the deepest leaf
// plus one).
func (h *Hierarchy) NumLevels() int { return h.c.nlevels }

// LevelNodes returns the nodes at depth level, in node order.
func (h *Hierarchy) LevelNodes(level int) []int { return h.c.levelNodes(level) }

// Bottoms returns the bottom positions (0..m-1) under node i.
func (h *Hierarchy) Bottoms(i int) []int { return h.c.bottomsOf(i) }

// Parent returns the parent of node i, or -1 for the top.
func (h *Hierarchy) Parent(i int) int {
	if i < 0 || i >= h.c.n() {
		return -1
	}
	return h.c.parents[i]
}

// Children returns the children of node i (none for a leaf).
func (h *Hierarchy) Children(i int) []int {
	if i < 0 || i >= h.c.n() {
		return nil
	}
	return append([]int(nil), h.c.children[i]...)
}

// Summing returns a fresh copy of the n × m summing matrix S.
func (h *Hierarchy) Summing() *mat.Dense { return h.c.summing() }

func (h *Hierarchy) tree() *core {
	if h == nil {
		return nil
	}
	return &h.c
}
