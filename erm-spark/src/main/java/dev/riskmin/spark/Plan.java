package dev.riskmin.spark;

import dev.riskmin.loss.Loss;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.step.StepSchedule;

import java.io.Serializable;

/**
 * What an executor needs to know of a fit's configuration: the recipes of its components and the
 * settings that are plain values. Serialized into every task; {@link #parts()} makes the components.
 */
final class Plan implements Serializable {
    private static final long serialVersionUID = 1L;

    final Recipe<Loss> loss;
    final Recipe<Penalty> penalty;
    final Recipe<UpdateRule> rule;
    final Recipe<StepSchedule> schedule;
    final Recipe<Sampling> sampling;
    final boolean intercept;
    final long seed;
    final double explosionFactor;

    Plan(Recipe<Loss> loss, Recipe<Penalty> penalty, Recipe<UpdateRule> rule, Recipe<StepSchedule> schedule,
         Recipe<Sampling> sampling, boolean intercept, long seed, double explosionFactor) {
        this.loss = loss;
        this.penalty = penalty;
        this.rule = rule;
        this.schedule = schedule;
        this.sampling = sampling;
        this.intercept = intercept;
        this.seed = seed;
        this.explosionFactor = explosionFactor;
    }

    /** @return this plan with another schedule recipe */
    Plan withSchedule(Recipe<StepSchedule> value) {
        return new Plan(loss, penalty, rule, value, sampling, intercept, seed, explosionFactor);
    }

    /** @return the components, made from the recipes on the calling machine */
    Parts parts() {
        return new Parts(made("loss", loss), made("penalty", penalty), made("updateRule", rule),
                schedule == null ? null : made("schedule", schedule), made("sampling", sampling));
    }

    private static <T> T made(String option, Recipe<T> recipe) {
        T value = recipe.make();
        if (value == null) {
            throw new IllegalStateException("the " + option + " recipe made null");
        }
        return value;
    }

    /** The components of a fit, made on one machine. */
    record Parts(Loss loss, Penalty penalty, UpdateRule rule, StepSchedule schedule, Sampling sampling) {
    }
}
