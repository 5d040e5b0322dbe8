package almanac_test

import (
	"testing"

	"github.com/almanac-go/almanac"
)

func TestCriterion(t *testing.T) {
	tests := []struct {
		c     almanac.Criterion
		name  string
		valid bool
		pick  float64
	}{
		{almanac.AICc, "AICc", true, 1},
		{almanac.AIC, "AIC", true, 2},
		{almanac.BIC, "BIC", true, 3},
		{almanac.Criterion(7), "Criterion(7)", false, 1},
		{almanac.Criterion(-1), "Criterion(-1)", false, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.c.String(); got != tc.name {
				t.Errorf("String() = %q, want %q", got, tc.name)
			}
			if got := tc.c.Valid(); got != tc.valid {
				t.Errorf("Valid() = %v, want %v", got, tc.valid)
			}
			if got := tc.c.Choose(1, 2, 3); got != tc.pick {
				t.Errorf("Choose(1, 2, 3) = %v, want %v", got, tc.pick)
			}
		})
	}
	var zero almanac.Criterion
	if zero != almanac.AICc {
		t.Error("the zero Criterion is not AICc")
	}
}
