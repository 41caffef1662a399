package dev.riskmin.hook;

import dev.riskmin.StopReason;

/**
 * A listener's answers to the fit. Requests take effect from the current step on (a halt stops
 * before the parameters move); none allocates.
 */
public interface FitControl {

    /**
     * Stops the fit after this listener call. The first halt of a step wins.
     *
     * @param detail a human-readable reason with its figures (e.g. "gradient norm 3.1e-7 < 1e-6")
     * @return whether this halt is the one the fit will stop with (false if another came first)
     */
    boolean halt(StopReason reason, String detail);

    /**
     * Multiplies every later step size by {@code factor} (cumulative: two halvings make a quarter).
     *
     * <p>A later step whose size the factors carry beyond the double range stops the fit with
     * {@link StopReason#DIVERGED}.
     *
     * @throws IllegalArgumentException if factor is not finite and &gt; 0, or would carry the current
     *                                  step's size beyond the double range
     */
    void scaleStepSize(double factor);

    /**
     * Asks for batches of {@code size} from the next step on (clamped to n for sampling without
     * replacement).
     *
     * @throws IllegalArgumentException if size &lt; 1, or if the batch's buffers could never fit this
     *                                  JVM's heap (naming the size)
     */
    void requestBatchSize(int size);

    /**
     * Makes the fit return these parameters (copied now) instead of its own when it ends — for
     * example the best parameters on held-out data, together with a {@link #halt}. They are in the
     * layout and scale of {@link StepView#copyParameters}, must be finite, and replace averaging.
     *
     * @throws IllegalArgumentException if the length is not p or an entry is not finite
     */
    void restoreParameters(double[] parameters);

    /** @return the product of all step-size factors asked for so far */
    double stepSizeFactor();
}
