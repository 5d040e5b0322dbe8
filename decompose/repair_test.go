package decompose_test

import (
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/decompose"
)

// TestRepairHoldout removes real observations of the monthly Mauna Loa
// CO2 series (R dataset co2, the input of the stl_co2_swin7 fixture),
// fills them, and compares with the values that were removed: the
// seasonal-aware fill must be far closer than linear interpolation
// (which ignores the annual cycle of about 6 ppm peak to peak), and every
// observed value must come back bit-identical.
func TestRepairHoldout(t *testing.T) {
	truth := fixtureInput(t, "stl_co2_swin7")
	y := truth.Clone()
	gaps := []int{0, 1, 100, 200, 201, 202, 203, 204, 205, 300, 466, 467}
	for _, i := range gaps[:len(gaps)-3] {
		y.Values[i] = math.NaN()
	}
	disrupted := []int{300, 466, 467} // observed but marked by the caller
	filled, changes, err := decompose.Repair{Disrupted: disrupted}.Fill(y)
	if err != nil {
		t.Fatal(err)
	}
	linear, _, err := decompose.Repair{Period: 1, Disrupted: disrupted}.Fill(y)
	if err != nil {
		t.Fatal(err)
	}
	if len(changes) != len(gaps) {
		t.Fatalf("%d changes, want %d", len(changes), len(gaps))
	}
	isGap := map[int]bool{}
	var errSeasonal, errLinear, errInside float64
	for k, c := range changes {
		if c.Index != gaps[k] {
			t.Fatalf("change %d at index %d, want %d", k, c.Index, gaps[k])
		}
		wantReason := decompose.Missing
		if k >= len(gaps)-3 {
			wantReason = decompose.Disrupted
		}
		if c.Reason != wantReason || !c.Time.Equal(y.Time(c.Index)) || c.New != filled.Values[c.Index] {
			t.Fatalf("change %+v", c)
		}
		if wantReason == decompose.Disrupted && c.Old != y.Values[c.Index] {
			t.Fatalf("disrupted change lost the old value: %+v", c)
		}
		isGap[c.Index] = true
		errSeasonal = math.Max(errSeasonal, math.Abs(c.New-truth.Values[c.Index]))
		if c.Index > 1 && c.Index < 466 {
			errInside = math.Max(errInside, math.Abs(c.New-truth.Values[c.Index]))
		}
		errLinear = math.Max(errLinear, math.Abs(linear.Values[c.Index]-truth.Values[c.Index]))
	}
	for i, v := range y.Values {
		if !isGap[i] && math.Float64bits(filled.Values[i]) != math.Float64bits(v) {
			t.Fatalf("observed value %d changed from %v to %v", i, v, filled.Values[i])
		}
	}
	if math.Float64bits(y.Values[300]) != math.Float64bits(truth.Values[300]) {
		t.Fatal("Fill modified its input")
	}
	t.Logf("largest error: seasonal-aware %.3f ppm, linear %.3f ppm; inside the observed span %.3f ppm", errSeasonal, errLinear, errInside)
	// Inside the observed span the fill interpolates; the monthly
	// remainder of this series has a standard deviation of 0.19 ppm
	// (R's stl fixture stl_co2_swin7), so 0.5 ppm is about 2.6 of them. Beyond the ends
	// it extrapolates and is only required to beat linear interpolation
	// by half.
	if errInside > 0.5 || errSeasonal > errLinear/2 {
		t.Errorf("seasonal-aware fill error %.3f ppm inside, %.3f ppm overall (linear %.3f)", errInside, errSeasonal, errLinear)
	}
}

func TestRepairNothingToDo(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	out, changes, err := decompose.Repair{}.Fill(y)
	if err != nil || len(changes) != 0 {
		t.Fatalf("changes %v, err %v", changes, err)
	}
	out.Values[0] = -1
	if y.Values[0] == -1 {
		t.Fatal("result shares memory with the input")
	}
}

func TestRepairBadInput(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	short := y.Head(24).Clone()
	short.Values[5] = math.NaN()
	all := y.Head(30).Clone()
	for i := range all.Values {
		all.Values[i] = math.NaN()
	}
	all.Values[3] = 1
	for _, c := range []struct {
		name string
		r    decompose.Repair
		y    almanac.Series
		want error
	}{
		{"index out of range", decompose.Repair{Disrupted: []int{468}}, y, almanac.ErrInvalid},
		{"negative index", decompose.Repair{Disrupted: []int{-1}}, y, almanac.ErrInvalid},
		{"all disrupted", decompose.Repair{Disrupted: []int{3}}, all, almanac.ErrAllMissing},
		{"too short for the season", decompose.Repair{}, short, almanac.ErrTooShort},
		{"negative period", decompose.Repair{Period: -2, Disrupted: []int{4}}, y, decompose.ErrPeriod},
		{"negative passes", decompose.Repair{Passes: -1, Disrupted: []int{4}}, y, decompose.ErrWindow},
		{"huge period", decompose.Repair{Period: math.MaxInt, Disrupted: []int{4}}, y, almanac.ErrTooShort},
		{"huge seasonal window", decompose.Repair{SeasonalWindow: math.MaxInt, Disrupted: []int{4}}, y, decompose.ErrWindow},
	} {
		t.Run(c.name, func(t *testing.T) {
			if _, _, err := c.r.Fill(c.y); !errors.Is(err, c.want) {
				t.Fatalf("err = %v, want %v", err, c.want)
			}
		})
	}
	// Too short for a seasonal fill, but a linear one is possible.
	if _, ch, err := (decompose.Repair{Period: 1}).Fill(short); err != nil || len(ch) != 1 {
		t.Fatalf("linear fill of a short series: %v, %v", ch, err)
	}
}

// TestScreen adds a spike to the monthly CO2 record (R dataset co2) and
// checks that the screen flags it, puts back a value close to the true
// one, and reports it.
func TestScreen(t *testing.T) {
	truth := fixtureInput(t, "stl_co2_swin7")
	y := truth.Clone()
	y.Values[250] += 8 // ppm, far beyond the monthly noise
	y.Values[120] = math.NaN()
	out, changes, err := decompose.Screen{}.Apply(y)
	if err != nil {
		t.Fatal(err)
	}
	var spike, missing bool
	for _, c := range changes {
		switch c.Index {
		case 250:
			spike = c.Reason == decompose.Outlier && c.Old == y.Values[250] && math.Abs(c.New-truth.Values[250]) < 1
		case 120:
			missing = c.Reason == decompose.Missing && math.Abs(c.New-truth.Values[120]) < 1
		}
		if out.Values[c.Index] != c.New {
			t.Fatalf("change %+v not in the result", c)
		}
	}
	if !spike || !missing {
		t.Fatalf("changes %+v", changes)
	}
	if len(changes) > 6 {
		t.Errorf("%d values changed; the record has few far-out points", len(changes))
	}
	if _, _, err := (decompose.Screen{K: -1}).Apply(y); !errors.Is(err, decompose.ErrWindow) {
		t.Errorf("negative fence: %v", err)
	}
	if _, _, err := (decompose.Screen{Period: 1}).Apply(y); !errors.Is(err, decompose.ErrPeriod) {
		t.Errorf("period 1: %v", err)
	}
}

func TestReasonString(t *testing.T) {
	for _, c := range []struct {
		r    decompose.Reason
		want string
	}{{decompose.ReasonUnknown, "unknown"}, {decompose.Missing, "missing"}, {decompose.Disrupted, "disrupted"}, {decompose.Outlier, "outlier"}, {decompose.Reason(9), "Reason(9)"}} {
		if got := c.r.String(); got != c.want {
			t.Errorf("%d: %q, want %q", int(c.r), got, c.want)
		}
	}
	for _, c := range []struct {
		d    decompose.Degree
		want string
	}{{decompose.DegreeAuto, "auto"}, {decompose.Constant, "constant"}, {decompose.Linear, "linear"}, {decompose.Degree(5), "Degree(5)"}} {
		if got := c.d.String(); got != c.want {
			t.Errorf("%d: %q, want %q", int(c.d), got, c.want)
		}
	}
}

// TestScreenNoSpread: a constant series has no remainder spread, so
// rounding noise in the remainder must not be flagged.
func TestScreenNoSpread(t *testing.T) {
	v := make([]float64, 60)
	for i := range v {
		v[i] = 123.4
	}
	y := monthly(v)
	out, changes, err := decompose.Screen{}.Apply(y)
	if err != nil {
		t.Fatal(err)
	}
	if len(changes) != 0 {
		t.Fatalf("constant series: %d changes", len(changes))
	}
	for i := range v {
		if out.Values[i] != v[i] {
			t.Fatalf("value %d changed", i)
		}
	}
}
