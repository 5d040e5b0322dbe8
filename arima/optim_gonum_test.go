package arima

import (
	"context"
	"errors"
	"sync/atomic"
	"testing"
)

// cancelAfter is a context whose Err reports context.Canceled from its
// (n+1)-th call on, so that a fit is cancelled inside the minimiser
// (both minimisers check ctx at every iteration or evaluation).
type cancelAfter struct {
	context.Context
	left atomic.Int64
}

func (c *cancelAfter) Err() error {
	if c.left.Add(-1) < 0 {
		return context.Canceled
	}
	return nil
}

// TestCancelDuringOptimisation: a context cancelled while the optimiser
// runs stops the fit with an error wrapping context.Canceled, with gonum's
// BFGS (checked through Problem.Status) and with the package's own.
func TestCancelDuringOptimisation(t *testing.T) {
	y := logAirPassengers(t)
	for _, tc := range []struct {
		name  string
		gonum bool
	}{{"gonum BFGS", true}, {"own BFGS", false}} {
		t.Run(tc.name, func(t *testing.T) {
			defer func(old bool) { useGonum = old }(useGonum)
			useGonum = tc.gonum
			for _, after := range []int64{1, 3, 6} {
				ctx := &cancelAfter{Context: context.Background()}
				ctx.left.Store(after)
				_, err := airline.Fit(ctx, y)
				if !errors.Is(err, context.Canceled) {
					t.Errorf("cancelled after %d checks: err = %v, want context.Canceled", after, err)
				}
			}
		})
	}
}
