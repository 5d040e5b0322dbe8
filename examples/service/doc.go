// Command service is a small planning service on the standard library's
// net/http: planners' tools post series to it, have models fitted and
// stored, fetch forecasts with bands, compare methods with the
// benchmarks, look at charts and the review page, and refresh stored
// models as new observations arrive. Series and fitted models are kept in
// an SQLite database file (the pure-Go driver modernc.org/sqlite, no
// cgo), so a restart loses nothing:
//
//	go -C examples run ./service -db /tmp/plan.db [-addr 127.0.0.1:8360] [-timeout 2m] [-max-body 8388608]
//
// The handlers are methods of Server, on any Store; SQLiteStore is the
// one the command uses. The data of the tests and examples are invented
// (a fictional chain of hardware stores).
//
// # Endpoints
//
//	GET  /v1/methods                        the methods a fit may name
//	POST /v1/series[?gaps=fill]             store series (JSON, or the long CSV with Content-Type text/csv); replaces same keys
//	GET  /v1/series                         list the stored series
//	GET  /v1/series/{key}                   one series, values with null for missing
//	POST /v1/series/{key}/observations      append observations: {"values": [14.2, null, 15]}
//	POST /v1/series/{key}/backtest          compare methods with the benchmarks (accuracy.Backtest)
//	POST /v1/models                         fit a stored series: {"series": KEY, "method": "ets"}; 201 with the model's id
//	GET  /v1/models[?series=KEY]            list the stored models
//	GET  /v1/models/{id}                    one model (for the automatic forecaster also its route)
//	GET  /v1/models/{id}/document           the saved-model document (almanac.SaveModel), for almanac.LoadModel
//	GET  /v1/models/{id}/forecast?h=12&level=80&level=95   forecast with bands
//	GET  /v1/models/{id}/chart?format=svg|png&h=&level=&width=&height=   fan chart (examples/charts)
//	POST /v1/models/{id}/refresh            bring the model up to its series (see Refresh)
//	GET  /v1/review[?series=KEY...]&h=&level=   the review page of the stored models (accuracy.WriteReview)
//
// A key holding a slash is written with the slash escaped in a path
// (/v1/series/north%2Fpaint).
//
// A series in JSON is {"key": "north/paint", "start": "2021-01", "unit":
// "month", "every": 1, "values": [212.4, null, 230.1]}; start takes the
// layouts of the CSV reader (almanac.DefaultTimeLayouts), unit is minute,
// hour, day, week, month, quarter or year, and every (default 1) the
// number of units between observations. POST /v1/series takes {"series":
// [...]}. The CSV is the library's long format (columns series, period,
// value; see almanac.ReadCSV); a period without a row is an error unless
// the query says gaps=fill, which makes it a missing value.
//
// Methods (field "method" of a fit, "methods" of a backtest): pilot (the
// default: the automatic forecaster, accuracy.Pilot, with the options
// seed, paths and plain_bands), ets (smoothing.Select), arima
// (arima.Search), theta (smoothing.Theta), and the benchmarks naive and
// seasonal-naive (a backtest always includes the naive method and, for
// seasonal data, the seasonal naive one, so they are not named there). A backtest request is
// {"methods": ["pilot", "ets"], "horizon": 12, "origins": 4, "levels":
// [80, 95]}, every field optional (one seasonal period ahead from the 4
// latest origins, bands at 80 and 95).
//
// # Storing models
//
// A fitted model is stored as the library's saved-model document
// (almanac.MarshalModel) and rebuilt by almanac.UnmarshalModel, which
// forecasts bit for bit as the model did before. A fitted type that
// does not implement almanac.Storable (a library version whose automatic
// forecaster has no saved-model kind yet, or a method of your own added
// to the service) is stored as a recipe instead: the method, its options
// and the data, fitted again when loaded, which gives the same model
// because every method is deterministic (the recipe is checked against
// the stored model's notation). The answer of a fit says which form it
// was stored in (stored_as). Loaded models are kept in memory (up to
// 256).
//
// # Refresh
//
// POST /v1/models/{id}/refresh gives the observations of the series that
// follow those the model has taken to almanac.Refresh, without
// estimation. Then almanac.RefreshPolicy decides whether the model should
// be estimated again (after a number of new observations, or when Trigg's
// tracking signal says it has drifted); when it says so, or the model
// cannot be refreshed, the model is fitted again on the whole series by
// its method. The optional body sets the policy: {"refit_after": 12,
// "signal_weight": 0.1, "signal_limit": 0.5}. The answer holds the action
// (unchanged, refreshed or refitted), the model, and the decision with
// its reason. The model keeps its id. A series whose stored history was
// replaced since the model took it gives 409: fit a new model.
//
// # Errors
//
// Every error is answered with a JSON problem document:
//
//	{"problem": {"status": 400, "kind": "invalid-input", "detail": "...", "field": "series[0].values[3]"}}
//
// field names the JSON member or query parameter at fault (for CSV input
// the column), line the CSV line. Status and kind come from the
// library's sentinel errors by errors.Is: 400 invalid-input (malformed
// JSON or CSV, an unknown member, a bad time, unit, level or horizon, an
// infinite or all-missing series), 404 not-found (unknown series, model
// id or route), 405 wrong-method, 409 conflict (a stale model), 413
// body-too-large, 422 cannot-fit (data the method cannot fit: too short,
// constant, missing values for a method that needs complete data), 503
// deadline (the request's deadline passed or the client went away), 500
// store (the database failed, or a stored model no longer loads) or
// internal.
//
// # Limits
//
// A request body is limited to -max-body bytes (8 MiB) by
// http.MaxBytesReader; a larger one gives 413. Each request has a
// deadline (-timeout, 2 minutes): the fits and backtests run under the
// request's context, so a deadline or a client that goes away stops them,
// and a model whose fit was stopped is not stored. Forecasts are limited
// to 1000 steps, 8 band levels, backtests to 6 methods and 48 origins,
// charts to 4000 pixels a side, series keys to 200 bytes.
//
// # Missing values
//
// A missing observation is null in JSON (in requests and answers) and an
// empty cell or NA, N/A, NaN or null in the CSV. Series keep them; a
// method that needs complete data (ets, for one) fails with 422 and names
// the first missing value, while the automatic forecaster fills them and
// lists what it filled on the review page.
//
// # Performance
//
// Measured with the package's benchmarks on the shared two-core
// development machine: a forecast request for a model in memory takes
// about 60–75 µs, and rebuilding a stored ETS model from its document
// (after a restart) about 60 µs. A fit takes what the method takes; the
// recipe of the automatic forecaster is fitted again on first use after a
// restart.
//
// # Concurrency
//
// Requests are served concurrently; each fit runs on its request's
// goroutine. The store serialises writes (one SQLite connection, one
// transaction per write), and a refresh based on a version of a model
// that another request has changed meanwhile gives 409.
package main
