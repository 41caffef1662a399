package dev.riskmin;

import dev.riskmin.data.Dataset;
import dev.riskmin.hook.FitListener;

import java.util.ArrayList;
import java.util.List;

/**
 * What one call of {@link Minimizer#fit} adds to the shared configuration: listeners, a
 * cancellation token and starting parameters. Immutable; build with {@link #builder()}.
 */
public final class FitOptions {
    private static final FitOptions NONE = new FitOptions(List.of(), null, null, null);

    private final List<FitListener> listeners;
    private final CancellationToken cancellation;
    private final double[] initialParameters;
    private final Dataset heldOut;

    private FitOptions(List<FitListener> listeners, CancellationToken cancellation, double[] initialParameters,
                       Dataset heldOut) {
        this.listeners = listeners;
        this.cancellation = cancellation;
        this.initialParameters = initialParameters;
        this.heldOut = heldOut;
    }

    /** No listeners, no token, start from zero. */
    public static FitOptions none() {
        return NONE;
    }

    /** Shorthand for options holding only these listeners. */
    public static FitOptions listeners(FitListener... listeners) {
        Builder b = builder();
        for (FitListener l : listeners) {
            b.listener(l);
        }
        return b.build();
    }

    public static Builder builder() {
        return new Builder();
    }

    public List<FitListener> listenerList() {
        return listeners;
    }

    /** @return the token, or null */
    public CancellationToken cancellation() {
        return cancellation;
    }

    /** @return a copy of the starting parameters, or null for zeros */
    public double[] initialParameters() {
        return initialParameters == null ? null : initialParameters.clone();
    }

    /** @return the held-out data, or null */
    public Dataset heldOut() {
        return heldOut;
    }

    /** Collects options; {@link #build()} returns a new immutable object. */
    public static final class Builder {
        private final List<FitListener> listeners = new ArrayList<>();
        private CancellationToken cancellation;
        private double[] initialParameters;
        private Dataset heldOut;

        private Builder() {
        }

        public Builder listener(FitListener listener) {
            if (listener == null) {
                throw new NullPointerException("listener must not be null");
            }
            listeners.add(listener);
            return this;
        }

        public Builder cancellation(CancellationToken token) {
            if (token == null) {
                throw new NullPointerException("cancellation token must not be null");
            }
            this.cancellation = token;
            return this;
        }

        /**
         * Starting parameters in the layout of the fitted problem (for a linear model
         * (w<sub>0</sub>, …, w<sub>d−1</sub>, b), on the original feature scale), copied.
         *
         * @throws IllegalArgumentException naming the index of a non-finite entry
         */
        public Builder initialParameters(double[] h0) {
            for (int j = 0; j < h0.length; j++) {
                if (!Double.isFinite(h0[j])) {
                    throw new IllegalArgumentException("initialParameters[" + j + "] is " + h0[j]);
                }
            }
            this.initialParameters = h0.clone();
            return this;
        }

        /**
         * Data kept out of the fit, on which listeners may measure the loss through
         * {@link dev.riskmin.hook.Probe#heldOutLoss()} (standardized like the training data when the
         * minimizer standardizes). Ignored by fits of a general objective.
         */
        public Builder heldOut(Dataset data) {
            if (data == null) {
                throw new NullPointerException("held-out data must not be null");
            }
            this.heldOut = data;
            return this;
        }

        public FitOptions build() {
            return new FitOptions(List.copyOf(listeners), cancellation, initialParameters, heldOut);
        }
    }
}
