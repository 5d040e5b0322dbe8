package combine

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

type failing struct{}

func (failing) Fit(context.Context, almanac.Series) (almanac.Fitted, error) {
	return nil, almanac.ErrNotFitted
}

func series() almanac.Series {
	v := []float64{10, 12, 11, 13, 12, 14, 13, 15, 14, 16}
	return almanac.Series{Key: "x", Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: v}
}

// TestMeanOfMembers: the point forecast is the mean of the members' (here
// the naive method, 16, and the mean, 13: 14.5 at every step); a failing
// member is left out and reported.
func TestMeanOfMembers(t *testing.T) {
	c := Mean{Members: []Member{{"naive", almanac.Naive{}}, {"bad", failing{}}, {"mean", almanac.Mean{}}}}
	fit, err := c.FitMembers(context.Background(), series())
	if err != nil {
		t.Fatal(err)
	}
	if len(fit.Failed()) != 1 || fit.Failed()[0].Name != "bad" || !errors.Is(fit.Failed()[0].Err, almanac.ErrNotFitted) {
		t.Errorf("failed = %+v", fit.Failed())
	}
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		t.Fatal(err)
	}
	for j, v := range fc.Mean {
		if math.Abs(v-14.5) > 1e-12 {
			t.Errorf("step %d: %v, want 14.5", j+1, v)
		}
		if lo, hi := fc.Intervals[0].Lower[j], fc.Intervals[0].Upper[j]; !(lo < 14.5 && hi > 14.5) {
			t.Errorf("step %d: band [%v, %v]", j+1, lo, hi)
		}
	}
	if fit.String() != "mean(Naive, Mean)" {
		t.Errorf("String = %q", fit.String())
	}
}

func TestAllMembersFail(t *testing.T) {
	_, err := Mean{Members: []Member{{"bad", failing{}}}}.Fit(context.Background(), series())
	if !errors.Is(err, almanac.ErrNotFitted) {
		t.Errorf("err = %v", err)
	}
	if _, err := (Mean{}).Fit(context.Background(), series()); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("no members: err = %v", err)
	}
}
