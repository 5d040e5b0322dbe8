package nightly

import (
	"context"
	"fmt"
	"reflect"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/fileio"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"
)

// Options configure the pipeline. The zero value of each field but Input
// and Output is a usable default.
type Options struct {
	// Input is the file pattern of the long-format data files (a local
	// path with wildcards, or any file system Beam has registered).
	Input string
	// Hierarchy is the file pattern of the files that place each series
	// in a hierarchy; "" means no hierarchy: every series is forecast on
	// its own.
	Hierarchy string
	// Output is the directory the output files are written to.
	Output string

	// Model names the forecasting model (ModelNames); "" means
	// DefaultModel.
	Model string
	// Horizon is the number of periods forecast; 0 means 12.
	Horizon int
	// Levels are the prediction bands' levels, percentages in (0, 100);
	// nil means 80 and 95.
	Levels []float64
	// Backtest is the number of rolling origins of each series' backtest
	// against the naive and seasonal naive benchmarks
	// (accuracy.Backtest, Horizon steps ahead); 0 means no backtest.
	Backtest int
	// Reconcile is the reconciliation method (the Reconcile...
	// constants); "" means ReconcileMinT.
	Reconcile string
	// NonNegative asks for non-negative reconciled bottom-level forecasts.
	NonNegative bool
	// Paths is the number of joint sample paths per hierarchy behind the
	// reconciled bands; 0 means the library's default (1000).
	Paths int
	// Seed seeds the reconciliation's random streams and the sample
	// paths behind the automatic forecaster's bands.
	Seed uint64
	// OwnErrors calibrates the automatic forecaster's bands on each
	// series' own out-of-sample errors only. By default the errors of
	// all the series of one group (a hierarchy, or a bucket of series
	// outside any) are pooled (accuracy.PoolPilots) before forecasting,
	// as a program fitting a catalogue with almanac.BatchFit pools them
	// across the catalogue; see the package documentation.
	OwnErrors bool
	// FillGaps fills periods missing inside a series with missing values
	// (NaN) instead of failing the series.
	FillGaps bool
	// Shards is the number of files each output is split into; 0 means 4.
	Shards int
	// Workers is the number of goroutines fitting the series of one
	// group (a hierarchy, or a bucket of series outside any hierarchy); 0
	// means GOMAXPROCS. The results do not depend on it.
	Workers int
	// Buckets is the number of groups the series outside any hierarchy
	// are dealt into (by a hash of their key), each fitted as one batch
	// on one worker, its calibration errors pooled (see OwnErrors); 0
	// means DefaultBuckets. More buckets spread a flat catalogue over
	// more workers of a cluster; fewer give each worker larger batches
	// and larger pools of errors (a bucket of 60-month monthly series
	// needs about 20 series for calibrated bands).
	//
	// Which bucket a series falls in depends only on its key, so its
	// forecast does not depend on the runner or the number of workers;
	// it does depend, through the pooled errors, on the other series in
	// its bucket.
	Buckets int

	// Column names; "" means the defaults: "series", "period", "value"
	// (almanac's long format) and "within".
	KeyColumn, PeriodColumn, ValueColumn, WithinColumn string
}

// DefaultBuckets is the number of buckets when Options.Buckets is 0.
const DefaultBuckets = 64

// DefaultWithinColumn is the default name of the hierarchy file's path
// column.
const DefaultWithinColumn = "within"

// Resolve fills in the defaults and checks the options; errors wrap
// ErrOption.
func (o Options) Resolve() (Options, error) {
	if o.Input == "" || o.Output == "" {
		return o, fmt.Errorf("%w: an input pattern and an output directory are needed", ErrOption)
	}
	if _, err := NewModel(o.Model, o.Seed); err != nil {
		return o, err
	}
	if o.Model == "" {
		o.Model = DefaultModel
	}
	if o.Horizon == 0 {
		o.Horizon = 12
	}
	if err := almanac.CheckHorizon(o.Horizon); err != nil {
		return o, fmt.Errorf("%w: %w", ErrOption, err)
	}
	if o.Levels == nil {
		o.Levels = []float64{80, 95}
	}
	if err := almanac.CheckLevels(o.Levels...); err != nil {
		return o, fmt.Errorf("%w: %w", ErrOption, err)
	}
	o.Levels = slices.Clone(o.Levels)
	slices.Sort(o.Levels)
	o.Levels = slices.Compact(o.Levels)
	if _, ok := reconcileMethods[o.Reconcile]; !ok {
		return o, fmt.Errorf("%w: unknown reconciliation %q", ErrOption, o.Reconcile)
	}
	if o.Reconcile == "" {
		o.Reconcile = ReconcileMinT
	}
	switch {
	case o.Backtest < 0, o.Paths < 0, o.Shards < 0, o.Workers < 0, o.Buckets < 0:
		return o, fmt.Errorf("%w: negative backtest origins, paths, shards, workers or buckets", ErrOption)
	}
	if o.Buckets == 0 {
		o.Buckets = DefaultBuckets
	}
	if o.Shards == 0 {
		o.Shards = 4
	}
	def := func(p *string, d string) {
		if *p == "" {
			*p = d
		}
	}
	def(&o.KeyColumn, almanac.DefaultKeyColumn)
	def(&o.PeriodColumn, almanac.DefaultTimeColumn)
	def(&o.ValueColumn, almanac.DefaultValueColumn)
	def(&o.WithinColumn, DefaultWithinColumn)
	return o, nil
}

// Build adds the pipeline to scope s: read the data (and hierarchy)
// files, assemble the series, forecast each hierarchy on one worker (and
// each other series on its own), reconcile, and write the forecast,
// accuracy, status and dead-letter files to o.Output. Invalid options are
// an error wrapping ErrOption; nothing about the data is.
func Build(s beam.Scope, o Options) error {
	o, err := o.Resolve()
	if err != nil {
		return err
	}
	s = s.Scope("almanac")
	dataFiles := fileio.ReadMatches(s, fileio.MatchFiles(s, o.Input))
	obs, deadRows := beam.ParDo2(s, &readDataFn{KeyColumn: o.KeyColumn, PeriodColumn: o.PeriodColumn, ValueColumn: o.ValueColumn}, dataFiles)
	records := []beam.PCollection{deadRows}

	var places beam.PCollection
	if o.Hierarchy != "" {
		placeFiles := fileio.ReadMatches(s, fileio.MatchFiles(s, o.Hierarchy))
		var deadPlaces beam.PCollection
		places, deadPlaces = beam.ParDo2(s, &readPlacesFn{KeyColumn: o.KeyColumn, WithinColumn: o.WithinColumn}, placeFiles)
		records = append(records, deadPlaces)
	} else {
		places = beam.ParDo(s, noPlaces, beam.Impulse(s))
	}

	joined := beam.CoGroupByKey(s, obs, places)
	series, assembled := beam.ParDo2(s, &assembleFn{Hierarchy: o.Hierarchy != "", FillGaps: o.FillGaps, Buckets: o.Buckets}, joined)
	groups := beam.GroupByKey(s, series)
	results := beam.ParDo(s, &forecastFn{
		Model: o.Model, Horizon: o.Horizon, Levels: o.Levels, Backtest: o.Backtest,
		Reconcile: o.Reconcile, NonNegative: o.NonNegative, Paths: o.Paths, Seed: o.Seed, Workers: o.Workers,
		OwnErrors: o.OwnErrors,
	}, groups)
	records = append(records, assembled, results)

	lines := beam.ParDo(s, &shardFn{Shards: o.Shards}, beam.Flatten(s, records...))
	markers := beam.ParDo(s, &allShardsFn{Shards: o.Shards}, beam.Impulse(s))
	files := beam.GroupByKey(s, beam.Flatten(s, lines, markers))
	beam.ParDo0(s, &writeFn{Dir: o.Output, Levels: o.Levels}, files)
	return nil
}

// noPlaces gives the empty collection of places when there is no
// hierarchy file.
func noPlaces(_ []byte, _ func(string, Place)) {}

func init() {
	for _, t := range []reflect.Type{reflect.TypeFor[Obs](), reflect.TypeFor[Place](), reflect.TypeFor[SeriesRec](), reflect.TypeFor[Record]()} {
		beam.RegisterType(t)
	}
	register.DoFn4x0[context.Context, fileio.ReadableFile, func(string, Obs), func(Record)](&readDataFn{})
	register.DoFn4x0[context.Context, fileio.ReadableFile, func(string, Place), func(Record)](&readPlacesFn{})
	register.DoFn6x0[context.Context, string, func(*Obs) bool, func(*Place) bool, func(string, SeriesRec), func(Record)](&assembleFn{})
	register.DoFn4x0[context.Context, string, func(*SeriesRec) bool, func(Record)](&forecastFn{})
	register.DoFn2x0[Record, func(string, string)](&shardFn{})
	register.DoFn2x0[[]byte, func(string, string)](&allShardsFn{})
	register.DoFn3x1[context.Context, string, func(*string) bool, error](&writeFn{})
	register.Function2x0(noPlaces)
	register.Emitter2[string, Obs]()
	register.Emitter2[string, Place]()
	register.Emitter2[string, SeriesRec]()
	register.Emitter2[string, string]()
	register.Emitter1[Record]()
	register.Iter1[Obs]()
	register.Iter1[Place]()
	register.Iter1[SeriesRec]()
	register.Iter1[string]()
}
