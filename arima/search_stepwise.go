package arima

import (
	"context"
	"errors"
	"fmt"

	"github.com/almanac-go/almanac"
)

// stepwise is the search of Hyndman & Khandakar (2008, sec. 3.2): fit the
// starting models, then move to the first neighbour that lowers the
// criterion (one of p, q, P, Q changed by ±1; p and q together by ±1; P
// and Q together by ±1; the constant toggled) until no neighbour does.
func (pl *searchPlan) stepwise(ctx context.Context, y almanac.Series, res *SearchResult) ([]*Fitted, error) {
	var fits []*Fitted
	seen := map[orderKey]int{}
	best := -1
	// try fits k once; it reports whether k became the best.
	try := func(k orderKey) (bool, error) {
		if !pl.allowed(k) {
			return false, nil
		}
		if _, ok := seen[k]; ok {
			return false, nil
		}
		if len(res.Candidates) >= pl.maxModels {
			res.ModelLimitReached = true
			return false, nil
		}
		if err := ctx.Err(); err != nil {
			return false, fmt.Errorf("arima: search: %w", err)
		}
		// A candidate that may be the new best is fitted on with the
		// full stopping rules before it is compared.
		within := func(score float64) bool { return best < 0 || score < res.Candidates[best].Score+confirmMargin }
		c, f, confirmed := pl.evaluateConfirmed(ctx, y, pl.spec(k.p, k.q, k.sp, k.sq, k.constant), within)
		if errors.Is(c.Err, context.Canceled) || errors.Is(c.Err, context.DeadlineExceeded) {
			return false, fmt.Errorf("arima: search: %w", c.Err)
		}
		if confirmed {
			if pl.full == nil {
				pl.full = map[int]bool{}
			}
			pl.full[len(res.Candidates)] = true
		}
		seen[k] = len(res.Candidates)
		res.Candidates = append(res.Candidates, c)
		fits = append(fits, f)
		if f != nil && (best < 0 || c.Score < res.Candidates[best].Score) {
			best = len(res.Candidates) - 1
			return true, nil
		}
		return false, nil
	}

	sAR, sMA := min(1, pl.maxSP), min(1, pl.maxSQ)
	c := pl.constOK
	starts := []orderKey{
		{min(2, pl.maxP), min(2, pl.maxQ), sAR, sMA, c},
		{0, 0, 0, 0, c},
		{min(1, pl.maxP), 0, sAR, 0, c},
		{0, min(1, pl.maxQ), 0, sMA, c},
	}
	if c {
		starts = append(starts, orderKey{0, 0, 0, 0, false})
	}
	for _, k := range starts {
		if _, err := try(k); err != nil {
			return nil, err
		}
	}

	moves := []orderKey{
		{p: -1}, {p: 1}, {q: -1}, {q: 1},
		{sp: -1}, {sp: 1}, {sq: -1}, {sq: 1},
		{p: -1, q: -1}, {p: 1, q: 1}, {p: -1, q: 1}, {p: 1, q: -1},
		{sp: -1, sq: -1}, {sp: 1, sq: 1}, {sp: -1, sq: 1}, {sp: 1, sq: -1},
	}
	for best >= 0 && !res.ModelLimitReached {
		cur := keyOf(res.Candidates[best].Spec)
		improved := false
		for _, m := range moves {
			k := orderKey{cur.p + m.p, cur.q + m.q, cur.sp + m.sp, cur.sq + m.sq, cur.constant}
			ok, err := try(k)
			if err != nil {
				return nil, err
			}
			if ok {
				improved = true
				break
			}
		}
		if !improved && pl.constOK {
			k := cur
			k.constant = !k.constant
			ok, err := try(k)
			if err != nil {
				return nil, err
			}
			improved = ok
		}
		if !improved {
			break
		}
	}
	return fits, nil
}

func keyOf(s Spec) orderKey {
	return orderKey{s.P, s.Q, s.SP, s.SQ, s.Constant == ConstantInclude}
}
