package dev.riskmin.diagnostics.metrics;

import dev.riskmin.Fit;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventListener;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;
import io.micrometer.core.instrument.Counter;
import io.micrometer.core.instrument.FunctionCounter;
import io.micrometer.core.instrument.Gauge;
import io.micrometer.core.instrument.Meter;
import io.micrometer.core.instrument.MeterRegistry;
import io.micrometer.core.instrument.Tag;
import io.micrometer.core.instrument.Tags;

import java.util.ArrayList;
import java.util.Collections;
import java.util.IdentityHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicLongArray;

/**
 * Publishes a fit's diagnostics as Micrometer meters under this library's own names, for services
 * that already export metrics. It is an {@link EventListener} (subscribe it to a
 * {@link dev.riskmin.diagnostics.Diagnostics}) and a {@link FitListener} (add it to the fit's
 * options for the step, epoch and fit counters); either role works alone.
 *
 * <pre>{@code
 * MeterBridge bridge = MeterBridge.register(registry, "model", "churn");    // once per model
 * Diagnostics diagnostics = Diagnostics.standard().subscribe(bridge).build(); // once per fit
 * Fit fit = minimizer.fit(data, FitOptions.listeners(bridge, diagnostics));
 * }</pre>
 *
 * <p><b>Meters.</b> Every meter carries the caller's tags. A gauge reads the latest <em>measured</em>
 * value of its figure: an event field that is NaN (not measured at that event) leaves the gauge as it
 * was, and a gauge reads NaN until its figure is first measured. The figures are those of the events
 * (see {@link NoiseEvent}, {@link AngleEvent}, {@link LossEvent}, {@link StoppingEvent},
 * {@link VerdictEvent} for their formulas and sources); this class computes nothing of its own.
 * <table>
 *   <caption>Meters</caption>
 *   <tr><th>name</th><th>type</th><th>extra tags</th><th>value</th></tr>
 *   <tr><td>riskmin.fits.started</td><td>counter</td><td></td><td>fits started</td></tr>
 *   <tr><td>riskmin.fits.finished</td><td>counter</td><td>reason</td><td>fits finished, by stop reason
 *       (lower case, e.g. {@code diverged}; every reason registered at 0)</td></tr>
 *   <tr><td>riskmin.fit.steps</td><td>counter</td><td></td><td>steps taken (unit steps)</td></tr>
 *   <tr><td>riskmin.fit.epochs</td><td>counter</td><td></td><td>passes of n draws completed (unit epochs)</td></tr>
 *   <tr><td>riskmin.fit.step.size</td><td>gauge</td><td></td><td>ε<sub>t</sub></td></tr>
 *   <tr><td>riskmin.fit.batch.size</td><td>gauge</td><td></td><td>B (unit samples)</td></tr>
 *   <tr><td>riskmin.fit.batch.loss</td><td>gauge</td><td></td><td>the batch's mean loss at h<sub>t</sub></td></tr>
 *   <tr><td>riskmin.fit.batch.loss.smoothed</td><td>gauge</td><td></td><td>its moving average</td></tr>
 *   <tr><td>riskmin.fit.objective</td><td>gauge</td><td></td><td>L(h<sub>t</sub>)</td></tr>
 *   <tr><td>riskmin.fit.heldout.loss</td><td>gauge</td><td></td><td>mean held-out loss</td></tr>
 *   <tr><td>riskmin.fit.suboptimality</td><td>gauge</td><td></td><td>L(h<sub>t</sub>) − L* (certified mode)</td></tr>
 *   <tr><td>riskmin.gradient.norm</td><td>gauge</td><td></td><td>‖∇L(h<sub>t</sub>)‖</td></tr>
 *   <tr><td>riskmin.gradient.norm.squared</td><td>gauge</td><td></td><td>the noise monitor's ‖G‖² estimate</td></tr>
 *   <tr><td>riskmin.gradient.noise.trace</td><td>gauge</td><td></td><td>tr Σ estimate</td></tr>
 *   <tr><td>riskmin.gradient.noise.batch.variance</td><td>gauge</td><td></td><td>E‖g<sub>B</sub> − G‖²</td></tr>
 *   <tr><td>riskmin.gradient.noise.scale</td><td>gauge</td><td></td><td>B<sub>simple</sub> = tr Σ/‖G‖² (unit samples)</td></tr>
 *   <tr><td>riskmin.batch.size.suggested</td><td>gauge</td><td></td><td>the batch the noise scale suggests (unit samples)</td></tr>
 *   <tr><td>riskmin.descent.cosine</td><td>gauge</td><td></td><td>cos φ at the latest probe</td></tr>
 *   <tr><td>riskmin.descent.cosine.mean</td><td>gauge</td><td></td><td>its running mean</td></tr>
 *   <tr><td>riskmin.descent.share</td><td>gauge</td><td></td><td>share of probes with cos φ &gt; 0</td></tr>
 *   <tr><td>riskmin.descent.angle.optimum</td><td>gauge</td><td></td><td>angle between −g<sub>B</sub> and h* − h<sub>t</sub> (unit degrees, certified mode)</td></tr>
 *   <tr><td>riskmin.stopping.decisions</td><td>counter</td><td>test, decision</td><td>evaluations of each stopping test, by decision</td></tr>
 *   <tr><td>riskmin.stopping.statistic</td><td>gauge</td><td>test</td><td>the test's latest statistic</td></tr>
 *   <tr><td>riskmin.stopping.threshold</td><td>gauge</td><td>test</td><td>the threshold it was compared with</td></tr>
 *   <tr><td>riskmin.verdict</td><td>gauge</td><td>condition</td><td>1 for the latest verdict's condition, 0 for
 *       the others (all 0 before the first verdict of a fit)</td></tr>
 *   <tr><td>riskmin.verdicts</td><td>counter</td><td>condition</td><td>verdicts given, by condition</td></tr>
 * </table>
 * Tag values are lower case ({@code grow_batch}, {@code noise_dominated}); a stopping test's tag is
 * its {@link dev.riskmin.diagnostics.Monitor#name()}. The meters of a stopping test are registered
 * when its first event arrives; all others when the bridge is built. Names follow Micrometer's
 * dot-separated convention, which each registry renders in its own style.
 *
 * <p><b>Across fits.</b> A bridge is meant to live as long as its tags (a model, say) and serve each
 * of its fits in turn: the counters add up over fits, and at the start of each fit (when the bridge
 * is also a fit listener) the gauges return to NaN and the verdict to none, so they never mix two
 * fits. List the bridge before the diagnostics among the fit's listeners so that this reset precedes
 * any event of the new fit.
 *
 * <p><b>Strong references.</b> Micrometer gauges and function counters hold their state object
 * through a weak reference by default (Micrometer reference documentation, "Gauges"; from memory), so
 * a gauge whose state only its creator held reads NaN once the creator is collected. Here every gauge
 * is registered with a strong reference to the bridge's state, and the function counters read the
 * same state object, so the registry keeps the state alive and the values survive after the bridge
 * itself is dropped, until {@link #close()} removes the meters.
 *
 * <p><b>Cost.</b> Per step ({@link #step}): one atomic increment and three ordered stores into a
 * preallocated array, whatever the registry; per event: O(1) stores, a map look-up and at most two
 * counter increments; nothing is allocated on these paths once a stopping test's meters exist.
 *
 * <p><b>Failures.</b> A registry that throws while a stopping test's meters are being registered
 * throws out of {@link #onEvent}; the diagnostics host then detaches the bridge as a subscriber for
 * the rest of the fit and reports it (its fit-listener half goes on counting), and the fit goes on
 * unchanged. A failure while the bridge is being built
 * removes the meters registered so far and propagates to the caller.
 *
 * <p><b>Thread safety.</b> Every method may be called from any thread. Counters are exact however
 * many fits feed one bridge at once; the gauges, though, show whichever fit wrote last, so give each
 * concurrently running fit its own bridge with its own tags. Bridges with distinct tags may share a
 * registry. Two bridges with the same tags cannot: Micrometer would hand the second one the
 * first one's gauges, which read the first one's state, so {@link #register} refuses a meter that is
 * already on the registry. Close a bridge to register another with its tags.
 */
public final class MeterBridge implements EventListener, FitListener, AutoCloseable {
    /** Tag keys this class sets itself; the caller's tags may not use them. */
    public static final Set<String> RESERVED_TAG_KEYS = Set.of("reason", "test", "decision", "condition");

    private static final Decision[] DECISIONS = Decision.values();
    private static final Condition[] CONDITIONS = Condition.values();
    private static final StopReason[] REASONS = StopReason.values();

    // Slots of State.values: raw bits of the gauges' doubles.
    private static final int STEP_SIZE = 0;
    private static final int BATCH_SIZE = 1;
    private static final int BATCH_LOSS = 2;
    private static final int SMOOTHED_LOSS = 3;
    private static final int OBJECTIVE = 4;
    private static final int HELD_OUT = 5;
    private static final int SUBOPTIMALITY = 6;
    private static final int GRADIENT_NORM = 7;
    private static final int GRADIENT_NORM_SQUARED = 8;
    private static final int NOISE_TRACE = 9;
    private static final int BATCH_MEAN_VARIANCE = 10;
    private static final int NOISE_SCALE = 11;
    private static final int SUGGESTED_BATCH = 12;
    private static final int COSINE = 13;
    private static final int MEAN_COSINE = 14;
    private static final int DESCENT_SHARE = 15;
    private static final int ANGLE_TO_OPTIMUM = 16;
    private static final int SLOTS = 17;

    // Slots of State.counts.
    private static final int STARTED = 0;
    private static final int STEPS = 1;
    private static final int EPOCHS = 2;
    private static final int VERDICT = 3; // the latest condition's ordinal, -1 for none
    private static final int COUNTS = 4;

    private record GaugeSpec(String name, int slot, String unit, String description) {
    }

    private static final List<GaugeSpec> GAUGES = List.of(
            new GaugeSpec("riskmin.fit.step.size", STEP_SIZE, null, "step size at the latest step"),
            new GaugeSpec("riskmin.fit.batch.size", BATCH_SIZE, "samples", "batch size at the latest step"),
            new GaugeSpec("riskmin.fit.batch.loss", BATCH_LOSS, null, "mean loss of the latest batch"),
            new GaugeSpec("riskmin.fit.batch.loss.smoothed", SMOOTHED_LOSS, null, "moving average of the batch loss"),
            new GaugeSpec("riskmin.fit.objective", OBJECTIVE, null, "latest measured full objective L(h)"),
            new GaugeSpec("riskmin.fit.heldout.loss", HELD_OUT, null, "latest measured mean held-out loss"),
            new GaugeSpec("riskmin.fit.suboptimality", SUBOPTIMALITY, null, "L(h) - L* against a certified optimum"),
            new GaugeSpec("riskmin.gradient.norm", GRADIENT_NORM, null, "latest measured full-gradient norm"),
            new GaugeSpec("riskmin.gradient.norm.squared", GRADIENT_NORM_SQUARED, null,
                    "smoothed estimate of the squared full-gradient norm"),
            new GaugeSpec("riskmin.gradient.noise.trace", NOISE_TRACE, null,
                    "estimate of the trace of the per-sample gradient covariance"),
            new GaugeSpec("riskmin.gradient.noise.batch.variance", BATCH_MEAN_VARIANCE, null,
                    "estimated variance of the batch-mean gradient"),
            new GaugeSpec("riskmin.gradient.noise.scale", NOISE_SCALE, "samples",
                    "gradient noise scale: trace of the covariance over the squared gradient norm"),
            new GaugeSpec("riskmin.batch.size.suggested", SUGGESTED_BATCH, "samples",
                    "batch size the noise scale suggests"),
            new GaugeSpec("riskmin.descent.cosine", COSINE, null,
                    "cosine between the batch gradient and the full gradient at the latest probe"),
            new GaugeSpec("riskmin.descent.cosine.mean", MEAN_COSINE, null, "running mean of that cosine"),
            new GaugeSpec("riskmin.descent.share", DESCENT_SHARE, null, "share of probes that pointed downhill"),
            new GaugeSpec("riskmin.descent.angle.optimum", ANGLE_TO_OPTIMUM, "degrees",
                    "angle between the step and the direction to a certified optimum"));

    private final MeterRegistry registry;
    private final Tags tags;
    private final State state = new State();
    private final Counter[] finished = new Counter[REASONS.length];
    private final Counter[] verdicts = new Counter[CONDITIONS.length];
    private final Map<String, TestMeters> tests = new ConcurrentHashMap<>();
    private final List<Meter> owned = new ArrayList<>(); // guarded by this
    private boolean closed; // guarded by this

    private MeterBridge(MeterRegistry registry, Tags tags) {
        this.registry = registry;
        this.tags = tags;
    }

    /**
     * Registers the bridge's meters (all but the stopping tests', which come with their first event).
     *
     * @param registry the registry to publish on (not modified except by registering meters)
     * @param tags     tags every meter carries, e.g. the model's name; none may use a key of
     *                 {@link #RESERVED_TAG_KEYS}
     * @throws IllegalArgumentException if a tag key is reserved, or a meter with the same name and tags is
     *                                  already on the registry (another bridge with these tags)
     */
    public static MeterBridge register(MeterRegistry registry, Iterable<Tag> tags) {
        Arguments.notNull("registry", registry);
        Tags all = Tags.of(Arguments.notNull("tags", tags));
        for (Tag t : all) {
            if (RESERVED_TAG_KEYS.contains(t.getKey())) {
                throw new IllegalArgumentException("tag key (" + t.getKey() + ") is reserved: the bridge sets "
                        + RESERVED_TAG_KEYS + " itself");
            }
        }
        MeterBridge bridge = new MeterBridge(registry, all);
        bridge.registerFixed();
        return bridge;
    }

    /**
     * Registers the bridge's meters with tags given as key, value pairs (see {@link #register(MeterRegistry, Iterable)}).
     *
     * @throws IllegalArgumentException if the number of strings is odd or one is null, or as
     *                                  {@link #register(MeterRegistry, Iterable)}
     */
    public static MeterBridge register(MeterRegistry registry, String... keyValues) {
        Arguments.notNull("keyValues", keyValues);
        if (keyValues.length % 2 != 0) {
            throw new IllegalArgumentException("tags (" + keyValues.length + " strings) must be key, value pairs");
        }
        for (int k = 0; k < keyValues.length; k++) {
            if (keyValues[k] == null) {
                throw new IllegalArgumentException("tags[" + k + "] is null");
            }
        }
        return register(registry, Tags.of(keyValues));
    }

    /** @return the tags every meter of this bridge carries */
    public Tags tags() {
        return tags;
    }

    /** @return the meters this bridge has registered so far (a copy; empty after {@link #close()}) */
    public synchronized List<Meter> meters() {
        return List.copyOf(owned);
    }

    /**
     * Removes this bridge's meters from the registry. Later steps and events reach no meter, and none is
     * registered again. Idempotent.
     */
    @Override
    public synchronized void close() {
        closed = true;
        for (Meter m : owned) {
            registry.remove(m);
        }
        owned.clear();
    }

    // ---------------------------------------------------------------- fit listener

    @Override
    public void started(RunInfo run) {
        state.counts.getAndIncrement(STARTED);
        state.clear();
    }

    @Override
    public void step(StepView view, FitControl control) {
        state.counts.getAndIncrement(STEPS);
        state.set(STEP_SIZE, view.stepSize());
        state.set(BATCH_SIZE, view.batchLength());
        state.set(BATCH_LOSS, view.batchLoss());
    }

    @Override
    public void epochEnded(StepView view, FitControl control) {
        state.counts.getAndIncrement(EPOCHS);
    }

    @Override
    public void finished(Fit fit) {
        StopReason reason = fit.stopReason();
        if (reason != null) {
            finished[reason.ordinal()].increment();
        }
    }

    // ---------------------------------------------------------------- events

    @Override
    public void onEvent(DiagnosticEvent event) {
        if (event instanceof LossEvent e) {
            state.setMeasured(BATCH_LOSS, e.batchLoss());
            state.setMeasured(SMOOTHED_LOSS, e.smoothedBatchLoss());
            state.setMeasured(OBJECTIVE, e.objective());
            state.setMeasured(HELD_OUT, e.heldOutLoss());
            state.setMeasured(GRADIENT_NORM, e.gradientNorm());
            state.setMeasured(STEP_SIZE, e.stepSize());
            state.set(BATCH_SIZE, e.batchSize());
        } else if (event instanceof NoiseEvent e) {
            state.setMeasured(NOISE_TRACE, e.traceCovariance());
            state.setMeasured(BATCH_MEAN_VARIANCE, e.batchMeanVariance());
            state.setMeasured(GRADIENT_NORM_SQUARED, e.gradientNormSquared());
            state.setMeasured(NOISE_SCALE, e.noiseScale());
            state.set(SUGGESTED_BATCH, e.suggestedBatchSize());
        } else if (event instanceof AngleEvent e) {
            state.setMeasured(COSINE, e.cosine());
            state.setMeasured(MEAN_COSINE, e.meanCosine());
            state.setMeasured(DESCENT_SHARE, e.descentShare());
            state.setMeasured(ANGLE_TO_OPTIMUM, e.angleToOptimum());
            state.setMeasured(SUBOPTIMALITY, e.suboptimality());
        } else if (event instanceof StoppingEvent e) {
            stopping(e);
        } else if (event instanceof VerdictEvent e) {
            HealthVerdict v = e.verdict();
            if (v != null && v.condition() != null) {
                state.counts.set(VERDICT, v.condition().ordinal());
                verdicts[v.condition().ordinal()].increment();
            }
        }
    }

    private void stopping(StoppingEvent e) {
        String test = e.test() != null ? e.test() : "unnamed";
        TestMeters m = tests.get(test);
        if (m == null) {
            m = registerTest(test);
            if (m == null) {
                return;
            }
        }
        setMeasured(m.figures, 0, e.statistic());
        setMeasured(m.figures, 1, e.threshold());
        if (e.decision() != null) {
            m.decisions[e.decision().ordinal()].increment();
        }
    }

    // ---------------------------------------------------------------- registration

    private synchronized void registerFixed() {
        Batch batch = new Batch();
        try {
            batch.add(FunctionCounter.builder("riskmin.fits.started", state, s -> s.counts.get(STARTED))
                    .tags(tags).description("fits started").register(registry));
            batch.add(FunctionCounter.builder("riskmin.fit.steps", state, s -> s.counts.get(STEPS))
                    .tags(tags).baseUnit("steps").description("steps taken").register(registry));
            batch.add(FunctionCounter.builder("riskmin.fit.epochs", state, s -> s.counts.get(EPOCHS))
                    .tags(tags).baseUnit("epochs").description("passes of n draws completed").register(registry));
            for (StopReason r : REASONS) {
                finished[r.ordinal()] = batch.add(Counter.builder("riskmin.fits.finished").tags(tags)
                        .tag("reason", lower(r)).description("fits finished, by stop reason").register(registry));
            }
            for (GaugeSpec g : GAUGES) {
                int slot = g.slot();
                Gauge.Builder<State> b = Gauge.builder(g.name(), state, s -> s.value(slot))
                        .tags(tags).description(g.description()).strongReference(true);
                if (g.unit() != null) {
                    b.baseUnit(g.unit());
                }
                batch.add(b.register(registry));
            }
            for (Condition c : CONDITIONS) {
                int ordinal = c.ordinal();
                batch.add(Gauge.builder("riskmin.verdict", state, s -> s.counts.get(VERDICT) == ordinal ? 1 : 0)
                        .tags(tags).tag("condition", lower(c)).strongReference(true)
                        .description("1 for the latest verdict's condition, 0 for the others").register(registry));
                verdicts[ordinal] = batch.add(Counter.builder("riskmin.verdicts").tags(tags)
                        .tag("condition", lower(c)).description("verdicts given, by condition").register(registry));
            }
        } catch (RuntimeException e) {
            batch.abandon();
            throw e;
        }
        owned.addAll(batch.added);
    }

    /** @return the test's meters, registered now if needed; null once closed (registering would undo close) */
    private synchronized TestMeters registerTest(String test) {
        TestMeters known = tests.get(test);
        if (known != null || closed) {
            return known;
        }
        Batch batch = new Batch();
        try {
            AtomicLongArray figures = new AtomicLongArray(2);
            figures.set(0, Double.doubleToRawLongBits(Double.NaN));
            figures.set(1, Double.doubleToRawLongBits(Double.NaN));
            batch.add(Gauge.builder("riskmin.stopping.statistic", figures, f -> Double.longBitsToDouble(f.get(0)))
                    .tags(tags).tag("test", test).strongReference(true)
                    .description("the stopping test's latest statistic").register(registry));
            batch.add(Gauge.builder("riskmin.stopping.threshold", figures, f -> Double.longBitsToDouble(f.get(1)))
                    .tags(tags).tag("test", test).strongReference(true)
                    .description("the threshold the statistic was compared with").register(registry));
            Counter[] decisions = new Counter[DECISIONS.length];
            for (Decision d : DECISIONS) {
                decisions[d.ordinal()] = batch.add(Counter.builder("riskmin.stopping.decisions").tags(tags)
                        .tag("test", test).tag("decision", lower(d))
                        .description("stopping-test evaluations, by decision").register(registry));
            }
            TestMeters meters = new TestMeters(figures, decisions);
            owned.addAll(batch.added);
            tests.put(test, meters);
            return meters;
        } catch (RuntimeException e) {
            batch.abandon();
            throw e;
        }
    }

    private static void setMeasured(AtomicLongArray a, int slot, double v) {
        if (!Double.isNaN(v)) {
            a.lazySet(slot, Double.doubleToRawLongBits(v));
        }
    }

    private static String lower(Enum<?> e) {
        return e.name().toLowerCase(Locale.ROOT);
    }

    /** The meters of one registration, checked against those on the registry before it. */
    private final class Batch {
        final Set<Meter> before = Collections.newSetFromMap(new IdentityHashMap<>());
        final List<Meter> added = new ArrayList<>();

        Batch() {
            before.addAll(registry.getMeters());
        }

        /*
         * Identity, not id equality: a registry may rename meters or add common tags through its
         * filters, but it returns the very meter it already holds when the id (after filtering) repeats.
         */
        <M extends Meter> M add(M meter) {
            if (before.contains(meter)) {
                throw new IllegalArgumentException("meter " + meter.getId().getName() + " with tags "
                        + meter.getId().getTags() + " is already registered: give each bridge its own tags "
                        + "(e.g. a model or fit tag), or close the bridge that registered it");
            }
            added.add(meter);
            return meter;
        }

        void abandon() {
            for (Meter m : added) {
                registry.remove(m);
            }
        }
    }

    /** The stopping test's latest statistic and threshold (raw bits), and its decision counters. */
    private record TestMeters(AtomicLongArray figures, Counter[] decisions) {
    }

    /**
     * What the gauges and function counters read. Ordered stores (lazySet) suffice: each slot has one
     * writer at a time in the intended use, and a reader needs only an untorn, eventually visible value.
     */
    private static final class State {
        final AtomicLongArray values = new AtomicLongArray(SLOTS);
        final AtomicLongArray counts = new AtomicLongArray(COUNTS);

        State() {
            clear();
        }

        void clear() {
            long nan = Double.doubleToRawLongBits(Double.NaN);
            for (int k = 0; k < SLOTS; k++) {
                values.set(k, nan);
            }
            counts.set(VERDICT, -1);
        }

        void set(int slot, double v) {
            values.lazySet(slot, Double.doubleToRawLongBits(v));
        }

        void setMeasured(int slot, double v) {
            if (!Double.isNaN(v)) {
                set(slot, v);
            }
        }

        double value(int slot) {
            return Double.longBitsToDouble(values.get(slot));
        }
    }
}
