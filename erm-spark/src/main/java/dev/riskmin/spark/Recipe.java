package dev.riskmin.spark;

import java.io.Serializable;

/**
 * How to make a component of a fit — a loss, a penalty, a schedule, a sampling, an update rule — on
 * whichever machine needs it. The core's components are plain immutable objects, not
 * {@link Serializable}; a distributed fit therefore ships the recipe and each executor makes its own
 * instance. A method reference to a factory or a lambda that captures only numbers is a recipe:
 * {@code Losses::logistic}, {@code () -> Penalty.l2(1e-3)}.
 *
 * <p>{@link #make()} must return an equivalent component every time it is called, on every machine:
 * the driver and each executor call it independently, and a fit is reproducible only if they agree.
 *
 * @param <T> the component's type
 */
@FunctionalInterface
public interface Recipe<T> extends Serializable {

    /** @return a new (or shared immutable) instance of the component; never null */
    T make();
}
