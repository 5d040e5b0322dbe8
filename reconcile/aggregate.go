package reconcile

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
)

// Aggregate returns the series of every node of st (in node order), each
// the sum of the bottom series below it: bottom holds the structure's m
// bottom series in its bottom order (st.Names()[n−m+j] is bottom[j]),
// all on one time grid (the same start, frequency and length). Node i's
// series is keyed st.Names()[i]; its value at each period is the sum, in
// the order of st.Bottoms(i), of its bottom series' values, NaN when any
// of them is missing there. The bottom nodes' series are copies of their
// inputs, keyed by their node names.
//
// Special cases: a nil structure or bottom series of a different count
// or grid give an error wrapping almanac.ErrInvalid or almanac.ErrLength
// (with ErrDimension); a ±Inf value, or a sum beyond the float64 range,
// one wrapping almanac.ErrNonFinite.
func Aggregate(st Structure, bottom []almanac.Series) ([]almanac.Series, error) {
	if st == nil {
		return nil, fmt.Errorf("reconcile: aggregate: %w: nil structure", almanac.ErrInvalid)
	}
	n, m := st.Len(), st.NumBottom()
	if len(bottom) != m {
		return nil, fmt.Errorf("reconcile: aggregate: %w: %w: %d bottom series for a structure with %d", almanac.ErrLength, ErrDimension, len(bottom), m)
	}
	first := bottom[0]
	for j, y := range bottom {
		if y.Len() != first.Len() {
			return nil, fmt.Errorf("reconcile: aggregate: %w: %w: bottom series %d (%q) has %d values, series 0 has %d", almanac.ErrLength, ErrDimension, j, y.Key, y.Len(), first.Len())
		}
		if y.Freq != first.Freq || !y.Start.Equal(first.Start) {
			return nil, fmt.Errorf("reconcile: aggregate: %w: bottom series %d (%q) is not on the time grid of series 0 (start %v, %v against %v, %v)",
				almanac.ErrInvalid, j, y.Key, y.Start, y.Freq, first.Start, first.Freq)
		}
		for t, v := range y.Values {
			if math.IsInf(v, 0) {
				return nil, fmt.Errorf("reconcile: aggregate: %w: bottom series %d (%q) is %v at %d", almanac.ErrNonFinite, j, y.Key, v, t)
			}
		}
	}
	names := st.Names()
	out := make([]almanac.Series, n)
	for i := range n {
		vals := make([]float64, first.Len())
		for _, j := range st.Bottoms(i) {
			for t, v := range bottom[j].Values {
				vals[t] += v
			}
		}
		for t, v := range vals {
			if math.IsInf(v, 0) {
				return nil, fmt.Errorf("reconcile: aggregate: %w: node %q sums beyond the float64 range at %d", almanac.ErrNonFinite, names[i], t)
			}
		}
		out[i] = almanac.Series{Key: names[i], Start: first.Start, Freq: first.Freq, Values: vals}
	}
	return out, nil
}
