package nightly

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// Reasons a series is not forecast (the reason column of the status and
// dead-letter files).
const (
	ReasonUnknownNode  = "unknown-node"       // data rows for a series the hierarchy file does not place
	ReasonPlaces       = "conflicting-places" // the hierarchy file places the series twice, differently
	ReasonNoData       = "no-data"            // placed in the hierarchy, but no data rows (skipped)
	ReasonNoValidRows  = "no-valid-rows"      // every data row was rejected
	ReasonDuplicate    = "duplicate-period"   // two rows for the same period
	ReasonIrregular    = "irregular-period"   // periods not on one regular grid
	ReasonGap          = "gap"                // periods missing between rows (see Options.FillGaps)
	ReasonTooShort     = "too-short"          // too few observations for the model
	ReasonMisaligned   = "misaligned"         // its periods differ from the rest of its hierarchy
	ReasonNameClash    = "name-clash"         // its key is also the name of an aggregate of its hierarchy
	ReasonMissing      = "missing-values"     // missing values the model cannot take
	ReasonAllMissing   = "all-missing"        // every value missing
	ReasonNonPositive  = "non-positive"       // a value the model needs positive is not
	ReasonConstant     = "constant"           // a constant series the model cannot take
	ReasonFit          = "fit-failed"         // any other failure to fit
	ReasonForecast     = "forecast-failed"    // fitted, but the forecast failed
	ReasonBacktest     = "backtest-failed"    // the backtest could not be run (the forecast stands)
	ReasonReconcile    = "reconcile-failed"   // the hierarchy could not be reconciled (base forecasts stand)
	ReasonAggregate    = "aggregate-failed"   // a node of the hierarchy (an aggregate, or a series whose forecast failed) has no forecast, so it was not reconciled
	ReasonReconcileOff = "not-reconciled"     // reconciliation switched off (Options.Reconcile "none")
	ReasonNoMembers    = "no-members"         // an aggregate none of whose series could be forecast
)

// maxLength caps the length of an assembled series (as almanac.ReadCSV
// does for filled gaps), so that two far-apart periods cannot make a
// worker allocate without bound.
const maxLength = 1 << 24

// assembleFn joins each series' rows with its place in the hierarchy and
// builds the series.
type assembleFn struct {
	// Hierarchy says whether a hierarchy file was given: then every series
	// must be placed in it.
	Hierarchy bool
	// FillGaps fills missing periods with NaN instead of failing the
	// series.
	FillGaps bool
	// Buckets is the number of groups series outside any hierarchy are
	// dealt into.
	Buckets int
}

// ProcessElement builds the series key from its rows and places. It
// emits the series keyed by its group (the root of its hierarchy, or the
// series alone) and, for a series that cannot be built, its status and
// dead-letter records (and the series marked Failed, so that its
// hierarchy knows what it lacks).
func (f *assembleFn) ProcessElement(ctx context.Context, key string, obsIt func(*Obs) bool, placeIt func(*Place) bool, emit func(string, SeriesRec), out func(Record)) {
	var obs []Obs
	var o Obs
	for obsIt(&o) {
		obs = append(obs, o)
	}
	var places []Place
	var p Place
	for placeIt(&p) {
		places = append(places, p)
	}
	within, perr := placeOf(places)
	st := status{key: key, role: RoleInput, tree: root(within), state: StateFailed}
	fail := func(reason, detail string) {
		st.reason, st.detail = reason, detail
		st.report(ctx, out)
		if within != "" {
			emit(groupOf(key, within, f.Buckets), SeriesRec{Key: key, Within: within, Failed: true, Reason: reason})
		}
	}
	switch {
	case perr != nil:
		fail(ReasonPlaces, perr.Error())
		return
	case len(obs) == 0:
		st.state, st.reason, st.detail = StateSkipped, ReasonNoData, "the hierarchy file places it but there are no data rows"
		st.report(ctx, out)
		if within != "" {
			emit(groupOf(key, within, f.Buckets), SeriesRec{Key: key, Within: within, Failed: true, Reason: ReasonNoData})
		}
		return
	case f.Hierarchy && len(places) == 0:
		fail(ReasonUnknownNode, fmt.Sprintf("the hierarchy file does not place it (%d data rows, first %s)", len(obs), firstRow(obs)))
		return
	}
	if bad := slices.ContainsFunc(places, func(p Place) bool { return p.Bad }); bad && within == "" {
		fail(ReasonBadPlace, "its row in the hierarchy file was rejected (see its dead-letter row)")
		return
	}
	rec, reason, err := build(key, obs, f.FillGaps)
	if err != nil {
		fail(reason, err.Error())
		return
	}
	rec.Within = within
	emit(groupOf(key, within, f.Buckets), rec)
}

// placeOf returns the one path the places give ("" for none); places
// that disagree are an error.
func placeOf(places []Place) (string, error) {
	within := ""
	for _, p := range places {
		if p.Bad {
			continue
		}
		if within != "" && p.Within != within {
			return "", fmt.Errorf("placed twice, under %q and %q (%s line %d)", within, p.Within, p.File, p.Line)
		}
		within = p.Within
	}
	return within, nil
}

// root returns the first part of a hierarchy path.
func root(within string) string {
	r, _, _ := strings.Cut(within, PathSeparator)
	return r
}

// BucketOf returns the bucket (0 to buckets-1) a series outside any
// hierarchy is fitted in, its calibration errors pooled with those of the
// other series in the bucket: a hash (FNV-1a) of its key modulo buckets.
// It depends on nothing else, so a program can reproduce the pipeline's
// groups.
func BucketOf(key string, buckets int) int { return shardOf(key, buckets) }

// groupOf is the key that brings the series of one hierarchy together;
// series outside any hierarchy are dealt into buckets by key (so that a
// worker fits a batch of them at once, on all its cores).
func groupOf(key, within string, buckets int) string {
	if within == "" {
		return fmt.Sprintf("series\x00%d", BucketOf(key, buckets))
	}
	return "tree\x00" + root(within)
}

func firstRow(obs []Obs) string {
	o := slices.MinFunc(obs, func(a, b Obs) int { return cmp.Or(strings.Compare(a.File, b.File), cmp.Compare(a.Line, b.Line)) })
	return fmt.Sprintf("%s line %d", o.File, o.Line)
}

// build places a series' rows on their frequency's grid. It returns the
// reason code with any error.
func build(key string, obs []Obs, fill bool) (SeriesRec, string, error) {
	good := slices.DeleteFunc(slices.Clone(obs), func(o Obs) bool { return o.Bad })
	if len(good) == 0 {
		return SeriesRec{}, ReasonNoValidRows, fmt.Errorf("all %d data rows were rejected (see their dead-letter rows)", len(obs))
	}
	// Rows arrive in no particular order: sort by time, then by origin.
	slices.SortFunc(good, func(a, b Obs) int {
		return cmp.Or(cmp.Compare(a.Sec, b.Sec), cmp.Compare(a.Nsec, b.Nsec), strings.Compare(a.File, b.File), cmp.Compare(a.Line, b.Line))
	})
	for i := 1; i < len(good); i++ {
		if good[i].Sec == good[i-1].Sec && good[i].Nsec == good[i-1].Nsec {
			a, b := good[i-1], good[i]
			return SeriesRec{}, ReasonDuplicate, fmt.Errorf("period %s given twice: %s line %d and %s line %d",
				timeOf(a).Format(time.RFC3339), a.File, a.Line, b.File, b.Line)
		}
	}
	times := make([]time.Time, len(good))
	for i, o := range good {
		times[i] = timeOf(o)
	}
	freq, err := inferFrequency(times)
	if err != nil {
		if len(good) == 1 {
			return SeriesRec{}, ReasonTooShort, fmt.Errorf("one valid row (%s line %d): no frequency and nothing to fit", good[0].File, good[0].Line)
		}
		return SeriesRec{}, ReasonIrregular, err
	}
	start := times[0]
	vals := make([]float64, 0, len(good))
	vals = append(vals, good[0].Value)
	prev := 0
	for i, o := range good[1:] {
		idx, err := freq.Between(start, times[i+1])
		if err != nil { // cannot happen: the frequency divides every distance
			return SeriesRec{}, ReasonIrregular, err
		}
		missing := idx - prev - 1
		if missing > maxLength-len(vals) {
			return SeriesRec{}, ReasonGap, fmt.Errorf("%d %v periods missing before %s line %d: longer than %d values", missing, freq, o.File, o.Line, maxLength)
		}
		if missing > 0 && !fill {
			return SeriesRec{}, ReasonGap, fmt.Errorf("%d %v periods missing before %s (%s line %d); rejected rows leave gaps too (set the fill-gaps option to fill them with missing values)",
				missing, freq, formatTime(times[i+1], freq), o.File, o.Line)
		}
		for range missing {
			vals = append(vals, math.NaN())
		}
		vals = append(vals, o.Value)
		prev = idx
	}
	return SeriesRec{Key: key, Sec: start.Unix(), Nsec: int64(start.Nanosecond()), Unit: int(freq.Unit), N: freq.N, Values: vals}, "", nil
}

func timeOf(o Obs) time.Time { return time.Unix(o.Sec, o.Nsec).UTC() }

// errNoFrequency reports times whose spacing gives no frequency.
var errNoFrequency = errors.New("no regular frequency")

// inferFrequency finds the coarsest spacing under which every time is a
// whole number of steps from the first, by calendar.Infer: the rule
// almanac.ReadCSV applies to a whole file (CSVOptions.Freq), applied here
// to one series. times are sorted and distinct.
func inferFrequency(times []time.Time) (calendar.Frequency, error) {
	if len(times) < 2 {
		return calendar.Frequency{}, fmt.Errorf("%w: one period", errNoFrequency)
	}
	f, err := calendar.Infer(times)
	if err != nil {
		return calendar.Frequency{}, fmt.Errorf("%w: the periods %s ... %s are not whole numbers of months, days or minutes apart",
			errNoFrequency, times[0].Format(time.RFC3339), times[len(times)-1].Format(time.RFC3339))
	}
	return f, nil
}
