package dev.riskmin.method;

import dev.riskmin.objective.Objective;

/**
 * An update rule: an immutable, thread-safe configuration that starts one {@link Updater} per fit.
 * Built by the static factories below; each factory's class documents the update equations and
 * their source.
 */
public interface UpdateRule {

    /**
     * @param objective the fit's objective (the updater may evaluate it, e.g. full gradients for SVRG)
     * @param h0        read only: the starting parameters
     * @param stepsPerEpoch ⌈n / B⌉, the number of steps in one pass over the data
     * @throws IllegalArgumentException if the rule cannot run on this objective, naming why
     */
    Updater start(Objective objective, double[] h0, int stepsPerEpoch);

    /** @return a short name for reports */
    String name();

    /**
     * @return whether the rule corrects each step with control variates so that its variance vanishes
     * at the optimum (SVRG, SAGA): then gradient noise sets no floor on the accuracy
     */
    default boolean varianceReduced() {
        return false;
    }

    /** @return a default constant step size for this rule on an objective whose gradients are L-Lipschitz */
    default double defaultStepSize(double lipschitz) {
        return 1.0 / lipschitz;
    }

    /** Plain (proximal) SGD: h ← prox<sub>εR</sub>(h − ε g<sub>B</sub>) (Robbins &amp; Monro 1951). */
    static UpdateRule sgd() {
        return PlainSgd.INSTANCE;
    }

    /** Heavy-ball momentum μ ∈ [0, 1): v ← μv − ε g<sub>B</sub>, h ← h + v (Polyak 1964). */
    static UpdateRule heavyBall(double momentum) {
        return new Momentum(momentum, false);
    }

    /** Nesterov momentum μ ∈ [0, 1): g<sub>B</sub> at h + μv, then v ← μv − ε g<sub>B</sub>, h ← h + v (Nesterov 1983). */
    static UpdateRule nesterov(double momentum) {
        return new Momentum(momentum, true);
    }

    /** AdaGrad with δ = 1e-8 (Duchi, Hazan &amp; Singer 2011). */
    static UpdateRule adaGrad() {
        return new AdaGrad(1e-8);
    }

    /** AdaGrad: s ← s + g², h ← h − ε g/(√s + δ). */
    static UpdateRule adaGrad(double delta) {
        return new AdaGrad(delta);
    }

    /** Adam with β<sub>1</sub> = 0.9, β<sub>2</sub> = 0.999, δ = 1e-8 (Kingma &amp; Ba 2015, defaults from memory), no decay. */
    static UpdateRule adam() {
        return new Adam(0.9, 0.999, 1e-8, 0.0);
    }

    /** Adam with decoupled decay λ (Loshchilov &amp; Hutter 2019). */
    static UpdateRule adam(double beta1, double beta2, double delta, double decoupledDecay) {
        return new Adam(beta1, beta2, delta, decoupledDecay);
    }

    /** SVRG with a snapshot every epoch (Johnson &amp; Zhang 2013). */
    static UpdateRule svrg() {
        return new Svrg(1.0);
    }

    /** SVRG with a snapshot every {@code epochsPerSnapshot} epochs (of ⌈n/B⌉ steps). */
    static UpdateRule svrg(double epochsPerSnapshot) {
        return new Svrg(epochsPerSnapshot);
    }

    /** SAGA (Defazio, Bach &amp; Lacoste-Julien 2014). */
    static UpdateRule saga() {
        return Saga.INSTANCE;
    }
}
