package reconcile

import (
	"fmt"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// Disaggregation chooses how top-down and middle-out reconciliation split
// a forecast among the bottom series.
type Disaggregation int

const (
	// DisaggregationAuto is the default: ForecastProportions.
	DisaggregationAuto Disaggregation = iota
	// ForecastProportions splits each node's reconciled forecast among
	// its children in proportion to the children's base forecasts, step
	// by step, from the top (or middle level) down (Athanasopoulos, Ahmed
	// & Hyndman 2009). Needs no history.
	ForecastProportions
	// AverageHistoricalProportions gives bottom series j the share
	// p_j = mean_t(y_jt / y_at) of its ancestor a at the top (or middle
	// level), averaged over the history (Gross & Sohl 1990).
	AverageHistoricalProportions
	// ProportionsOfHistoricalAverages gives bottom series j the share
	// p_j = mean_t(y_jt) / mean_t(y_at) (Gross & Sohl 1990).
	ProportionsOfHistoricalAverages
)

var disaggNames = [...]string{"auto", "forecast proportions", "average historical proportions", "proportions of historical averages"}

// String returns "auto", "forecast proportions", "average historical
// proportions" or "proportions of historical averages", or
// "Disaggregation(n)" for other values.
func (d Disaggregation) String() string {
	if d >= 0 && int(d) < len(disaggNames) {
		return disaggNames[d]
	}
	return fmt.Sprintf("Disaggregation(%d)", int(d))
}

// splitMap is a top-down or middle-out map: reconciled bottom j at step t
// is coef[t][j] · ŷ_t[src[j]], where src[j] is the node of the chosen
// level above j (or j itself when j is a leaf above that level).
type splitMap struct {
	src   []int
	coef  [][]float64 // per step; one shared row for historical proportions
	fixed bool
}

func (s *splitMap) row(t int) []float64 {
	if s.fixed {
		return s.coef[0]
	}
	return s.coef[t]
}

// cutNodes returns, for each bottom position, its ancestor at the given
// depth (or the leaf itself when the leaf is shallower).
func cutNodes(c *core, level int) []int {
	out := make([]int, c.m)
	for j := range out {
		v := c.bottomNode(j)
		for c.levels[v] > level {
			v = c.parents[v]
		}
		out[j] = v
	}
	return out
}

func checkLevel(c *core, level int) error {
	if level < 0 || level >= c.nlevels {
		return fmt.Errorf("reconcile: %w: level %d outside 0..%d", almanac.ErrInvalid, level, c.nlevels-1)
	}
	return nil
}

// Proportions returns, for each bottom series j (in bottom order), its
// historical share p_j of its ancestor at the given level (0 for the
// top), computed from history (T × n, one column per node) as
// AverageHistoricalProportions or ProportionsOfHistoricalAverages.
// Rows holding a NaN are dropped.
//
// Errors wrap almanac.ErrInvalid (bad level or a Disaggregation that is
// not historical), ErrDimension with almanac.ErrLength, almanac.ErrEmpty
// or almanac.ErrAllMissing (no usable history), almanac.ErrNonFinite, or
// ErrProportion (an ancestor whose history is zero where a ratio is
// needed).
func Proportions(h *Hierarchy, level int, history mat.Matrix, how Disaggregation) ([]float64, error) {
	if h == nil {
		return nil, fmt.Errorf("reconcile: %w: nil hierarchy", almanac.ErrInvalid)
	}
	if err := checkLevel(&h.c, level); err != nil {
		return nil, err
	}
	return historicalProportions(&h.c, cutNodes(&h.c, level), history, how)
}

func historicalProportions(c *core, src []int, history mat.Matrix, how Disaggregation) ([]float64, error) {
	if how != AverageHistoricalProportions && how != ProportionsOfHistoricalAverages {
		return nil, fmt.Errorf("reconcile: %w: %v is not a historical proportion", almanac.ErrInvalid, how)
	}
	rows, err := completeRows(c, history, "history")
	if err != nil {
		return nil, err
	}
	// Proportions do not depend on the unit of the history: divide it by
	// a common power of two so that sums over T rows cannot overflow
	// (scale.go).
	scaleRows(rows)
	p := make([]float64, c.m)
	T := float64(len(rows))
	for j := range p {
		a, node := src[j], c.bottomNode(j)
		if a == node {
			p[j] = 1
			continue
		}
		if how == AverageHistoricalProportions {
			var s float64
			for t, r := range rows {
				if r[a] == 0 {
					return nil, fmt.Errorf("reconcile: %w: history of %q is zero at row %d, so the share of %q is undefined", ErrProportion, c.names[a], t, c.names[node])
				}
				s += r[node] / r[a]
			}
			p[j] = s / T
			continue
		}
		var sj, sa float64
		for _, r := range rows {
			sj += r[node]
			sa += r[a]
		}
		if sa == 0 {
			return nil, fmt.Errorf("reconcile: %w: the historical average of %q is zero, so the share of %q is undefined", ErrProportion, c.names[a], c.names[node])
		}
		p[j] = (sj / T) / (sa / T)
	}
	return p, nil
}

// forecastProportions returns the split coefficients for every step of
// the base forecasts y (rows), below the given level.
func forecastProportions(c *core, level int, src []int, y [][]float64) ([][]float64, error) {
	n := c.n()
	coef := make([][]float64, len(y))
	share := make([]float64, n)
	row := make([]float64, n)
	for t, raw := range y {
		// Shares are ratios: work on the row divided by a power of two so
		// that sums of children near the float64 limit cannot overflow
		// (scale.go).
		scaleInto(row, raw, expOf(raw))
		// share[v] = ŷ_v / Σ siblings, for every node below the level.
		for v := 0; v < n; v++ {
			ch := c.children[v]
			if len(ch) == 0 || c.levels[v] < level {
				continue
			}
			var sum float64
			allZero := true
			for _, k := range ch {
				sum += row[k]
				allZero = allZero && row[k] == 0
			}
			for _, k := range ch {
				switch {
				case sum != 0:
					share[k] = row[k] / sum
				case allZero:
					share[k] = 1 / float64(len(ch))
				default:
					return nil, fmt.Errorf("reconcile: %w: at step %d the base forecasts of the children of %q sum to zero", ErrProportion, t+1, c.names[v])
				}
			}
		}
		coef[t] = make([]float64, c.m)
		for j := range coef[t] {
			p := 1.0
			for v := c.bottomNode(j); v != src[j]; v = c.parents[v] {
				p *= share[v]
			}
			coef[t][j] = p
		}
	}
	return coef, nil
}

func newSplitMap(c *core, level int, how Disaggregation, history mat.Matrix, y [][]float64) (*splitMap, error) {
	if c.children == nil {
		return nil, fmt.Errorf("reconcile: %w: top-down and middle-out need a *Hierarchy", almanac.ErrInvalid)
	}
	if err := checkLevel(c, level); err != nil {
		return nil, err
	}
	src := cutNodes(c, level)
	switch how {
	case DisaggregationAuto, ForecastProportions:
		coef, err := forecastProportions(c, level, src, y)
		if err != nil {
			return nil, err
		}
		return &splitMap{src: src, coef: coef}, nil
	case AverageHistoricalProportions, ProportionsOfHistoricalAverages:
		p, err := historicalProportions(c, src, history, how)
		if err != nil {
			return nil, err
		}
		return &splitMap{src: src, coef: [][]float64{p}, fixed: true}, nil
	}
	return nil, fmt.Errorf("reconcile: %w: unknown disaggregation %v", almanac.ErrInvalid, how)
}
