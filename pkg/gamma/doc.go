// Package gamma fits a two-parameter gamma distribution (location fixed at
// zero) to positive values, such as the distances between healthy
// embeddings and their reference, and answers the questions needed to
// turn that fit into an alarm level: CDF, survival, quantiles and a
// Kolmogorov-Smirnov measure of fit quality.
//
// The density with shape k and scale θ is
//
//	f(x) = x^(k-1) exp(-x/θ) / (Γ(k) θ^k),  x > 0.
//
// Fit is the maximum-likelihood estimate; the package tests compare it,
// and the distribution functions, with SciPy 1.10.1
// (scripts/ref/make_gamma_fixture.py).
//
// The package does no file or network I/O.
package gamma
