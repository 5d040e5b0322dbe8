// Package reconcile makes forecasts of hierarchical and grouped series
// coherent, so that the forecast of every total equals the sum of the
// forecasts of its parts.
//
// A Structure fixes n series (nodes), the last m of which are the bottom
// series, and the n × m summing matrix S with y = S b for every vector b
// of bottom values. NewHierarchy (parent links) and HierarchyFromPaths
// ("total/north/store1") build a tree, a *Hierarchy; NewGrouped builds a
// cross-classified structure, a *Grouped (for example region × product
// family, with aggregates for every factor and every combination of
// factors). Every matrix handed to or returned by the package has one
// column per node in the structure's node order and one row per forecast
// step (or per observation, for history and residuals).
//
// The methods map base forecasts ŷ (h × n, made independently node by
// node) to reconciled ones S b:
//
//	reconcile.BottomUp(st, base)
//	reconcile.TopDown(h, base, reconcile.ForecastProportions, nil)
//	reconcile.MiddleOut(h, 1, base, reconcile.AverageHistoricalProportions, history)
//	reconcile.OLS(st, base)
//	reconcile.WLSStructural(st, base)
//	reconcile.WLSVariance(st, base, residuals)
//	reconcile.MinT(st, base, residuals, reconcile.Shrinkage)
//	reconcile.Reconcile(st, base, reconcile.Spec{Residuals: residuals, NonNegative: true})
//
// Reconciled forecasts with their distributions come in one call from a
// batch of fitted models, one per node (Aggregate makes every node's
// series from the bottom series):
//
//	series, err := reconcile.Aggregate(st, bottom)
//	results, err := almanac.BatchFit(ctx, smoothing.Select{}, series, almanac.BatchOptions{})
//	rec, err := reconcile.FromBatch(ctx, st, results, 12, reconcile.Spec{NonNegative: true}, 80, 95)
//
// (FromFits takes []almanac.Fitted; Forecasts takes base forecasts.)
//
// The projection methods use b = G ŷ with G = (S' W⁻¹ S)⁻¹ S' W⁻¹: W = I
// (OLS), W = diag(S 1) (WLS, structural scaling), W = diag(W1) (WLS,
// variance scaling), W = W1 (MinT, sample) or the shrinkage estimate
// (MinT, shrinkage), where W1 = E'E / T is the uncentred covariance of the
// in-sample one-step residuals E (see EstimateCovariance). Forecasts
// reconciles whole []almanac.Forecast values including their
// distributions: sample paths are made joint across the nodes (below) and
// reconciled path by path, Gaussian forecasts get the covariance
// S G Σ G' S' (ReconciledCovariance) with the residuals' correlation in Σ.
//
// # Joint sample paths
//
// A total's band is only as wide as its parts' errors make it, and the
// errors of related series move together: with two parts of equal
// variance and correlation ρ the total's variance is 1 + ρ times what
// independent errors give. So FromFits, FromBatch and Forecasts tie the
// nodes' sample paths together before reconciling them (Spec.Draw; the
// default is JointBootstrap). Path k of node i is
//
//	ŷ_i + L_i z_i^(k),
//
// with ŷ_i the node's point forecasts, L_i the lower-triangular Cholesky
// factor of the h × h covariance of the node's own simulated paths (so
// each node keeps its model's spread at every step and the correlation
// of its errors across steps, which makes sums over the horizon — an
// annual total — right), and z^(k) innovations whose h rows, one per step
// and drawn independently, carry the dependence between the nodes:
// JointBootstrap resamples whole time points of the in-sample residuals
// of all nodes together, each node's residuals centred and scaled to
// variance 1 (the residual bootstrap of Panagiotelis, Gamakumara,
// Athanasopoulos & Hyndman 2023, with each model's own error dynamics);
// JointGaussian draws Gaussian vectors with the correlation of the
// covariance the reconciliation estimates. For a linear model with
// Gaussian innovations L_i is σ_i times the model's lower-triangular matrix
// of impulse responses (common practice: the h-step error of a linear
// model is the sum of its impulse responses times the innovations), so
// the joint paths have exactly the model's h-step covariances, and the
// innovations of different nodes are correlated at equal times only, as
// one-step residuals are. For other models (multiplicative errors,
// transformations) the paths keep the first two moments of each model's
// errors, not their shape. The joint draws need at least 10 time points
// at which every node has a residual. IndependentPaths leaves each node's
// paths independent and is there for comparison and for paths that are
// already joint.
//
// Measured (TestJointPathsTotalVariance): three correlated random walks
// (correlations 0.5 to 0.7) under a two-level hierarchy, naive base
// models, 2000 paths: the total's variance from the joint paths was 0.92
// to 1.06 times the simulation's at steps 1 and 12 and for the sum over 12
// steps, for five methods and draws; independent draws gave 0.44 of it.
// On the quickstart's invented garden-supplies hierarchy (automatic
// exponential smoothing for each of its 37 nodes, three yearly origins)
// the all-products annual 80% band widened from ±0.55–0.72% with
// independent draws to ±0.93–1.34% (ETS(M,A,M) fitted to the total alone
// gives ±0.85–1.64%); the bands' coverage there was still about 50%, as
// the models' one-step errors understate their errors a year ahead,
// which joint draws cannot mend.
//
// # Non-negative reconciliation
//
// With Spec.NonNegative the bottom level is the exact minimiser of
// (ŷ − S b)' W⁻¹ (ŷ − S b) over b ≥ 0 in the method's own metric W (the
// problem of Wickramasuriya, Athanasopoulos & Hyndman 2020), a convex
// quadratic programme with bounds. It is solved by the Lawson–Hanson
// active-set method on the normal equations Q = S' W⁻¹ S, c = S' W⁻¹ ŷ:
// free variables are added one at a time by largest gradient, each
// passive-set system is solved by Cholesky, and steps are cut back to
// keep b ≥ 0, until the KKT conditions hold. When the unconstrained
// solution is already non-negative it is returned unchanged. For
// bottom-up the solution is the bottom level clipped at zero.
// Top-down and middle-out are non-negative whenever their inputs are.
//
// # Missing values
//
// Base forecasts must be complete: NaN gives an error wrapping
// almanac.ErrMissing, ±Inf one wrapping almanac.ErrNonFinite. Rows of
// residuals or history that hold a NaN are dropped (complete cases), so
// the first residual of a model that has none (NaN) costs one row; ±Inf
// there is an error. The joint sample paths resample the time points at
// which every node has a residual, and measure each node's error
// covariance on its complete paths (a simulated path that left its
// model's domain, NaN from there on, is skipped).
//
// # Numerical notes
//
// No inverse is formed. A full W is first equilibrated to its correlation
// matrix and factorised by Cholesky; a factorisation that fails or whose
// condition estimate exceeds 1e12 is reported as ErrSingular, with the
// advice to use the shrinkage estimator (the sample covariance is
// singular when T < n, and whenever the residuals themselves add up, as
// those of naive forecasts do). G is then computed in whichever of two
// equal forms has the smaller system: through the m × m matrix S' W⁻¹ S,
// or through the (n−m) × (n−m) matrix U' W U of the constraint
// formulation g = J − J W U (U' W U)⁻¹ U' (Wickramasuriya et al. 2019);
// the second is used when there are no more aggregates than bottom series,
// which makes MinT cost O(n³/3) for the check of W plus O(n² (n−m)).
// That smaller system is equilibrated and checked the same way, so series
// whose scales differ by many orders of magnitude are handled. Both forms
// reproduce the reference values to about 1e-15 relative.
//
// Every method is positively homogeneous (reconciling c·ŷ, with
// residuals c·E and history c·Y, gives c times the result) and W matters
// only up to a factor, so each step's base vector, the residuals and the
// history are divided by a power of two taken from their largest
// magnitude, reconciled, and multiplied back. Multiplying by a power of
// two is exact in float64, so this changes no bit of any result for
// ordinary data and makes scaling by powers of two exact; for values near
// the float64 limit (about 1e308, or residuals beyond 1e154 whose squares
// would overflow) it keeps intermediate sums from overflowing, so every
// representable answer comes out. An answer that is itself beyond
// ±MaxFloat64 (a total of bottom series near the limit, a band or a
// covariance reaching past it) is an error wrapping almanac.ErrNonFinite,
// never ±Inf or NaN with a nil error.
//
// The shrinkage intensity is λ = Σ_{i≠j} Var(r_ij) / Σ_{i≠j} r_ij², with
// r the correlations of W1 and Var(r_ij) = Σ_t (w_tij − w̄_ij)² / (T(T−1)),
// w_tij = z_ti z_tj for the standardised residuals z, computed in two
// passes, clipped to [0, 1].
//
// Forecast proportions split a node among children whose base forecasts
// are all zero in equal parts; children whose base forecasts have mixed
// signs and sum to zero give ErrProportion.
//
// # Concurrency
//
// Structures are immutable after construction and safe for concurrent
// use; every function is a pure function of its arguments (it reads the
// matrices it is given and returns fresh ones) and starts no goroutines of
// its own. (gonum's blocked Cholesky factorisation hands large matrix
// products, from a few hundred nodes up, to its parallel kernel, which splits
// the output into blocks each summed in a fixed order, so the result does
// not depend on scheduling.) Results are bit-identical from run to run and
// whatever the number of goroutines. Reconcile many independent structures (or forecast
// origins) in parallel from the caller. FromFits and FromBatch draw every
// node's paths on the calling goroutine from streams seeded by Spec.Seed,
// so their results are bit-identical too; they check their context
// between nodes.
//
// # Performance
//
// Measured with go test -bench (best of three runs of 20 iterations) on a
// 2-core machine shared with other jobs, so the figures are indicative.
// Hierarchy total → regions → 20 shops each, 60 residual rows, h = 12:
//
//	MinT, shrinkage, 40 shops (n = 43)          0.3 ms    0.16 MB
//	MinT, shrinkage, 200 shops (n = 211)        7.8 ms    2.2 MB
//	MinT, shrinkage, 600 shops (n = 631)        76 ms     17 MB
//	MinT, sample (240 rows), n = 211            4.9 ms    2.4 MB
//	MinT, shrinkage, non-negative, n = 211      13 ms     3.5 MB  (many active bounds)
//	OLS / WLS structural, n = 211               0.8–1.1 ms
//	bottom-up / top-down (forecast proportions) 0.03 / 0.04 ms
//	Forecasts, Gaussian, MinT shrinkage, n=211  28 ms     10 MB
//	Forecasts, 1000 paths × 12 steps, n = 211, MinT shrinkage, one core
//	(user CPU time per call; wall times were 5× that under the load):
//	  paths as given (IndependentPaths)         1.0 s     34 MB
//	  joint bootstrap                           1.1 s     94 MB
//	  joint Gaussian                            1.5 s     115 MB
//	  (most of it reconciling 12,000 vectors and sorting the paths for
//	  the bands)
//
// The cost of MinT is dominated by the Cholesky check of W (n³/3) and the
// shrinkage intensity (T n²); the per-step work allocates nothing. The
// joint draws cost O(n P h²) for P paths of h steps (each node's factor
// and its paths) plus, for JointGaussian, O(n² P h) or O(n T P h); they
// hold the base and the reconciled paths, 16 n P h bytes, at once. All
// linear algebra is dense, which suits structures up to a few thousand
// nodes; bottom-up and top-down never form a matrix.
//
// # References
//
// Volume, issue and page numbers below are recalled from memory.
//
// Athanasopoulos, G., Ahmed, R. A. & Hyndman, R. J. (2009). Hierarchical
// forecasts for Australian domestic tourism. International Journal of
// Forecasting 25(1), 146–166. (Forecast proportions.)
//
// Athanasopoulos, G., Hyndman, R. J., Kourentzes, N. & Petropoulos, F.
// (2017). Forecasting with temporal hierarchies. European Journal of
// Operational Research 262(1), 60–74. (WLS with structural scaling.)
//
// Gross, C. W. & Sohl, J. E. (1990). Disaggregation methods to expedite
// product line forecasting. Journal of Forecasting 9(3), 233–254.
// (Top-down historical proportions.)
//
// Hyndman, R. J., Ahmed, R. A., Athanasopoulos, G. & Shang, H. L. (2011).
// Optimal combination forecasts for hierarchical time series.
// Computational Statistics & Data Analysis 55(9), 2579–2589. (OLS.)
//
// Lawson, C. L. & Hanson, R. J. (1974). Solving Least Squares Problems.
// Prentice-Hall, chapter 23. (The active-set method.)
//
// Panagiotelis, A., Gamakumara, P., Athanasopoulos, G. & Hyndman, R. J.
// (2023). Probabilistic forecast reconciliation: properties, evaluation
// and score optimisation. European Journal of Operational Research
// 306(2), 693–706. (Reconciling sample paths; joint base paths by
// resampling the residuals of all series at common time points.)
//
// Schäfer, J. & Strimmer, K. (2005). A shrinkage approach to large-scale
// covariance matrix estimation and implications for functional genomics.
// Statistical Applications in Genetics and Molecular Biology 4(1),
// article 32.
//
// Wickramasuriya, S. L., Athanasopoulos, G. & Hyndman, R. J. (2019).
// Optimal forecast reconciliation for hierarchical and grouped time series
// through trace minimization. Journal of the American Statistical
// Association 114(526), 804–819. (MinT.)
//
// Wickramasuriya, S. L., Turlach, B. A. & Hyndman, R. J. (2020). Optimal
// non-negative forecast reconciliation. Statistics and Computing 30,
// 1167–1182.
package reconcile
