/**
 * Exact reference solutions for checking stochastic fits: weighted and ridge least squares by QR
 * ({@link dev.riskmin.reference.LeastSquares}) and Newton's method / IRLS for the logistic, Poisson
 * and softmax losses ({@link dev.riskmin.reference.NewtonSolver}), each on the same objective
 * definition as the library's objectives, so that the solution is where their gradient vanishes.
 * Used by tests, benchmarks and the "certified" diagnostics mode (true suboptimality, angle to the
 * optimum).
 *
 * <p>Null is never a valid argument. Solvers and solutions are immutable and thread-safe; a solve
 * allocates its own work space. When no finite optimum exists a solver throws an
 * {@link java.lang.IllegalStateException} that says why and what to change.
 */
package dev.riskmin.reference;
