// Package brent holds Brent's bounded univariate minimiser, shared by the
// Box-Cox λ search and the one-parameter smoothing methods (gonum's
// optimize package has no bounded one-dimensional minimiser).
//
// # Missing values
//
// Not applicable: Minimize takes a function. A NaN value of the objective
// counts as +Inf, also at the first evaluation point, so the search stays
// where the objective is defined.
//
// # Numerical notes
//
// Golden-section steps alternate with parabolic interpolation as in
// Brent's procedure "localmin"; the result is within about
// 2(1.5e-8·|x| + tol/3) of a local minimum. The objective is evaluated at
// most maxIter+1 times, always inside [a, b].
//
// # Concurrency
//
// Minimize is pure apart from calling f, sequentially; it starts no
// goroutines and is safe for concurrent use with distinct objectives.
//
// # Performance
//
// Measured with go test -bench on a 2-core machine shared with other
// jobs, so indicative: minimising exp(x) − 2x on [−1, 2] to 1e-10 takes
// about 0.7 µs, with no allocation.
//
// # References
//
// R. P. Brent (1973), Algorithms for Minimization without Derivatives,
// Prentice-Hall, chapter 5.
package brent
