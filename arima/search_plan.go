package arima

import (
	"context"
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
)

// searchPlan is a Search with the defaults resolved against one series.
type searchPlan struct {
	maxP, maxQ, maxSP, maxSQ int
	maxTerms                 int // ≤ 0: none
	d, sd, period            int
	constOK                  bool
	method                   Method
	crit                     Criterion
	maxModels                int
	regs                     []Regressor
	// full marks the candidates (by index) already fitted with the full
	// stopping rules (fullOpt); the others used searchOpt.
	full map[int]bool
}

func limit(v, def int) int {
	switch {
	case v == 0:
		return def
	case v < 0:
		return 0
	}
	return v
}

// spec returns the candidate Spec for the given orders.
func (pl *searchPlan) spec(p, q, sp, sq int, constant bool) Spec {
	c := ConstantNone
	if constant {
		c = ConstantInclude
	}
	return Spec{P: p, D: pl.d, Q: q, SP: sp, SD: pl.sd, SQ: sq, Period: pl.period, Constant: c, Method: pl.method, Regressors: pl.regs}
}

// searchPrior is the prior of the differencing states with which
// candidates are fitted and ranked: the exact diffuse one, whose
// likelihood is the exact likelihood of the differenced series. It
// starts the ARMA filter from its stationary covariance, so that each
// likelihood evaluation runs the O(r) Chandrasekhar recursions
// (filterChandrasekhar) instead of the O(r²) covariance recursion (R's
// finite prior κ perturbs that start). The chosen model is refitted as
// Spec.Fit fits it (finite prior by default).
const searchPrior = DiffusePrior

// candidateFit fits candidate sp for ranking (searchPrior).
func candidateFit(ctx context.Context, y almanac.Series, sp Spec, o optSettings) (*Fitted, error) {
	sp.Prior = searchPrior
	return sp.fitWith(ctx, y, o)
}

// evaluate fits one candidate and scores it.
func (pl *searchPlan) evaluate(ctx context.Context, y almanac.Series, sp Spec) (Candidate, *Fitted) {
	c := Candidate{Spec: sp, Score: math.Inf(1), LogLik: math.NaN()}
	f, err := candidateFit(ctx, y, sp, searchOpt)
	if err != nil {
		c.Err = err
		return c, nil
	}
	return c, pl.score(&c, f)
}

// score records the log-likelihood and criterion of fit f in c and
// returns f, or records why it is rejected (a root within 1.001 of the
// unit circle, a criterion that is not finite) and returns nil.
func (pl *searchPlan) score(c *Candidate, f *Fitted) *Fitted {
	c.LogLik = f.LogLik()
	c.Score, c.Err = math.Inf(1), nil
	if err := nearUnitRoot(f); err != nil {
		c.Err = err
		return nil
	}
	score := pl.crit.Choose(f.AICc(), f.AIC(), f.BIC())
	if math.IsNaN(score) || math.IsInf(score, 0) {
		c.Err = fmt.Errorf("arima: %w: %s: %v is %v", almanac.ErrNotFitted, c.Spec, pl.crit, score)
		return nil
	}
	c.Score = score
	return f
}

// evaluateConfirmed is evaluate followed, when the candidate is scored
// and within(score) holds, by confirm, in one run of the minimiser: the
// looser rules of searchOpt stop it first, and if the candidate is to be
// confirmed it goes on under fullOpt along the same path
// (optSettings.then), which gives the fit confirm's refit gives without
// repeating the evaluations up to that point. confirmed reports that the
// returned candidate and fit are those of the full rules (as after
// confirm, which rejects the candidate when the full fit fails the
// screen).
func (pl *searchPlan) evaluateConfirmed(ctx context.Context, y almanac.Series, sp Spec, within func(score float64) bool) (c Candidate, f *Fitted, confirmed bool) {
	if separateConfirm {
		c, f = pl.evaluate(ctx, y, sp)
		if f != nil && within(c.Score) {
			f = pl.confirm(ctx, y, &c)
			confirmed = true
		}
		return c, f, confirmed
	}
	c = Candidate{Spec: sp, Score: math.Inf(1), LogLik: math.NaN()}
	var loose Candidate // the candidate at the first stage's stop
	decided, goOn := false, false
	decide := func(lf *Fitted) bool {
		decided = true
		loose = c
		goOn = pl.score(&loose, lf) != nil && within(loose.Score)
		return goOn
	}
	f, err := candidateFit(ctx, y, sp, searchOpt.staged(fullOpt, decide))
	switch {
	case !decided:
		// The run ended before the looser rules stopped it (a stalled
		// line search, an error, nothing to estimate): both rules give
		// this result.
		if err != nil {
			c.Err = err
			return c, nil, false
		}
		f = pl.score(&c, f)
		return c, f, f != nil && within(c.Score)
	case !goOn:
		// Not to be confirmed: f is the looser fit (err is nil, the
		// checkpoint having built it).
		if err != nil {
			c.Err = err
			return c, nil, false
		}
		f = pl.score(&c, f)
		return c, f, false
	}
	// Confirmed: f is the full fit; a failed one rejects the candidate
	// and keeps the looser fit's log-likelihood, as confirm does.
	c = loose
	if err == nil {
		full := c
		if f = pl.score(&full, f); f != nil {
			return full, f, true
		}
		err = full.Err
	}
	c.Err, c.Score = err, math.Inf(1)
	return c, nil, true
}

// separateConfirm makes evaluateConfirmed run evaluate and confirm as two
// fits (for the test that the staged run gives the same).
var separateConfirm bool

// confirmMargin: a candidate whose criterion value, fitted with the
// looser stopping rules of searchOpt, comes within this margin of the
// best one is refitted with the full rules before they are compared. The
// looser rules leave the criterion at most 1.3 above the full fit's on
// the package's test datasets; 2 is also the usual threshold of a
// substantial difference in an information criterion (common practice).
const confirmMargin = 2

// confirm refits candidate c, scored with the looser stopping rules of
// searchOpt, with those of Spec.Fit (fullOpt) and the same method, and
// records the refit's log-likelihood and score in c. When the refit fails
// or its roots come within 1.001 of the unit circle (a fit whose optimum
// lies on the boundary may stop short of it under the looser rules), c is
// marked rejected and confirm returns nil.
func (pl *searchPlan) confirm(ctx context.Context, y almanac.Series, c *Candidate) *Fitted {
	f, err := candidateFit(ctx, y, c.Spec, fullOpt)
	if err == nil {
		full := *c
		if f = pl.score(&full, f); f != nil {
			*c = full
			return f
		}
		err = full.Err
	}
	c.Err, c.Score = err, math.Inf(1)
	return nil
}

// orderKey identifies a candidate within one search (d, D and the period
// are fixed).
type orderKey struct {
	p, q, sp, sq int
	constant     bool
}

func (pl *searchPlan) allowed(k orderKey) bool {
	if k.p < 0 || k.q < 0 || k.sp < 0 || k.sq < 0 ||
		k.p > pl.maxP || k.q > pl.maxQ || k.sp > pl.maxSP || k.sq > pl.maxSQ {
		return false
	}
	if pl.maxTerms > 0 && k.p+k.q+k.sp+k.sq > pl.maxTerms {
		return false
	}
	return !k.constant || pl.constOK
}
