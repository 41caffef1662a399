package dev.riskmin.examples.service;

import dev.riskmin.CancellationToken;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.EventListener;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.examples.DiagnosedFit;
import dev.riskmin.hook.FitListener;
import dev.riskmin.model.ModelFile;
import dev.riskmin.model.SavedModel;
import dev.riskmin.util.Arguments;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.Executors;
import java.util.concurrent.ScheduledExecutorService;
import java.util.concurrent.ScheduledFuture;
import java.util.concurrent.ThreadFactory;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.IntFunction;

/**
 * Retrains a model on a schedule, the way a service would run riskmin unattended: every round
 * takes the round's data, fits with the standard diagnostics attached (their lines go to the
 * service's SLF4J logs), and <b>publishes the model only when the health verdict is
 * {@link Condition#CONVERGED}</b>. Publishing writes the model file through {@link ModelFile}, which
 * replaces it atomically (a reader sees the old file or the complete new one). A round whose verdict
 * is anything else — still descending, noise-dominated, step too large, diverged, undetermined — is
 * refused: the service logs the verdict's summary and advice at WARN and keeps the previous model
 * file untouched. A round cancelled by {@link #close()} is refused the same way.
 *
 * <p>Rounds run one at a time on a single scheduler thread, a fixed delay apart (the delay counts
 * from the end of one round to the start of the next, so a slow fit never overlaps the next one).
 * A round that throws is logged and recorded; the schedule goes on. {@link #close()} cancels the
 * running fit at its next step, stops the schedule and waits for the thread to end.
 *
 * <p>A CONVERGED verdict says the optimizer reached the minimum of the stated objective; it is a
 * necessary gate, not a sufficient one. A real service adds its own checks before publishing
 * (held-out quality against the previous model, sanity bounds on predictions) and keeps a human in
 * the loop where the model's decisions matter.
 *
 * <p>Thread-safe: the accessors may be called from any thread while rounds run.
 */
public final class RetrainingService implements AutoCloseable {
    private static final Logger LOG = LoggerFactory.getLogger(RetrainingService.class);
    /** The prefix of the scheduler thread's name, followed by the service's name. */
    public static final String THREAD_PREFIX = "riskmin-retraining-";

    private final String name;
    private final Minimizer minimizer;
    private final IntFunction<TrainingData> data;
    private final Path modelFile;
    private final Duration delay;
    private final int maxRounds;
    private final Duration shutdownWait;
    private final List<FitListener> fitListeners;
    private final List<EventListener> subscribers;
    private final ScheduledExecutorService scheduler;
    private final CancellationToken cancellation = new CancellationToken();
    private final List<Round> rounds = new ArrayList<>();
    private ScheduledFuture<?> schedule;
    private boolean started;
    private boolean closed;

    private RetrainingService(Builder b) {
        this.name = b.name;
        this.minimizer = b.minimizer;
        this.data = b.data;
        this.modelFile = b.modelFile.toAbsolutePath().normalize();
        this.delay = b.delay;
        this.maxRounds = b.maxRounds;
        this.shutdownWait = b.shutdownWait;
        this.fitListeners = List.copyOf(b.fitListeners);
        this.subscribers = List.copyOf(b.subscribers);
        AtomicInteger threads = new AtomicInteger();
        ThreadFactory factory = runnable -> {
            Thread t = new Thread(runnable, THREAD_PREFIX + name
                    + (threads.incrementAndGet() > 1 ? "-" + threads.get() : ""));
            t.setDaemon(false);
            return t;
        };
        this.scheduler = Executors.newSingleThreadScheduledExecutor(factory);
    }

    public static Builder builder() {
        return new Builder();
    }

    /**
     * Starts the schedule: the first round at once, the next ones the configured delay after the
     * previous round ends.
     *
     * @throws IllegalStateException if the service was started or closed already
     */
    public synchronized void start() {
        if (started || closed) {
            throw new IllegalStateException("service " + name + " was " + (closed ? "closed" : "started") + " already");
        }
        started = true;
        schedule = scheduler.scheduleWithFixedDelay(this::round, 0, delay.toNanos(), TimeUnit.NANOSECONDS);
    }

    /**
     * Waits until at least {@code count} rounds have ended.
     *
     * @return whether they had, before the timeout
     * @throws InterruptedException if the waiting thread is interrupted
     */
    public synchronized boolean awaitRounds(int count, Duration timeout) throws InterruptedException {
        long deadline = System.nanoTime() + timeout.toNanos();
        while (rounds.size() < count) {
            long left = deadline - System.nanoTime();
            if (left <= 0) {
                return false;
            }
            TimeUnit.NANOSECONDS.timedWait(this, left);
        }
        return true;
    }

    /** @return the rounds ended so far, in order */
    public synchronized List<Round> rounds() {
        return List.copyOf(rounds);
    }

    /** @return the model file rounds publish to (absolute) */
    public Path modelFile() {
        return modelFile;
    }

    /** @return whether the scheduler's thread has ended (after {@link #close()}) */
    public boolean terminated() {
        return scheduler.isTerminated();
    }

    /**
     * Cancels the running fit (it stops at its next step and is not published), stops the schedule,
     * and waits up to the configured time for the scheduler thread to end, then interrupts it and
     * waits as long again. Idempotent.
     *
     * @throws IllegalStateException if the thread still runs after that (naming it), or the waiting
     *                               thread was interrupted (its flag is set again)
     */
    @Override
    public void close() {
        synchronized (this) {
            closed = true;
            if (schedule != null) {
                schedule.cancel(false);
            }
        }
        cancellation.cancel();
        scheduler.shutdown();
        try {
            if (!scheduler.awaitTermination(shutdownWait.toNanos(), TimeUnit.NANOSECONDS)) {
                scheduler.shutdownNow();
                if (!scheduler.awaitTermination(shutdownWait.toNanos(), TimeUnit.NANOSECONDS)) {
                    throw new IllegalStateException("service " + name + ": the thread " + THREAD_PREFIX + name
                            + " did not end within 2 x " + shutdownWait);
                }
            }
        } catch (InterruptedException e) {
            scheduler.shutdownNow();
            Thread.currentThread().interrupt();
            throw new IllegalStateException("service " + name + ": interrupted while waiting for the thread to end", e);
        }
    }

    private void round() {
        int number;
        synchronized (this) {
            if (closed) {
                return;
            }
            number = rounds.size() + 1;
        }
        Round outcome;
        try {
            outcome = fitAndJudge(number);
        } catch (RuntimeException | Error e) {
            // A failing round must not end the schedule (an exception would cancel it silently).
            LOG.error("{} round {}: failed, keeping the previous model {}: {}", name, number, describe(modelFile),
                    e.toString(), e);
            outcome = new Round(number, null, null, "failed: " + e, "", false, null);
        }
        synchronized (this) {
            rounds.add(outcome);
            notifyAll();
            if (maxRounds > 0 && rounds.size() >= maxRounds && schedule != null) {
                schedule.cancel(false);
            }
        }
    }

    private Round fitAndJudge(int number) {
        TrainingData round = data.apply(number);
        if (round == null) {
            throw new IllegalStateException("the data supplier returned null for round " + number);
        }
        DiagnosedFit diagnosed = DiagnosedFit.labelled(name + " round " + number).withEpochLines(5);
        for (EventListener s : subscribers) {
            diagnosed = diagnosed.withSubscriber(s);
        }
        FitOptions.Builder options = FitOptions.builder().cancellation(cancellation);
        for (FitListener l : fitListeners) {
            options.listener(l);
        }
        DiagnosedFit.Outcome o = diagnosed.run(minimizer, round.training(), round.heldOut(), options);
        Fit fit = o.fit();
        HealthVerdict v = o.verdict();
        if (fit.stopReason() == StopReason.CANCELLED) {
            LOG.warn("{} round {}: not publishing: the fit was cancelled by shutdown ({}); keeping the previous"
                    + " model {}", name, number, v.condition(), describe(modelFile));
            return new Round(number, fit.stopReason(), v.condition(), v.summary(), v.advice(), false, null);
        }
        if (v.condition() != Condition.CONVERGED) {
            LOG.warn("{} round {}: not publishing: verdict {}: {} Advice: {}. Keeping the previous model {}", name,
                    number, v.condition(), v.summary(), v.advice(), describe(modelFile));
            return new Round(number, fit.stopReason(), v.condition(), v.summary(), v.advice(), false, null);
        }
        SavedModel saved = (fit.hasModel() ? SavedModel.of(fit.model()) : SavedModel.of(fit.multiclassModel()))
                .withStandardized(fit.standardized())
                .withCreated(Instant.now())
                .withNote(name + " round " + number);
        try {
            Files.createDirectories(modelFile.getParent());
            ModelFile.defaults().write(saved, modelFile);
        } catch (IOException e) {
            LOG.error("{} round {}: converged, but the model could not be written to {}: {}; the previous file is"
                    + " unchanged", name, number, modelFile, e.toString());
            return new Round(number, fit.stopReason(), v.condition(), "converged, but not written: " + e, v.advice(),
                    false, null);
        }
        LOG.info("{} round {}: published {} (verdict CONVERGED: {})", name, number, modelFile, v.summary());
        return new Round(number, fit.stopReason(), v.condition(), v.summary(), v.advice(), true, modelFile);
    }

    private static String describe(Path file) {
        return Files.exists(file) ? file.toString() : "(none published yet at " + file + ")";
    }

    @Override
    public String toString() {
        return "RetrainingService[" + name + ", every " + delay + ", model " + modelFile + "]";
    }

    /** Collects the service's configuration; {@link #build()} checks it and returns a new service. */
    public static final class Builder {
        private String name = "model";
        private Minimizer minimizer;
        private IntFunction<TrainingData> data;
        private Path modelFile;
        private Duration delay = Duration.ofMinutes(60);
        private int maxRounds;
        private Duration shutdownWait = Duration.ofSeconds(10);
        private final List<FitListener> fitListeners = new ArrayList<>();
        private final List<EventListener> subscribers = new ArrayList<>();

        private Builder() {
        }

        /** The name in log lines and the thread's name (default "model"): letters, digits, '-', '_' and '.'. */
        public Builder name(String value) {
            Arguments.notNull("name", value);
            if (!value.matches("[A-Za-z0-9._-]{1,64}")) {
                throw new IllegalArgumentException("name (\"" + value + "\") must be 1-64 letters, digits, '.', '_'"
                        + " or '-'");
            }
            this.name = value;
            return this;
        }

        /** The minimizer every round fits with (required; immutable, so shared safely). */
        public Builder minimizer(Minimizer value) {
            this.minimizer = Arguments.notNull("minimizer", value);
            return this;
        }

        /** The data of round k (k = 1, 2, …), called on the scheduler thread at the start of the round (required). */
        public Builder data(IntFunction<TrainingData> value) {
            this.data = Arguments.notNull("data", value);
            return this;
        }

        /** The model file that converged rounds replace (required); its directory is created if missing. */
        public Builder publishTo(Path file) {
            Arguments.notNull("file", file);
            if (file.getFileName() == null) {
                throw new IllegalArgumentException("publishTo (" + file + ") must name a file");
            }
            this.modelFile = file;
            return this;
        }

        /** The delay from the end of one round to the start of the next (default one hour), &gt; 0. */
        public Builder every(Duration value) {
            Arguments.notNull("every", value);
            if (value.isNegative() || value.isZero()) {
                throw new IllegalArgumentException("every (" + value + ") must be > 0");
            }
            this.delay = value;
            return this;
        }

        /** Stops scheduling after this many rounds (default 0: until {@link #close()}), ≥ 0. */
        public Builder rounds(int value) {
            this.maxRounds = Arguments.nonNegative("rounds", value);
            return this;
        }

        /** How long {@link #close()} waits for the thread, twice at most (default 10 s), &gt; 0. */
        public Builder shutdownWait(Duration value) {
            Arguments.notNull("shutdownWait", value);
            if (value.isNegative() || value.isZero()) {
                throw new IllegalArgumentException("shutdownWait (" + value + ") must be > 0");
            }
            this.shutdownWait = value;
            return this;
        }

        /** Adds a listener to every round's fit, ahead of the diagnostics (e.g. a metrics bridge's fit half). */
        public Builder fitListener(FitListener value) {
            fitListeners.add(Arguments.notNull("fitListener", value));
            return this;
        }

        /** Subscribes a listener to every round's diagnostic events (e.g. a metrics bridge, a trace writer). */
        public Builder subscriber(EventListener value) {
            subscribers.add(Arguments.notNull("subscriber", value));
            return this;
        }

        /**
         * @throws IllegalArgumentException naming the first missing part (minimizer, data, publishTo)
         */
        public RetrainingService build() {
            if (minimizer == null) {
                throw new IllegalArgumentException("minimizer is not set");
            }
            if (data == null) {
                throw new IllegalArgumentException("data is not set");
            }
            if (modelFile == null) {
                throw new IllegalArgumentException("publishTo is not set");
            }
            return new RetrainingService(this);
        }
    }
}
