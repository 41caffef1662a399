package dev.riskmin.reference;

import dev.riskmin.data.Dataset;
import dev.riskmin.data.DenseFeatures;
import dev.riskmin.data.FeatureMatrix;
import dev.riskmin.data.TargetKind;
import dev.riskmin.loss.LogisticLoss;
import dev.riskmin.loss.Loss;
import dev.riskmin.loss.Losses;
import dev.riskmin.loss.TargetDomain;
import dev.riskmin.util.Arguments;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.LinearSolverFactory_DDRM;
import org.ejml.interfaces.linsol.LinearSolverDense;

import java.util.Arrays;

/**
 * Newton's method (iteratively reweighted least squares) for the logistic, Poisson (log link) and
 * softmax cross-entropy losses with an optional L2 penalty, on exactly the objective of
 * {@code LinearObjective} / {@code MulticlassObjective}:
 * <blockquote>
 *   L(h) = (1/n) Σ<sub>i</sub> ω<sub>i</sub> ℓ(z<sub>i</sub>, y<sub>i</sub>) + (λ/2) Σ<sub>k</sub> ‖w<sub>k</sub>‖²,   ω<sub>i</sub> = n w<sub>i</sub>/Σw,
 * </blockquote>
 * intercepts unpenalized, z<sub>i</sub> = w·x<sub>i</sub> + b (one block) or z<sub>ik</sub> = w<sub>k</sub>·x<sub>i</sub> + b<sub>k</sub>
 * (K blocks of stride d + 1, the layout of {@code MulticlassObjective}). With x̃ = (x, 1):
 * <ul>
 *   <li>logistic, y ∈ {0,1}, ±1 or a proportion (y<sub>01</sub> = max(y, 0)): ℓ = log(1 + e<sup>z</sup>) − y<sub>01</sub>z,
 *       gradient (1/n) Σ ω<sub>i</sub> (p<sub>i</sub> − y<sub>01,i</sub>) x̃<sub>i</sub>, Hessian (1/n) Σ ω<sub>i</sub> p<sub>i</sub>(1 − p<sub>i</sub>) x̃<sub>i</sub>x̃<sub>i</sub><sup>T</sup>,
 *       p = σ(z) (a proportion k/m with weight m is the binomial likelihood);</li>
 *   <li>Poisson, y ≥ 0: ℓ = e<sup>z</sup> − yz, gradient (1/n) Σ ω<sub>i</sub>(μ<sub>i</sub> − y<sub>i</sub>) x̃<sub>i</sub>, Hessian
 *       (1/n) Σ ω<sub>i</sub> μ<sub>i</sub> x̃<sub>i</sub>x̃<sub>i</sub><sup>T</sup>, μ = e<sup>z</sup>;</li>
 *   <li>softmax, y ∈ {0 … K−1}: ℓ = log Σ<sub>k</sub> e<sup>z<sub>k</sub></sup> − z<sub>y</sub>, gradient of block k
 *       (1/n) Σ ω<sub>i</sub>(p<sub>ik</sub> − [y<sub>i</sub> = k]) x̃<sub>i</sub>, Hessian
 *       (1/n) Σ ω<sub>i</sub> (diag p<sub>i</sub> − p<sub>i</sub>p<sub>i</sub><sup>T</sup>) ⊗ x̃<sub>i</sub>x̃<sub>i</sub><sup>T</sup>, built explicitly
 *       (size (K(d+1))², meant for small d·K);</li>
 * </ul>
 * plus λ on the diagonal of every penalized coordinate. Each iteration solves H Δ = −∇L by Cholesky
 * and halves the step from t = 1 until the Armijo condition L(h + tΔ) ≤ L(h) + 10<sup>−4</sup> t ∇L·Δ
 * holds (Armijo, Pacific J. Math. 16(1), 1966), up to an allowance of 8ε times the summed
 * magnitudes of L's terms for rounding in L (terms such as e<sup>z</sup> − yz cancel, so |L| itself
 * can be far below its rounding error). Without step halving this is Fisher scoring =
 * IRLS for these canonical links (McCullagh &amp; Nelder, <i>Generalized Linear Models</i>, 2nd ed.,
 * 1989, §2.5 and ch. 4–6; sections from memory; METHODS §12).
 *
 * <p>Stopping: when ‖∇L‖<sub>2</sub> ≤ tolerance · max(1, ‖∇L(h<sub>0</sub>)‖<sub>2</sub>), after one more
 * full Newton step that is kept only if it lowers the gradient norm (by quadratic convergence it
 * takes h close to full precision for the price of one iteration); or when a full accepted step no
 * longer changes h beyond rounding (then the reported gradient norm is the floor that double
 * precision allows). A solve that stops otherwise throws.
 *
 * <p>No finite optimum exists, and the solver refuses with an {@link IllegalStateException} saying
 * why and what to do, when: without L2, an iterate classifies every 0/1 (or class-) labelled sample
 * correctly with a positive margin (strict separation: scaling that iterate up drives L to its
 * infimum 0; Albert &amp; Anderson, Biometrika 71(1), 1984); without L2, the gradient test is met
 * while the Newton step still points along a direction of recession of L (quasi-separation, where
 * the gradient vanishes only at infinity; see {@code refuseRecession} in the source); with an
 * (unpenalized) intercept, whatever λ, all binary labels are equal, all counts are zero, or a class
 * is absent; the iterations run out while the parameters grow without bound; or the Hessian is
 * singular.
 *
 * <p>The softmax parametrization is redundant (adding one vector to every block changes nothing):
 * the intercepts always, and the coefficients when λ = 0, are determined only up to such a shift.
 * The solver adds the projector onto those shift directions to H, which leaves the Newton step on
 * the identifiable part unchanged and returns the solution whose blocks sum to zero in the
 * undetermined coordinates (the minimum-norm optimum). For K = 2 the difference of the two blocks
 * is the logistic solution with penalty λ/2 (METHODS §11).
 *
 * <p>Immutable and thread-safe (each solve uses its own buffers). A reference solver: clarity first;
 * it allocates nothing per sample, O(n·d + (K(d+1))²) per solve.
 */
public final class NewtonSolver {
    private static final double EPSILON = Math.ulp(1.0);
    private static final double ARMIJO = 1e-4;
    private static final int MAX_HALVINGS = 60;

    private enum Kind {
        LOGISTIC("logistic"), POISSON("Poisson"), SOFTMAX("softmax cross-entropy");

        final String label;

        Kind(String label) {
            this.label = label;
        }
    }

    private final Kind kind;
    private final boolean intercept;
    private final double l2;
    private final double tolerance;
    private final int maxIterations;

    private NewtonSolver(Kind kind, boolean intercept, double l2, double tolerance, int maxIterations) {
        this.kind = kind;
        this.intercept = intercept;
        this.l2 = l2;
        this.tolerance = tolerance;
        this.maxIterations = maxIterations;
    }

    /** Logistic loss, with an intercept, no penalty, tolerance 1e-10, at most 100 iterations. */
    public static NewtonSolver logistic() {
        return new NewtonSolver(Kind.LOGISTIC, true, 0.0, 1e-10, 100);
    }

    /** Poisson loss with log link, with an intercept, no penalty, tolerance 1e-10, at most 100 iterations. */
    public static NewtonSolver poisson() {
        return new NewtonSolver(Kind.POISSON, true, 0.0, 1e-10, 100);
    }

    /** Softmax cross-entropy over K classes, with intercepts, no penalty, tolerance 1e-10, at most 100 iterations. */
    public static NewtonSolver softmax() {
        return new NewtonSolver(Kind.SOFTMAX, true, 0.0, 1e-10, 100);
    }

    /** @return a copy with or without (unpenalized) intercepts */
    public NewtonSolver withIntercept(boolean withIntercept) {
        return new NewtonSolver(kind, withIntercept, l2, tolerance, maxIterations);
    }

    /**
     * @param strength λ ≥ 0 in (λ/2)Σ‖w<sub>k</sub>‖²
     * @throws IllegalArgumentException if negative, NaN or infinite
     */
    public NewtonSolver withL2(double strength) {
        return new NewtonSolver(kind, intercept, Arguments.nonNegative("l2", strength), tolerance, maxIterations);
    }

    /**
     * @param relative the gradient-norm tolerance, relative to max(1, ‖∇L(h<sub>0</sub>)‖); in (0, 1)
     * @throws IllegalArgumentException if outside (0, 1)
     */
    public NewtonSolver withTolerance(double relative) {
        Arguments.inOpenRange("tolerance", relative, 0.0, 1.0);
        return new NewtonSolver(kind, intercept, l2, relative, maxIterations);
    }

    /** @throws IllegalArgumentException if {@code iterations < 1} */
    public NewtonSolver withMaxIterations(int iterations) {
        return new NewtonSolver(kind, intercept, l2, tolerance, Arguments.positive("maxIterations", iterations));
    }

    public boolean hasIntercept() {
        return intercept;
    }

    public double l2() {
        return l2;
    }

    public double tolerance() {
        return tolerance;
    }

    public int maxIterations() {
        return maxIterations;
    }

    /**
     * Minimizes L over the dataset.
     *
     * @throws IllegalArgumentException naming the row of a target outside the loss's domain, or if
     *                                  softmax is asked of a dataset without class labels
     * @throws IllegalStateException    if no finite optimum exists or the iteration fails (see the
     *                                  class documentation), with the reason and the remedy
     */
    public NewtonSolution solve(Dataset data) {
        Arguments.notNull("data", data);
        Problem problem = new Problem(data);
        return problem.run();
    }

    @Override
    public String toString() {
        return "NewtonSolver[" + kind.label + ", intercept=" + intercept + ", l2=" + l2 + ", tolerance=" + tolerance
                + ", maxIterations=" + maxIterations + "]";
    }

    /** One solve: the data in flat form and every work buffer. */
    private final class Problem {
        private final int n;
        private final int d;
        private final int blocks;
        private final int stride;
        private final int p;
        private final double[] x;       // n*d row-major
        private final double[] y;
        private final double[] rawWeight;
        private final double[] c;       // w_i / Σw = ω_i / n
        private final boolean binaryLabels;
        private final double[] xt;      // x̃_i
        private final double[] z;
        private final double[] prob;
        private boolean separated;      // set by evaluate(): every sample correct with a positive margin
        private double magnitude;       // set by evaluate(): Σ c_i |terms of ℓ_i|, the scale of L's rounding
        private final Loss logistic = Losses.logistic();

        Problem(Dataset data) {
            FeatureMatrix f = data.features();
            n = f.rows();
            d = f.columns();
            if (f instanceof DenseFeatures) {
                x = ((DenseFeatures) f).values();
            } else {
                x = new double[n * d];
                for (int i = 0; i < n; i++) {
                    f.addRow(i, 1.0, x, i * d);
                }
            }
            y = data.targetsView();
            if (kind == Kind.SOFTMAX) {
                if (data.targetKind() != TargetKind.CLASSES) {
                    throw new IllegalArgumentException("the softmax cross-entropy loss needs class labels 0..K-1; "
                            + "build the dataset with labels(int[], K)");
                }
                blocks = data.classes();
            } else {
                blocks = 1;
            }
            stride = intercept ? d + 1 : d;
            p = blocks * stride;
            rawWeight = new double[n];
            c = new double[n];
            double total = 0;
            for (int i = 0; i < n; i++) {
                rawWeight[i] = data.weight(i);
                total += rawWeight[i];
            }
            for (int i = 0; i < n; i++) {
                c[i] = rawWeight[i] / total;
            }
            boolean binary = true;
            for (int i = 0; i < n; i++) {
                if (kind == Kind.LOGISTIC) {
                    logistic.requireTarget(y[i], i);
                    if (c[i] > 0 && !(y[i] == 1 || y[i] <= 0)) {
                        binary = false;
                    }
                } else if (kind == Kind.POISSON && !TargetDomain.NON_NEGATIVE.accepts(y[i])) {
                    throw new IllegalArgumentException("y[" + i + "] (" + y[i]
                            + ") is not valid for the Poisson loss: expected " + TargetDomain.NON_NEGATIVE.description());
                }
            }
            binaryLabels = binary;
            xt = new double[stride];
            z = new double[blocks];
            prob = new double[blocks];
            refuseDegenerateTargets();
        }

        /** Targets for which an unpenalized intercept has no finite optimum, whatever λ. */
        private void refuseDegenerateTargets() {
            if (!intercept) {
                return;
            }
            if (kind == Kind.LOGISTIC) {
                boolean anyPositive = false;
                boolean anyNegative = false;
                for (int i = 0; i < n; i++) {
                    if (c[i] > 0) {
                        double y01 = Math.max(y[i], 0.0);
                        anyPositive |= y01 > 0;
                        anyNegative |= y01 < 1;
                    }
                }
                if (!anyPositive || !anyNegative) {
                    throw new IllegalStateException("every sample with positive weight has y = " + (anyPositive ? 1 : 0)
                            + ": the unpenalized intercept runs to " + (anyPositive ? "+" : "-")
                            + "infinity, so no finite optimum exists; include both classes or fit without an intercept");
                }
            } else if (kind == Kind.POISSON) {
                for (int i = 0; i < n; i++) {
                    if (c[i] > 0 && y[i] > 0) {
                        return;
                    }
                }
                throw new IllegalStateException("every count with positive weight is zero: the objective decreases "
                        + "without bound as the unpenalized intercept goes to -infinity, so no finite optimum exists; "
                        + "include non-zero counts, or fit without an intercept and with an L2 penalty (withL2)");
            } else {
                double[] classWeight = new double[blocks];
                for (int i = 0; i < n; i++) {
                    classWeight[(int) y[i]] += c[i];
                }
                for (int k = 0; k < blocks; k++) {
                    if (!(classWeight[k] > 0)) {
                        throw new IllegalStateException("class " + k + " has no sample with positive weight: its "
                                + "unpenalized intercept runs to -infinity, so no finite optimum exists; drop the "
                                + "class (relabel 0..K-2) or fit without intercepts");
                    }
                }
            }
        }

        NewtonSolution run() {
            double[] h = new double[p];
            if (kind == Kind.POISSON && intercept) {
                // Start where the fitted total equals the observed total (McCullagh & Nelder start at μ = y).
                double mean = 0;
                for (int i = 0; i < n; i++) {
                    mean += c[i] * y[i];
                }
                h[d] = Math.log(mean);
            }
            double[] g = new double[p];
            double[] hess = new double[p * p];
            double[] delta = new double[p];
            double[] trial = new double[p];
            double[] normHistory = new double[maxIterations + 1];
            NewtonSystem system = new NewtonSystem();

            double f = evaluate(h, g, hess);
            double fMagnitude = magnitude;
            double scale = Math.max(1.0, norm(g));
            for (int iteration = 0; ; iteration++) {
                normHistory[iteration] = maxAbs(h);
                refuseSeparation(iteration, h);
                double gradientNorm = norm(g);
                if (gradientNorm <= tolerance * scale) {
                    return polish(h, f, fMagnitude, g, hess, gradientNorm, iteration, system, delta, trial);
                }
                if (iteration == maxIterations) {
                    throw notConverged(iteration, gradientNorm, scale, normHistory);
                }
                if (!system.solve(hess, g, delta)) {
                    throw singularHessian(iteration, h);
                }
                double slope = dot(g, delta);

                double t = 1.0;
                boolean accepted = false;
                // Rounding in L itself must not veto a step near the optimum, where L changes by less
                // than its last bits; far from it the decreases dwarf this allowance. The bits are
                // those of the summed term magnitudes, not of |L|, which cancellation can make tiny.
                double allowance = 8 * EPSILON * fMagnitude;
                for (int halving = 0; halving <= MAX_HALVINGS; halving++) {
                    for (int j = 0; j < p; j++) {
                        trial[j] = h[j] + t * delta[j];
                    }
                    double ft = evaluate(trial, null, null);
                    if (ft <= f + ARMIJO * t * slope + allowance) {
                        accepted = true;
                        break;
                    }
                    t *= 0.5;
                }
                if (!accepted) {
                    throw new IllegalStateException("no decrease along the Newton direction at iteration " + iteration
                            + " (gradient norm " + gradientNorm + ", objective " + f + "): the problem is too badly "
                            + "conditioned for double precision; rescale the features or add an L2 penalty (withL2)");
                }
                double change = t * maxAbs(delta);
                System.arraycopy(trial, 0, h, 0, p);
                f = evaluate(h, g, hess);
                fMagnitude = magnitude;
                if (t == 1.0 && change <= 4 * EPSILON * Math.max(1.0, maxAbs(h))) {
                    // A full Newton step that moves h by rounding only: nothing more is attainable.
                    refuseSeparation(iteration + 1, h);
                    return finish(h, f, norm(g), iteration + 1);
                }
            }
        }

        /**
         * Once the tolerance is met, one more full Newton step, kept only if it lowers the gradient
         * norm without raising L beyond rounding: near the optimum the step roughly squares the
         * relative error (quadratic convergence), so the default tolerance still returns h to
         * nearly full precision for one extra iteration.
         */
        private NewtonSolution polish(double[] h, double f, double fMagnitude, double[] g, double[] hess,
                                      double gradientNorm,
                                      int iteration, NewtonSystem system, double[] delta, double[] trial) {
            if (gradientNorm == 0) {
                return finish(h, f, gradientNorm, iteration);
            }
            if (!system.solve(hess, g, delta)) {
                // A small gradient where the curvature vanishes in some direction: an undetermined
                // optimum (dependent features) or one at infinity, not a solution to report.
                throw singularHessian(iteration, h);
            }
            refuseRecession(delta, h, iteration);
            for (int j = 0; j < p; j++) {
                trial[j] = h[j] + delta[j];
            }
            double[] trialGradient = new double[p];
            double ft = evaluate(trial, trialGradient, null);
            double trialNorm = norm(trialGradient);
            if (!separated && ft <= f + 8 * EPSILON * fMagnitude && trialNorm <= gradientNorm) {
                return finish(trial, ft, trialNorm, iteration + 1);
            }
            return finish(h, f, gradientNorm, iteration);
        }

        private IllegalStateException singularHessian(int iteration, double[] h) {
            return new IllegalStateException("the Hessian is not positive definite at iteration " + iteration
                    + " (max |h_j| = " + maxAbs(h) + "): constant or collinear features, or fitted values at the "
                    + "edge of their range (quasi-separation) leave the optimum undetermined; drop dependent "
                    + "features or add an L2 penalty (withL2)");
        }

        private void refuseSeparation(int iteration, double[] h) {
            if (separated) {
                throw new IllegalStateException("the classes are linearly separable: the iterate at iteration "
                        + iteration + " classifies every sample correctly with a positive margin, so the "
                        + kind.label + " objective has no finite optimum without an L2 penalty (scaling that "
                        + "iterate up lowers it towards 0); add one (withL2)");
            }
        }

        /**
         * Quasi-separation lets the gradient vanish only as h runs off to infinity, so the gradient
         * test alone can stop far out on such a ray. There Newton's step points along a recession
         * direction v of L: one with (2y<sub>i</sub> − 1) v·x̃<sub>i</sub> ≥ 0 for every labelled sample
         * and v·x̃<sub>i</sub> = 0 for proportions (logistic), (v<sub>y</sub> − v<sub>k</sub>)·x̃<sub>i</sub> ≥ 0
         * (softmax), v·x̃<sub>i</sub> ≤ 0 with equality for positive counts (Poisson), and some
         * inequality strict. For a design of full column rank such a v exists exactly when no finite
         * optimum does (Albert &amp; Anderson 1984 for the logistic case); the check allows a slack of
         * 1e−6 in the normalized products v·x̃/(‖v‖‖x̃‖). At a genuine optimum the step is negligible, or it breaks some
         * sign condition, since the data admit no such direction. Only for λ = 0: a penalty on the
         * coefficients leaves only intercept rays, refused up front.
         */
        private void refuseRecession(double[] v, double[] h, int iteration) {
            if (l2 > 0) {
                return;
            }
            double vNorm = norm(v);
            if (!(maxAbs(v) > 1e-8 * Math.max(1.0, maxAbs(h)))) {
                return;
            }
            final double slack = 1e-6;
            boolean strict = false;
            for (int i = 0; i < n; i++) {
                if (c[i] == 0) {
                    continue;
                }
                System.arraycopy(x, i * d, xt, 0, d);
                if (intercept) {
                    xt[d] = 1.0;
                }
                double scale = vNorm * norm(xt);
                for (int k = 0; k < blocks; k++) {
                    double s = 0;
                    for (int j = 0; j < stride; j++) {
                        s += xt[j] * v[k * stride + j];
                    }
                    z[k] = s / scale;
                }
                double yi = y[i];
                if (kind == Kind.LOGISTIC) {
                    double y01 = Math.max(yi, 0.0);
                    double margin = y01 == 1.0 ? z[0] : y01 == 0.0 ? -z[0] : -Math.abs(z[0]);
                    if (margin < -slack) {
                        return;
                    }
                    strict |= margin > slack;
                } else if (kind == Kind.POISSON) {
                    double margin = yi == 0 ? -z[0] : -Math.abs(z[0]);
                    if (margin < -slack) {
                        return;
                    }
                    strict |= margin > slack;
                } else {
                    int label = (int) yi;
                    for (int k = 0; k < blocks; k++) {
                        if (k != label) {
                            double margin = z[label] - z[k];
                            if (margin < -slack) {
                                return;
                            }
                            strict |= margin > slack;
                        }
                    }
                }
            }
            if (strict && kind == Kind.POISSON) {
                throw new IllegalStateException("the zero counts are separated from the others: at iteration "
                        + iteration + " (max |h_j| = " + maxAbs(h) + ") the Newton step points along a direction "
                        + "that drives the predictions of some zero-count samples to 0 without changing any "
                        + "other, so the Poisson objective has no finite optimum without an L2 penalty (its "
                        + "gradient vanishes only at infinity); add one (withL2)");
            }
            if (strict) {
                throw new IllegalStateException("the data are quasi-separated: at iteration " + iteration
                        + " (max |h_j| = " + maxAbs(h) + ") the Newton step points along a direction in which no "
                        + "sample's loss increases and some decrease for ever, so the " + kind.label
                        + " objective has no finite optimum without an L2 penalty (its gradient vanishes only at "
                        + "infinity); add one (withL2)");
            }
        }

        private IllegalStateException notConverged(int iteration, double gradientNorm, double scale, double[] norms) {
            double now = norms[iteration];
            double before = norms[iteration / 2];
            if (now > 10 * Math.max(1.0, before)) {
                return new IllegalStateException("the parameters grow without bound (max |h_j| went from " + before
                        + " at iteration " + (iteration / 2) + " to " + now + " at iteration " + iteration
                        + ") while the gradient norm shrinks: the data are (quasi-)separated and the " + kind.label
                        + " objective has no finite optimum without an L2 penalty; add one (withL2)");
            }
            return new IllegalStateException("Newton's method did not converge in " + iteration
                    + " iterations: gradient norm " + gradientNorm + " > tolerance " + tolerance + " x " + scale
                    + "; raise maxIterations or loosen the tolerance");
        }

        /** The Newton system H Δ = −∇L, solved by Cholesky, with its buffers. */
        private final class NewtonSystem {
            private final LinearSolverDense<DMatrixRMaj> cholesky = LinearSolverFactory_DDRM.chol(p);
            private final DMatrixRMaj a = new DMatrixRMaj(p, p);
            private final DMatrixRMaj rhs = new DMatrixRMaj(p, 1);
            private final DMatrixRMaj step = new DMatrixRMaj(p, 1);

            /** @return false if H (plus the shift projector for softmax) is not positive definite */
            boolean solve(double[] hess, double[] g, double[] delta) {
                System.arraycopy(hess, 0, a.data, 0, p * p);
                addShiftProjector(a.data);
                for (int j = 0; j < p; j++) {
                    rhs.data[j] = -g[j];
                }
                if (!cholesky.setA(a)) {
                    return false;
                }
                cholesky.solve(rhs, step);
                System.arraycopy(step.data, 0, delta, 0, p);
                for (double v : delta) {
                    if (!Double.isFinite(v)) {
                        return false;
                    }
                }
                return true;
            }
        }

        /**
         * For softmax, adds c·u uᵀ for each shift direction u along which L is flat: the intercepts
         * always, the coefficients when λ = 0. The gradient is orthogonal to these directions, so the
         * step on the rest is the Newton step and the step along them is zero.
         */
        private void addShiftProjector(double[] a) {
            if (kind != Kind.SOFTMAX) {
                return;
            }
            double trace = 0;
            for (int j = 0; j < p; j++) {
                trace += a[j * p + j];
            }
            double weight = Math.max(trace / p, Double.MIN_NORMAL) / blocks;
            for (int coordinate = 0; coordinate < stride; coordinate++) {
                boolean flat = coordinate == d || l2 == 0;
                if (!flat) {
                    continue;
                }
                for (int k = 0; k < blocks; k++) {
                    for (int l = 0; l < blocks; l++) {
                        a[(k * stride + coordinate) * p + l * stride + coordinate] += weight;
                    }
                }
            }
        }

        /**
         * Returns L(h); writes ∇L into g and the Hessian (row-major p x p) into hess when they are
         * not null, and sets {@link #separated}.
         */
        private double evaluate(double[] h, double[] g, double[] hess) {
            if (g != null) {
                Arrays.fill(g, 0.0);
            }
            if (hess != null) {
                Arrays.fill(hess, 0.0);
            }
            boolean allCorrect = l2 == 0 && (kind == Kind.SOFTMAX || (kind == Kind.LOGISTIC && binaryLabels));
            double sum = 0;
            double size = 0;
            for (int i = 0; i < n; i++) {
                double ci = c[i];
                if (ci == 0) {
                    continue;
                }
                System.arraycopy(x, i * d, xt, 0, d);
                if (intercept) {
                    xt[d] = 1.0;
                }
                for (int k = 0; k < blocks; k++) {
                    double s = 0;
                    int base = k * stride;
                    for (int j = 0; j < stride; j++) {
                        s += xt[j] * h[base + j];
                    }
                    z[k] = s;
                }
                double yi = y[i];
                switch (kind) {
                    case LOGISTIC: {
                        double zi = z[0];
                        double value = ci * logistic.value(zi, yi);
                        sum += value;
                        size += value;
                        double y01 = Math.max(yi, 0.0);
                        if (allCorrect && !(y01 == 1.0 ? zi > 0 : zi < 0)) {
                            allCorrect = false;
                        }
                        if (g != null) {
                            double sigma = LogisticLoss.sigmoid(zi);
                            addScaled(ci * (sigma - y01), g, 0);
                            if (hess != null) {
                                addOuter(hess, 0, 0, ci * sigma * (1.0 - sigma));
                            }
                        }
                        break;
                    }
                    case POISSON: {
                        double zi = z[0];
                        double mu = Math.exp(zi);
                        sum += ci * (mu - yi * zi);
                        size += ci * (mu + Math.abs(yi * zi));
                        if (g != null) {
                            addScaled(ci * (mu - yi), g, 0);
                            if (hess != null) {
                                addOuter(hess, 0, 0, ci * mu);
                            }
                        }
                        break;
                    }
                    case SOFTMAX: {
                        int label = (int) yi;
                        // Subtracting the largest z keeps every exponential in (0, 1].
                        double max = z[0];
                        for (int k = 1; k < blocks; k++) {
                            max = Math.max(max, z[k]);
                        }
                        double total = 0;
                        for (int k = 0; k < blocks; k++) {
                            prob[k] = Math.exp(z[k] - max);
                            total += prob[k];
                        }
                        sum += ci * (max + Math.log(total) - z[label]);
                        size += ci * (Math.abs(max) + Math.log(total) + Math.abs(z[label]));
                        if (allCorrect) {
                            for (int k = 0; k < blocks; k++) {
                                if (k != label && !(z[label] > z[k])) {
                                    allCorrect = false;
                                    break;
                                }
                            }
                        }
                        if (g != null) {
                            for (int k = 0; k < blocks; k++) {
                                prob[k] /= total;
                            }
                            for (int k = 0; k < blocks; k++) {
                                addScaled(ci * (prob[k] - (k == label ? 1.0 : 0.0)), g, k * stride);
                            }
                            if (hess != null) {
                                for (int k = 0; k < blocks; k++) {
                                    for (int l = 0; l < blocks; l++) {
                                        double curvature = (k == l ? prob[k] : 0.0) - prob[k] * prob[l];
                                        addOuter(hess, k * stride, l * stride, ci * curvature);
                                    }
                                }
                            }
                        }
                        break;
                    }
                    default:
                        throw new AssertionError(kind);
                }
            }
            separated = allCorrect;
            magnitude = size;
            if (l2 > 0) {
                for (int k = 0; k < blocks; k++) {
                    int base = k * stride;
                    for (int j = 0; j < d; j++) {
                        double v = h[base + j];
                        sum += 0.5 * l2 * v * v;
                        magnitude += 0.5 * l2 * v * v;
                        if (g != null) {
                            g[base + j] += l2 * v;
                        }
                        if (hess != null) {
                            hess[(base + j) * p + base + j] += l2;
                        }
                    }
                }
            }
            return sum;
        }

        /** g[offset + j] += a · x̃<sub>j</sub>. */
        private void addScaled(double a, double[] g, int offset) {
            for (int j = 0; j < stride; j++) {
                g[offset + j] += a * xt[j];
            }
        }

        /** hess[rowOffset + u, columnOffset + v] += a · x̃<sub>u</sub> x̃<sub>v</sub>. */
        private void addOuter(double[] hess, int rowOffset, int columnOffset, double a) {
            if (a == 0) {
                return;
            }
            for (int u = 0; u < stride; u++) {
                double au = a * xt[u];
                int row = (rowOffset + u) * p + columnOffset;
                for (int v = 0; v < stride; v++) {
                    hess[row + v] += au * xt[v];
                }
            }
        }

        private NewtonSolution finish(double[] h, double f, double gradientNorm, int iterations) {
            double[][] covariance = null;
            String noCovariance = null;
            if (kind == Kind.SOFTMAX) {
                noCovariance = "the softmax parametrization is redundant (shifting every block changes nothing), so "
                        + "its information matrix is singular; fix one class's block to zero to get one";
            } else if (l2 > 0) {
                noCovariance = "a penalized fit (l2 = " + l2 + ") has no classical covariance; solve with l2 = 0 for it";
            } else {
                covariance = inverseFisherInformation(h);
                if (covariance == null) {
                    noCovariance = "the information matrix is singular at the solution";
                }
            }
            return new NewtonSolution(kind.label, h.clone(), blocks, d, intercept, l2, iterations, gradientNorm, f,
                    covariance, noCovariance);
        }

        /** (Σ w<sub>i</sub> v<sub>i</sub> x̃<sub>i</sub>x̃<sub>i</sub><sup>T</sup>)<sup>−1</sup>, v = p(1 − p) or μ, raw weights as counts. */
        private double[][] inverseFisherInformation(double[] h) {
            double[] info = new double[p * p];
            for (int i = 0; i < n; i++) {
                if (rawWeight[i] == 0) {
                    continue;
                }
                System.arraycopy(x, i * d, xt, 0, d);
                if (intercept) {
                    xt[d] = 1.0;
                }
                double zi = 0;
                for (int j = 0; j < stride; j++) {
                    zi += xt[j] * h[j];
                }
                double variance;
                if (kind == Kind.LOGISTIC) {
                    double sigma = LogisticLoss.sigmoid(zi);
                    variance = sigma * (1.0 - sigma);
                } else {
                    variance = Math.exp(zi);
                }
                addOuter(info, 0, 0, rawWeight[i] * variance);
            }
            LinearSolverDense<DMatrixRMaj> cholesky = LinearSolverFactory_DDRM.chol(p);
            if (!cholesky.setA(DMatrixRMaj.wrap(p, p, info))) {
                return null;
            }
            DMatrixRMaj inverse = new DMatrixRMaj(p, p);
            cholesky.invert(inverse);
            double[][] out = new double[p][p];
            for (int r = 0; r < p; r++) {
                for (int s = 0; s < p; s++) {
                    // Symmetrize: the two triangles differ by rounding only.
                    out[r][s] = 0.5 * (inverse.get(r, s) + inverse.get(s, r));
                }
            }
            return out;
        }
    }

    private static double norm(double[] v) {
        double s = 0;
        for (double e : v) {
            s += e * e;
        }
        return Math.sqrt(s);
    }

    private static double maxAbs(double[] v) {
        double m = 0;
        for (double e : v) {
            m = Math.max(m, Math.abs(e));
        }
        return m;
    }

    private static double dot(double[] a, double[] b) {
        double s = 0;
        for (int j = 0; j < a.length; j++) {
            s += a[j] * b[j];
        }
        return s;
    }
}
