package dev.riskmin.diagnostics;

import dev.riskmin.Fit;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.estimator.OscillationMonitor;
import dev.riskmin.diagnostics.sink.Slf4jReporter;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.diagnostics.verdict.RunSummary;
import dev.riskmin.diagnostics.verdict.VerdictRules;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.util.ArrayList;
import java.util.EnumMap;
import java.util.List;
import java.util.Map;

/**
 * Diagnostics for one fit: a {@link FitListener} that hosts {@link Monitor}s (estimators and
 * stopping tests), shares their costly measurements, publishes their {@link DiagnosticEvent}s to
 * subscribers, and forms a {@link HealthVerdict} when the fit ends (or on demand).
 *
 * <p>Isolation: a monitor or subscriber that throws is detached for the rest of the fit and
 * reported once at WARN through SLF4J; the fit goes on. One instance serves one fit at a time
 * (it holds the run's state); build a new one per fit.
 */
public final class Diagnostics implements FitListener {
    private static final Logger LOG = LoggerFactory.getLogger(Diagnostics.class);

    private final List<Monitor> monitors;
    private final boolean[] monitorDetached;
    private final List<Subscriber> subscribers;
    private final int fullGradientLimit;
    private final int referenceBatch;
    private final Context context = new Context();
    private final List<String> failures = new ArrayList<>();
    private RunSummary summary = new RunSummary();
    private RunInfo run;
    private HealthVerdict verdict;
    private long draws;

    private Diagnostics(Builder b) {
        this.monitors = List.copyOf(b.monitors);
        this.monitorDetached = new boolean[monitors.size()];
        this.subscribers = new ArrayList<>();
        this.fullGradientLimit = b.fullGradientLimit;
        this.referenceBatch = b.referenceBatch;
    }

    public static Builder builder() {
        return new Builder();
    }

    /**
     * The one-call set-up: the noise, angle, loss and oscillation monitors at their default
     * cadences (together a few per cent of the fit's gradient evaluations), reported through SLF4J
     * (logger {@code dev.riskmin.diagnostics}, INFO; noise, loss, stopping and verdict events, every
     * 10th noise and loss event). Add stopping tests with {@link Builder#monitor}; they are not on by
     * default because they steer or stop the fit.
     */
    public static Builder standard() {
        return builder()
                .monitor(NoiseMonitor.defaults())
                .monitor(AngleMonitor.defaults())
                .monitor(LossMonitor.defaults())
                .monitor(OscillationMonitor.defaults())
                .subscribe(Slf4jReporter.defaults(), EventFilter.of(EventKind.STOPPING, EventKind.VERDICT))
                .subscribe(Slf4jReporter.defaults(), EventFilter.of(EventKind.NOISE, EventKind.LOSS).every(10));
    }

    /** @return the facts of the current (or last) run, or null before a fit started */
    public RunInfo run() {
        return run;
    }

    /** @return the summary of the run so far (live: updated as the fit goes on) */
    public RunSummary summary() {
        refreshEpochs();
        return summary;
    }

    /** @return the verdict on the run so far (the final one after the fit ends) */
    public HealthVerdict verdict() {
        if (verdict != null) {
            return verdict;
        }
        refreshEpochs();
        return VerdictRules.judge(summary);
    }

    private void refreshEpochs() {
        if (run != null && run.sampleCount() > 0) {
            summary.epochs = (double) draws / run.sampleCount();
        }
    }

    /** @return one line per monitor or subscriber that threw and was detached */
    public List<String> failures() {
        return List.copyOf(failures);
    }

    @Override
    public void started(RunInfo info) {
        this.run = info;
        this.summary = new RunSummary();
        this.verdict = null;
        this.draws = 0;
        summary.sampleCount = info.sampleCount();
        summary.batchSize = info.batchSize();
        summary.independentDraws = info.withReplacement();
        summary.varianceReduced = info.varianceReduced();
        summary.largestSmoothness = info.largestSmoothness();
        context.reset(info.dimension());
        for (int m = 0; m < monitors.size(); m++) {
            try {
                monitors.get(m).started(info, context);
            } catch (RuntimeException | AssertionError e) {
                detachMonitor(m, "started", e);
            }
        }
    }

    @Override
    public void step(StepView view, FitControl control) {
        context.at(view, control);
        summary.steps = view.step();
        draws = view.draws(); // epochs = draws / n is formed when read, not at every step
        summary.stepSize = view.stepSize();
        summary.batchSize = view.batchLength();
        for (int m = 0; m < monitors.size(); m++) {
            if (!monitorDetached[m]) {
                try {
                    monitors.get(m).step(context);
                } catch (RuntimeException | AssertionError e) {
                    detachMonitor(m, "step", e);
                }
            }
        }
    }

    @Override
    public void epochEnded(StepView view, FitControl control) {
        context.at(view, control);
        context.invalidate(); // the parameters moved since this step's measurements
        summary.steps = view.step() + 1;
        summary.epochs = (double) view.draws() / view.sampleCount();
        for (int m = 0; m < monitors.size(); m++) {
            if (!monitorDetached[m]) {
                try {
                    monitors.get(m).epochEnded(context);
                } catch (RuntimeException | AssertionError e) {
                    detachMonitor(m, "epochEnded", e);
                }
            }
        }
    }

    @Override
    public void finished(Fit fit) {
        summary.stopReason = fit.stopReason();
        summary.stopDetail = fit.stopDetail();
        summary.steps = fit.steps();
        summary.epochs = fit.epochs();
        summary.batchSize = fit.finalBatchSize();
        if (Double.isNaN(summary.initialObjective)) {
            summary.initialObjective = fit.initialObjective();
        }
        if (Double.isNaN(summary.latestObjective)) {
            summary.latestObjective = fit.finalObjective();
        }
        context.view = null;
        for (int m = 0; m < monitors.size(); m++) {
            if (!monitorDetached[m]) {
                try {
                    monitors.get(m).finished(fit, context);
                } catch (RuntimeException | AssertionError e) {
                    detachMonitor(m, "finished", e);
                }
            }
        }
        verdict = VerdictRules.judge(summary);
        context.publish(new VerdictEvent(fit.steps(), (int) fit.epochs(), verdict));
    }

    private void detachMonitor(int m, String where, Throwable e) {
        monitorDetached[m] = true;
        String line = "monitor " + monitors.get(m).name() + " threw in " + where + "(): " + e;
        failures.add(line);
        LOG.warn("diagnostics: {} (detached for the rest of the fit)", line, e);
    }

    /** A subscriber with its filter and per-kind counters. */
    private final class Subscriber {
        final EventListener listener;
        final EventFilter filter;
        final Map<EventKind, Long> seen = new EnumMap<>(EventKind.class);
        boolean detached;

        Subscriber(EventListener listener, EventFilter filter) {
            this.listener = listener;
            this.filter = filter;
        }

        void offer(DiagnosticEvent event) {
            if (detached || !filter.accepts(event.kind())) {
                return;
            }
            long count = seen.merge(event.kind(), 1L, Long::sum);
            if (event.kind() != EventKind.VERDICT && (count - 1) % filter.cadence() != 0) {
                return;
            }
            try {
                listener.onEvent(event);
            } catch (RuntimeException | AssertionError e) {
                detached = true;
                String line = "subscriber " + listener.getClass().getName() + " threw on " + event.kind() + ": " + e;
                failures.add(line);
                LOG.warn("diagnostics: {} (detached for the rest of the fit)", line, e);
            }
        }
    }

    /** The shared, per-step cached measurements. */
    private final class Context implements StepContext {
        StepView view;
        FitControl control;
        double[] reference = new double[0];
        double referenceObjective = Double.NaN;
        boolean referenceExact;
        long referenceStamp = -1;
        double[] samples = new double[0];
        double[] row = new double[0];
        int sampleRows;
        long samplesStamp = -1;
        double heldOut = Double.NaN;
        long heldOutStamp = -1;
        long stamp;

        void reset(int p) {
            reference = new double[p];
            row = new double[p];
            referenceStamp = -1;
            samplesStamp = -1;
            heldOutStamp = -1;
            stamp = 0;
        }

        void at(StepView v, FitControl c) {
            this.view = v;
            this.control = c;
            this.stamp++;
        }

        void invalidate() {
            stamp++;
        }

        @Override
        public StepView view() {
            if (view == null) {
                throw new IllegalStateException("the fit has ended: no step view");
            }
            return view;
        }

        @Override
        public FitControl control() {
            if (control == null) {
                throw new IllegalStateException("no fit control outside a step");
            }
            return control;
        }

        @Override
        public RunInfo run() {
            return run;
        }

        @Override
        public RunSummary summary() {
            return summary;
        }

        @Override
        public void publish(DiagnosticEvent event) {
            for (Subscriber s : subscribers) {
                s.offer(event);
            }
        }

        @Override
        public double[] referenceGradient() {
            if (referenceStamp != stamp) {
                StepView v = view();
                if (v.sampleCount() <= fullGradientLimit) {
                    referenceObjective = v.probe().fullGradient(reference);
                    referenceExact = true;
                } else {
                    v.probe().independentBatchGradient(referenceBatch, reference);
                    referenceObjective = Double.NaN;
                    referenceExact = false;
                }
                referenceStamp = stamp;
            }
            return reference;
        }

        @Override
        public boolean referenceIsExact() {
            referenceGradient();
            return referenceExact;
        }

        @Override
        public double referenceObjective() {
            referenceGradient();
            return referenceObjective;
        }

        @Override
        public double[] sampleGradients() {
            if (samplesStamp != stamp) {
                StepView v = view();
                int b = v.batchLength();
                int p = v.dimension();
                if (samples.length < b * p) {
                    samples = new double[b * p];
                }
                for (int k = 0; k < b; k++) {
                    v.probe().sampleGradient(k, row);
                    System.arraycopy(row, 0, samples, k * p, p);
                }
                sampleRows = b;
                samplesStamp = stamp;
            }
            return samples;
        }

        @Override
        public int sampleGradientCount() {
            sampleGradients();
            return sampleRows;
        }

        @Override
        public double heldOutLoss() {
            StepView v = view();
            if (!v.probe().hasHeldOut()) {
                return Double.NaN;
            }
            if (heldOutStamp != stamp) {
                heldOut = v.probe().heldOutLoss();
                heldOutStamp = stamp;
            }
            return heldOut;
        }
    }

    /** Collects monitors and subscribers; {@link #build()} returns a new {@link Diagnostics}. */
    public static final class Builder {
        private final List<Monitor> monitors = new ArrayList<>();
        private final List<Object[]> pending = new ArrayList<>();
        private int fullGradientLimit = 200_000;
        private int referenceBatch = 4096;

        private Builder() {
        }

        /** Adds an estimator or a stopping test. */
        public Builder monitor(Monitor monitor) {
            monitors.add(Arguments.notNull("monitor", monitor));
            return this;
        }

        /** Subscribes to every event. */
        public Builder subscribe(EventListener listener) {
            return subscribe(listener, EventFilter.all());
        }

        /** Subscribes to the events the filter accepts. */
        public Builder subscribe(EventListener listener, EventFilter filter) {
            pending.add(new Object[] {Arguments.notNull("listener", listener), Arguments.notNull("filter", filter)});
            return this;
        }

        /**
         * Up to this n the reference gradient G is the exact full gradient (n evaluations per use);
         * above it, an independent batch of {@link #referenceBatch(int)} samples. Default 200,000.
         */
        public Builder fullGradientLimit(int n) {
            this.fullGradientLimit = Arguments.nonNegative("fullGradientLimit", n);
            return this;
        }

        /** The size of the independent batch that stands in for G when n is large (default 4,096). */
        public Builder referenceBatch(int size) {
            this.referenceBatch = Arguments.positive("referenceBatch", size);
            return this;
        }

        public Diagnostics build() {
            Diagnostics d = new Diagnostics(this);
            for (Object[] p : pending) {
                d.subscribers.add(d.new Subscriber((EventListener) p[0], (EventFilter) p[1]));
            }
            return d;
        }
    }
}
