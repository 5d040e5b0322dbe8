package arima

import (
	"context"
	"fmt"
	"sync"

	"github.com/almanac-go/almanac"
)

// exhaustive fits every allowed model of the grid, in parallel over
// workers, writing each result at its grid index.
func (pl *searchPlan) exhaustive(ctx context.Context, y almanac.Series, workers int, res *SearchResult) ([]*Fitted, error) {
	// No order of the grid exceeds maxTerms (always set for the
	// exhaustive search), so the loops stop there: a huge MaxP would
	// otherwise be iterated through, one rejected order at a time.
	bound := func(m int) int {
		if pl.maxTerms > 0 {
			return min(m, pl.maxTerms)
		}
		return m
	}
	var keys []orderKey
	for p := 0; p <= bound(pl.maxP); p++ {
		for q := 0; q <= bound(pl.maxQ); q++ {
			for sp := 0; sp <= bound(pl.maxSP); sp++ {
				for sq := 0; sq <= bound(pl.maxSQ); sq++ {
					for _, c := range []bool{false, true} {
						if k := (orderKey{p, q, sp, sq, c}); pl.allowed(k) {
							keys = append(keys, k)
						}
					}
				}
			}
		}
	}
	cands := make([]Candidate, len(keys))
	fits := make([]*Fitted, len(keys))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(workers, len(keys)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				k := keys[i]
				cands[i], fits[i] = pl.evaluate(ctx, y, pl.spec(k.p, k.q, k.sp, k.sq, k.constant))
			}
		}()
	}
	var ctxErr error
	for i := range keys {
		if ctxErr = ctx.Err(); ctxErr != nil {
			break
		}
		next <- i
	}
	close(next)
	wg.Wait()
	if ctxErr == nil {
		ctxErr = ctx.Err()
	}
	if ctxErr != nil {
		return nil, fmt.Errorf("arima: search: %w", ctxErr)
	}
	res.Candidates = cands
	return fits, nil
}
