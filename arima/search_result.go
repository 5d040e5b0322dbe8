package arima

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/almanac-go/almanac"
)

// Candidate is one model considered by a Search.
type Candidate struct {
	// Spec is the model: orders, period and constant (ConstantInclude or
	// ConstantNone).
	Spec Spec
	// Score is the criterion value, on the likelihood used while
	// searching: the exact likelihood of the differenced series
	// (DiffusePrior), or CSS when SearchResult.RankedByCSS; +Inf when the
	// model could not be fitted or was rejected. The returned model is
	// refitted as Spec.Fit fits it (by default with R's finite prior), so
	// its AICc differs from the chosen candidate's Score by the difference
	// of the two likelihoods (about 3e-3 for the airline model on log air
	// passengers). Candidates are fitted with looser stopping rules than
	// Spec.Fit's (see Search), which can leave Score slightly above the
	// value of a full fit; those that come within 2 of the best, and the
	// chosen one, are refitted with the full rules and carry the full
	// fit's value.
	Score float64
	// LogLik is the log-likelihood of the candidate fit, on the
	// likelihood Score uses (NaN when it failed).
	LogLik float64
	// Err says why the candidate has no score: the fitting error, or a
	// rejection (wrapping ErrNearUnitRoot) when an AR or MA root lies
	// within 1.001 of the unit circle. nil for a scored candidate. The
	// root screen applies to the fit the Score comes from: a candidate
	// that was not refitted with the full rules (far from the best) may
	// pass it where the full fit, whose optimum lies on the unit circle,
	// would come closer to the circle and fail it.
	Err error
}

// String returns the candidate in the notation of Fitted.String:
// "ARIMA(1,1,0)×(0,1,1)_12", with " + mean" or " + drift" when it has a
// constant.
func (c Candidate) String() string {
	str := c.Spec.String()
	if c.Spec.Constant == ConstantInclude {
		if c.Spec.D+c.Spec.SD == 0 {
			str += " + mean"
		} else {
			str += " + drift"
		}
	}
	return str
}

// SearchResult is the record of a Search on one series: every model
// tried, with its score, and the chosen one. Search.Compare returns it,
// and Fitted.SearchResult gives it for a model returned by Search.Fit. It
// is read-only and safe for concurrent use.
type SearchResult struct {
	// Model is the chosen model, refitted by exact likelihood as
	// Spec.Fit would fit it: the value Search.Fit returns.
	Model *Fitted
	// Criterion ranked the candidates.
	Criterion Criterion
	// Candidates lists every model fitted while searching, in the order
	// tried (stepwise) or grid order (exhaustive).
	Candidates []Candidate
	// Chosen is the index in Candidates of the chosen model.
	Chosen int
	// RankedByCSS reports that candidates were ranked by CSS (and the
	// chosen one refitted by exact likelihood).
	RankedByCSS bool
	// Exhaustive reports which search ran.
	Exhaustive bool
	// ModelLimitReached reports that a stepwise search stopped at
	// MaxModels before running out of better neighbours.
	ModelLimitReached bool
	// SeasonalStrength is the STL seasonal strength of the series when D
	// was chosen from it (NaN otherwise).
	SeasonalStrength float64
}

// Ranked returns the indices into Candidates of the scored candidates,
// best first (ties in candidate order), for reporting.
func (r *SearchResult) Ranked() []int {
	var idx []int
	for i, c := range r.Candidates {
		if c.Err == nil && !math.IsInf(c.Score, 0) {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return r.Candidates[idx[a]].Score < r.Candidates[idx[b]].Score })
	return idx
}

// finish picks the best candidate (lowest score, ties to the earliest)
// and refits it as Spec.Fit would (exact likelihood, CSS then ML, the
// default finite prior, full stopping rules). When that refit fails, or
// its roots come within 1.001 of the unit circle, the next candidate in
// order of score is refitted, until one succeeds.
func (pl *searchPlan) finish(ctx context.Context, y almanac.Series, res *SearchResult, fits []*Fitted) (*SearchResult, error) {
	order := make([]int, 0, len(res.Candidates))
	for i := range res.Candidates {
		if fits[i] != nil {
			order = append(order, i)
		}
	}
	if len(order) == 0 {
		return nil, noCandidate(res.Candidates)
	}
	// Stable insertion sort by score: ties keep the earlier index.
	for i := 1; i < len(order); i++ {
		for j := i; j > 0 && res.Candidates[order[j]].Score < res.Candidates[order[j-1]].Score; j-- {
			order[j], order[j-1] = order[j-1], order[j]
		}
	}
	if !res.RankedByCSS {
		// The best candidate after a refit with the full stopping rules
		// of each one that comes within confirmMargin of the best refitted
		// one (stepwise has refitted those already), in order of score;
		// ties go to the earlier candidate.
		chosen := -1
		for _, i := range order {
			if chosen >= 0 && res.Candidates[i].Score >= res.Candidates[chosen].Score+confirmMargin {
				break
			}
			f := fits[i]
			if !pl.full[i] {
				f = pl.confirm(ctx, y, &res.Candidates[i])
				fits[i] = f
			}
			if ctx.Err() != nil {
				return nil, fmt.Errorf("arima: search: %w", ctx.Err())
			}
			if f == nil {
				continue
			}
			if c, b := res.Candidates[i].Score, chosen; b < 0 || c < res.Candidates[b].Score || (c == res.Candidates[b].Score && i < b) {
				chosen = i
			}
		}
		if chosen < 0 {
			return nil, noCandidate(res.Candidates)
		}
		// The chosen one first, then the others that survived the
		// confirmation, in order of score.
		rest := []int{chosen}
		for _, i := range order {
			if i != chosen && fits[i] != nil {
				rest = append(rest, i)
			}
		}
		order = rest
	}
	var errs []string
	for _, i := range order {
		sp := res.Candidates[i].Spec
		sp.Method = CSSThenML
		var err error
		if res.RankedByCSS {
			// Candidates ranked by CSS have not met the exact likelihood.
			// Exact fits with the O(r) likelihood of searchPrior screen out
			// those whose optimum lies on the unit circle before the refit
			// with Spec.Fit's prior, whose covariance recursion costs
			// O(r²) a step while the optimiser crawls along the ridge
			// towards the circle (61 s for one such candidate with r = 52
			// on 960 values): first with the looser stopping rules, which
			// reject most, then with the full ones.
			for _, o := range []optSettings{searchOpt, fullOpt} {
				var fs *Fitted
				if fs, err = candidateFit(ctx, y, sp, o); err == nil {
					err = nearUnitRoot(fs)
				}
				if err != nil {
					break
				}
			}
		}
		var f *Fitted
		if err == nil {
			if f, err = sp.fitWith(ctx, y, fullOpt); err == nil {
				err = nearUnitRoot(f)
			}
		}
		if err == nil {
			res.Chosen = i
			res.Model = f
			return res, nil
		}
		if ctx.Err() != nil {
			return nil, fmt.Errorf("arima: search: %w", ctx.Err())
		}
		errs = append(errs, fmt.Sprintf("%s: %v", sp, err))
	}
	return nil, fmt.Errorf("arima: search: %w: no candidate could be refitted by exact likelihood: %s", almanac.ErrNotFitted, strings.Join(errs, "; "))
}

// noCandidate builds the error for a search in which nothing could be
// fitted: it wraps almanac.ErrNotFitted and the first candidate's error.
func noCandidate(cands []Candidate) error {
	if len(cands) == 0 {
		return fmt.Errorf("arima: search: %w: no candidate model within the limits", almanac.ErrNotFitted)
	}
	return fmt.Errorf("arima: search: %w: none of %d candidate models could be fitted; first, %s: %w", almanac.ErrNotFitted, len(cands), cands[0].Spec, cands[0].Err)
}
