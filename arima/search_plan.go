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
	c.LogLik = f.LogLik()
	if err := nearUnitRoot(f); err != nil {
		c.Err = err
		return c, nil
	}
	score := pl.crit.Choose(f.AICc(), f.AIC(), f.BIC())
	if math.IsNaN(score) || math.IsInf(score, 0) {
		c.Err = fmt.Errorf("arima: %w: %s: %v is %v", almanac.ErrNotFitted, sp, pl.crit, score)
		return c, nil
	}
	c.Score = score
	return c, f
}

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
		err = nearUnitRoot(f)
	}
	score := math.Inf(1)
	if err == nil {
		if score = pl.crit.Choose(f.AICc(), f.AIC(), f.BIC()); math.IsNaN(score) || math.IsInf(score, 0) {
			err = fmt.Errorf("arima: %w: %s: %v is %v", almanac.ErrNotFitted, c.Spec, pl.crit, score)
		}
	}
	if err != nil {
		c.Err, c.Score = err, math.Inf(1)
		return nil
	}
	c.LogLik, c.Score = f.LogLik(), score
	return f
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
