package nightly

import (
	"fmt"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/reconcile"
)

// Placed is a series with its place in a hierarchy: its parents from the
// root down, separated by PathSeparator ("N03/PNT").
type Placed struct {
	Series almanac.Series
	Within string
}

func seriesOf(recs []SeriesRec) []Placed {
	out := make([]Placed, len(recs))
	for i, r := range recs {
		out[i] = Placed{Series: r.series(), Within: r.Within}
	}
	return out
}

// Aggregate builds the hierarchy of the given series (all under one
// root, on one time grid) and the series of its aggregates.
//
// The hierarchy is built by reconcile.NewHierarchy from links taken in
// the order of bottoms: for each series, every aggregate on its path not
// yet linked (named by its path from the root, "N03" then "N03/PNT"),
// then the series itself under its parent, named by its key. The
// aggregates are returned in the hierarchy's node order (its first
// Len()-NumBottom() nodes); the value of aggregate i at each period is
// the sum, in the order of h.Bottoms(i), of its bottom series' values
// (NaN when any of them is missing).
func Aggregate(bottoms []Placed) (*reconcile.Hierarchy, []almanac.Series, error) {
	if len(bottoms) == 0 {
		return nil, nil, fmt.Errorf("%w: no series to aggregate", almanac.ErrEmpty)
	}
	seen := map[string]bool{}
	var links []reconcile.Link
	byName := map[string]almanac.Series{}
	for _, b := range bottoms {
		parent := ""
		for _, p := range prefixes(b.Within) {
			if !seen[p] {
				seen[p] = true
				links = append(links, reconcile.Link{Name: p, Parent: parent})
			}
			parent = p
		}
		links = append(links, reconcile.Link{Name: b.Series.Key, Parent: b.Within})
		byName[b.Series.Key] = b.Series
	}
	h, err := reconcile.NewHierarchy(links...)
	if err != nil {
		return nil, nil, err
	}
	names := h.Names()
	n, m := h.Len(), h.NumBottom()
	leaves := make([]almanac.Series, m)
	for j := range m {
		leaves[j] = byName[names[n-m+j]]
	}
	all, err := reconcile.Aggregate(h, leaves)
	if err != nil {
		return nil, nil, err
	}
	return h, all[:n-m], nil
}
