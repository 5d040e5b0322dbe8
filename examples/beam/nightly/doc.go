// Package nightly is almanac's nightly forecasting job as an Apache Beam
// pipeline (Go SDK): the same code runs in-process on Beam's prism runner
// and, unchanged, on a Flink, Spark or Dataflow cluster, for catalogues
// that outgrow one machine.
//
// Build adds the pipeline to a Beam scope:
//
//	p, s := beam.NewPipelineWithRoot()
//	err := nightly.Build(s, nightly.Options{
//		Input:     "sales-*.csv",  // series,period,value
//		Hierarchy: "places.csv",   // series,within  ("N03/PNT")
//		Output:    "out",
//		Backtest:  3,
//	})
//	res, err := beam.Run(ctx, "prism", p)
//
// The stages:
//
//  1. Read every data file matching Options.Input (long format: one row
//     per series and period; almanac's column names by default) and,
//     when given, the hierarchy files matching Options.Hierarchy (one row
//     per series naming its parents from the root down, "N03/PNT").
//  2. Join each series' rows with its place (CoGroupByKey on the series
//     key), sort them by period, infer the frequency, and build the
//     series.
//  3. Group the series by the root of their hierarchy (GroupByKey), so
//     that each hierarchy is forecast and reconciled on one worker; the
//     series outside any hierarchy are dealt into Options.Buckets groups.
//  4. In each group: fit the model to every series (almanac.BatchFit; by
//     default the automatic forecaster accuracy.Pilot), sum the series
//     into the hierarchy's aggregates (Aggregate) and fit those, pool the
//     calibration errors of all the group's fits (PoolFits, that is
//     accuracy.PoolPilots), forecast, reconcile all nodes' forecasts with
//     joint sample paths (reconcile.FromFits), and, when asked, backtest
//     every series against the naive and seasonal naive benchmarks
//     (accuracy.Backtest).
//  5. Write four outputs as CSV shards, each shard with its header and its
//     rows sorted: forecasts (base and reconciled, with bands), accuracy,
//     status and dead letters (ForecastHeader, AccuracyHeader,
//     StatusHeader, DeadLetterHeader say what the columns hold).
//
// # Nothing goes missing
//
// Bad data never fails the pipeline. A row that cannot be read (bad CSV,
// an unparsable period or value, ±Inf, an empty key, a short row) is a
// dead-letter row naming its file, line and reason; a series that cannot
// be built or forecast (duplicate periods, a gap, too short, not placed
// in the hierarchy, a model that fails) is a dead-letter row and a
// "failed" status row with the reason; a hierarchy that cannot be
// reconciled keeps its base forecasts, with a dead-letter row for the
// tree. Every series named in the data or the hierarchy file has exactly
// one status row, and every aggregate one too, saying which series it
// leaves out. The Beam counters (namespace "almanac") count series
// forecast, failed by reason (series_failed_REASON) and skipped, the same
// for aggregates, rejected rows by reason, and hierarchies reconciled or
// not.
//
// # Calibrated bands, pooled per group
//
// The default model, accuracy.Pilot, calibrates its bands on
// out-of-sample errors at rolling origins near the end of each series. A
// monthly series of five or six years has only one to four such origins
// of its own, too few for calibrated bands (accuracy.DefaultMinErrors),
// so a program fitting a catalogue pools the errors of its series with
// accuracy.PoolPilots. The pipeline pools them within each group: all
// the nodes of a hierarchy (its series and its aggregates, in the
// hierarchy's node order), or all the series of a bucket (in key order;
// BucketOf), each group split further by frequency and route as
// PoolPilots does by default. A store of 100 product lines and 11
// aggregates pools over 100 trajectories; a bucket of a flat catalogue
// pools its share of the catalogue (Options.Buckets sets the share).
// The status file says for each series where its bands came from.
//
// Why not pool over the whole catalogue, as the single-machine program
// does? Pilot's fits cannot travel between stages (they have no saved
// form yet), so a catalogue-wide pool would take a second pass: fit
// every series, gather every error trajectory in one place, and fit
// every series again with the pool as a side input: twice the fitting,
// for a larger pool where a group's already holds tens to hundreds of
// trajectories (how much the larger pool would change the bands was not
// measured). Pooling per group keeps each group
// self-contained (one worker, one pass) and each forecast reproducible
// from its group alone; a test checks the pipeline against
// almanac.BatchFit and accuracy.PoolPilots run on the same groups.
// Options.OwnErrors switches pooling off.
//
// The per-series backtest (Options.Backtest) fits Pilot afresh at each
// origin, on that series alone: its coverage figures are those of
// unpooled bands.
//
// # Missing values
//
// The tokens almanac.ReadCSV reads as missing (empty, NA, N/A, NaN,
// null) give NaN, which reaches the model; whether it copes is the
// model's business (a failure is reported). Periods with no row are a
// gap: the series fails with reason "gap" unless Options.FillGaps, which
// fills them with NaN. An aggregate is NaN where any of its series is.
//
// # Numerical notes
//
// Nothing between the file and the model changes a value: values are
// parsed with strconv.ParseFloat, travel between stages as their exact
// float64 bits (Beam's coders), and are written with strconv 'g' -1, the
// shortest text that reads back as the same float64. The rows of a
// series are sorted by period whatever order the runner delivers them
// in, a hierarchy's series by key, and aggregates are summed in a fixed
// order (see Aggregate), so the pipeline's forecasts are bit-identical to
// what the library computes directly from the same series with the same
// model, the same pooling groups (PoolFits) and reconcile.Spec
// (ReconcileSpec), on any runner and for any number of workers (the
// test checks this bit for bit).
//
// The series of one hierarchy must cover the same periods (the joint
// sample paths match residuals period by period): the span most of them
// share is used, and the others fail with reason "misaligned".
//
// # Concurrency
//
// The runner spreads the groups over its workers; within a group (a
// hierarchy, or a bucket of series outside any) the series are fitted on
// Options.Workers goroutines (almanac.BatchFit),
// with results that do not depend on their number. Reconciliation of one
// hierarchy is sequential. A hierarchy's series are held in one worker's
// memory at once, which suits hierarchies up to a few thousand nodes
// (MinT is dense; see package reconcile).
//
// # Performance
//
// Measured with BenchmarkPipeline and BenchmarkBatchFit (-benchtime 1x,
// one run each) on generated catalogues of 60-month series forecast 12
// months ahead with 80% and 95% bands by the default model (Pilot, bands
// pooled as described above; BenchmarkBatchFit pools over the whole
// catalogue with accuracy.PoolPilots, as the README's first program
// does), on the 2-core development machine while it was shared (load
// average 5 to 24), so wall times are indicative; CPU seconds are user +
// system time of the whole process and compare better:
//
//	2,000 series (20 stores)                   wall    series/s  CPU s
//	almanac.BatchFit + PoolPilots, CSV in/out  120 s   16.6       82
//	pipeline on prism, no hierarchy            303 s    6.6       87
//	pipeline on prism, 20 stores reconciled    166 s   12.1      132
//	  (+ 220 aggregates, MinT, 1000 joint paths per store)
//
//	200 series (2 stores)
//	almanac.BatchFit + PoolPilots, CSV in/out   47 s    4.2        8.9
//	pipeline on prism, no hierarchy              61 s    3.3       11.8
//	pipeline on prism, 2 stores reconciled       93 s    2.1       19.9
//
// The flat pipeline costs about as much CPU as BatchFit (87 against 82
// CPU s for 2,000 series: Beam's reading, shuffles, coders and writing
// are small beside Pilot's fitting, about 40 CPU ms a series); its wall
// time was measured under heavier load than BatchFit's (load average 12
// to 18 against about 5). Reconciliation adds 45 CPU s for 20 stores,
// about 2.3 per store of 111 nodes: the 11 aggregates' fits and MinT
// with 1000 joint paths; the local runner reconciles one hierarchy at a
// time. With smoothing.Select (-model select), before the ETS speed-up
// on main, the same 2,000 series took 31–36 CPU s by BatchFit, 46 on the
// flat pipeline and 91–116 reconciled.
//
// Building the Beam SDK is costly, which is why examples/beam is a module
// of its own (the examples module's tests do not build it; CI tests it in
// a step of its own): with an empty GOCACHE, "go build ./beam" took 283
// CPU s (260 user, 23 system; peak 2.2 GB resident) and
// "go test -race -run '^$' ./beam/..." 367 CPU s (341 user, 27 system),
// so on two idle cores roughly 2.5 and 3 minutes. The package's tests then take about 57 CPU
// s under -race (125 s wall at load average 7).
//
// # References
//
// The pipeline uses the methods of the almanac packages, whose doc.go
// files give their references; the dataflow model is that of Apache Beam
// (Akidau et al. 2015, "The Dataflow Model", Proceedings of the VLDB
// Endowment 8(12), 1792–1803; volume and pages recalled from memory).
package nightly
