package dev.riskmin.spark;

import dev.riskmin.hook.FitListener;

/**
 * A {@link FitListener} that also receives, after every round of a distributed fit, the figures only a
 * distributed fit has ({@link RoundReport}): how the partitions' gradients and local models spread, and
 * what the round cost. Pass it with the other listeners in {@link dev.riskmin.FitOptions}; an in-memory
 * fit treats it as a plain listener. Runs on the driver, never serialized.
 */
public interface RoundListener extends FitListener {

    /** Called once per round, after the round's move was taken (or refused by a halt). */
    default void roundEnded(RoundReport report) {
    }
}
