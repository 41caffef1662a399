package dev.riskmin.loss;

/**
 * Softmax cross-entropy (multinomial logistic) loss of K decision values and a class y:
 * ℓ(z, y) = log Σ<sub>k</sub> e<sup>z<sub>k</sub></sup> − z<sub>y</sub>, the negative log of
 * p<sub>y</sub> with p = softmax(z), p<sub>k</sub> = e<sup>z<sub>k</sub></sup>/Σ<sub>j</sub> e<sup>z<sub>j</sub></sup>.
 * For K = 2 it is the logistic loss of z<sub>1</sub> − z<sub>0</sub>.
 *
 * <ul>
 *   <li>gradient: ∂ℓ/∂z<sub>k</sub> = p<sub>k</sub> − 1[k = y];</li>
 *   <li>Hessian: diag(p) − p pᵀ ⪯ ½(I − 11ᵀ/K), so the smoothness constant is 1/2 (attained for
 *       K = 2 at z<sub>0</sub> = z<sub>1</sub>);</li>
 *   <li>convex: yes; invariant under adding the same constant to every z<sub>k</sub>.</li>
 * </ul>
 *
 * <p>Sources: McCullagh &amp; Nelder, <i>Generalized Linear Models</i>, 2nd ed., 1989 (multinomial
 * response); the Hessian bound is D. Böhning, "Multinomial logistic regression algorithm",
 * Ann. Inst. Statist. Math. 44(1), 197–200, 1992 (from memory); METHODS §11.
 *
 * @implNote Log-sum-exp with the maximum m = max<sub>k</sub> z<sub>k</sub> factored out:
 * ℓ = (m − z<sub>y</sub>) + log Σ<sub>k</sub> e<sup>z<sub>k</sub> − m</sup>. The sum lies in [1, K], so the
 * value is finite whenever m − z<sub>y</sub> is, and never NaN. The gradient entry of the true class is
 * formed as −Σ<sub>k≠y</sub> p<sub>k</sub> (summed apart from the true class) rather than
 * p<sub>y</sub> − 1, which keeps its relative accuracy when p<sub>y</sub> is close to 1.
 */
public final class SoftmaxCrossEntropyLoss implements MulticlassLoss {
    static final SoftmaxCrossEntropyLoss INSTANCE = new SoftmaxCrossEntropyLoss();

    private SoftmaxCrossEntropyLoss() {
    }

    /**
     * @throws IllegalArgumentException naming y and K if y is outside [0, K)
     */
    @Override
    public double value(double[] z, int offset, int classes, int y) {
        MulticlassLabels.require(y, classes);
        int end = offset + classes;
        double m = Double.NEGATIVE_INFINITY;
        for (int k = offset; k < end; k++) {
            m = Math.max(m, z[k]);
        }
        double sum = 0;
        for (int k = offset; k < end; k++) {
            sum += Math.exp(z[k] - m);
        }
        return (m - z[offset + y]) + Math.log(sum);
    }

    /**
     * {@inheritDoc}
     *
     * <p>The range {@code gradient[gOffset .. gOffset+K)} must not overlap {@code z[offset .. offset+K)}:
     * it is used as scratch space before the final values are written.
     *
     * @throws IllegalArgumentException naming y and K if y is outside [0, K)
     */
    @Override
    public double gradient(double[] z, int offset, int classes, int y, double[] gradient, int gOffset) {
        MulticlassLabels.require(y, classes);
        double m = Double.NEGATIVE_INFINITY;
        for (int k = 0; k < classes; k++) {
            m = Math.max(m, z[offset + k]);
        }
        double sum = 0;
        double others = 0;
        for (int k = 0; k < classes; k++) {
            double e = Math.exp(z[offset + k] - m);
            gradient[gOffset + k] = e;
            sum += e;
            if (k != y) {
                others += e;
            }
        }
        double inv = 1.0 / sum;
        for (int k = 0; k < classes; k++) {
            gradient[gOffset + k] *= inv;
        }
        gradient[gOffset + y] = -others * inv;
        return (m - z[offset + y]) + Math.log(sum);
    }

    @Override
    public double smoothness() {
        return 0.5;
    }

    @Override
    public boolean convex() {
        return true;
    }

    @Override
    public Response response() {
        return Response.SOFTMAX;
    }

    @Override
    public String name() {
        return "softmax-cross-entropy";
    }

    @Override
    public String toString() {
        return name();
    }
}
