package dev.riskmin.examples;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.EventListener;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.Cadence;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.estimator.OscillationMonitor;
import dev.riskmin.diagnostics.report.HtmlReport;
import dev.riskmin.diagnostics.report.RunFacts;
import dev.riskmin.diagnostics.sink.Slf4jReporter;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.util.Arguments;

import java.io.IOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/**
 * One fit with the standard diagnostics attached, as the demos, the command line and the retraining
 * example run it: the noise, angle, loss and oscillation monitors at their default cadences (the
 * loss monitor's exact objective and held-out loss at a budget that may be raised); an
 * {@link EpochLog} line per epoch and every stopping-test event through SLF4J; every event kept by a
 * bounded {@link TraceRecorder} for the HTML report; and any extra subscribers (a trace writer, a
 * metrics bridge). The outcome holds the fit, the health verdict, the run's facts and the recorder.
 *
 * <p>Nothing here is new mathematics: it wires the library's pieces together in one place so the
 * examples agree. Immutable configuration; {@link #run} may be called from several threads at once
 * (each call builds its own diagnostics).
 */
public final class DiagnosedFit {
    /** Events kept per kind for the report (thinned evenly beyond that). */
    public static final int RECORDER_CAPACITY = 4096;

    private final String label;
    private final List<EventListener> subscribers;
    private final boolean logProgress;
    private final int epochLines;
    private final double measurementShare;

    private DiagnosedFit(String label, List<EventListener> subscribers, boolean logProgress, int epochLines,
                         double measurementShare) {
        this.label = label;
        this.subscribers = List.copyOf(subscribers);
        this.logProgress = logProgress;
        this.epochLines = epochLines;
        this.measurementShare = measurementShare;
    }

    /** A diagnosed fit whose log lines and report carry this label. */
    public static DiagnosedFit labelled(String label) {
        return new DiagnosedFit(Arguments.notNull("label", label), List.of(), true, EpochLog.DEFAULT_LINES,
                LossMonitor.DEFAULT_SHARE_PERCENT / 100.0);
    }

    /**
     * @param share the budget of the loss monitor's exact objective and held-out loss, each, as a share
     *              of the fit's gradient evaluations (see {@link Cadence#share(double)}), in (0, 1]; the
     *              default is the monitor's own, 1 %, at which a full objective comes about once per 100
     *              epochs of plain SGD
     * @return this configuration with that budget
     * @throws IllegalArgumentException naming the share if it is outside (0, 1]
     */
    public DiagnosedFit withMeasurementShare(double share) {
        Cadence.share(share); // validates, naming the share
        return new DiagnosedFit(label, subscribers, logProgress, epochLines, share);
    }

    /** @return this configuration with one more subscriber to every event (e.g. a trace writer) */
    public DiagnosedFit withSubscriber(EventListener listener) {
        List<EventListener> more = new ArrayList<>(subscribers);
        more.add(Arguments.notNull("listener", listener));
        return new DiagnosedFit(label, more, logProgress, epochLines, measurementShare);
    }

    /** @return this configuration logging epoch and stopping lines or not (the verdict is never logged here) */
    public DiagnosedFit withProgressLog(boolean value) {
        return new DiagnosedFit(label, subscribers, value, epochLines, measurementShare);
    }

    /**
     * @return this configuration logging at most this many epoch lines per fit (≥ 1)
     * @throws IllegalArgumentException naming epochLines if it is below 1
     */
    public DiagnosedFit withEpochLines(int value) {
        return new DiagnosedFit(label, subscribers, logProgress, Arguments.positive("epochLines", value),
                measurementShare);
    }

    /**
     * Fits with diagnostics attached.
     *
     * @param heldOut data kept out of the fit for the held-out loss, or null
     */
    public Outcome run(Minimizer minimizer, Dataset training, Dataset heldOut, FitOptions.Builder extra) {
        Arguments.notNull("minimizer", minimizer);
        Arguments.notNull("training", training);
        TraceRecorder recorder = TraceRecorder.bounded(RECORDER_CAPACITY);
        EpochLog log = EpochLog.labelled(label).withMaxLines(epochLines);
        Diagnostics.Builder b = Diagnostics.builder()
                .monitor(NoiseMonitor.defaults())
                .monitor(AngleMonitor.defaults().withCadence(Cadence.share(measurementShare)))
                .monitor(LossMonitor.defaults().withObjectiveCadence(Cadence.share(measurementShare))
                        .withHeldOutCadence(Cadence.share(measurementShare)))
                .monitor(OscillationMonitor.defaults())
                .subscribe(recorder);
        if (logProgress) {
            b.subscribe(Slf4jReporter.defaults(), EventFilter.of(EventKind.STOPPING));
            b.subscribe(log, EpochLog.events());
        }
        for (EventListener s : subscribers) {
            b.subscribe(s);
        }
        Diagnostics diagnostics = b.build();
        FitOptions.Builder options = extra != null ? extra : FitOptions.builder();
        options.listener(diagnostics);
        if (logProgress) {
            options.listener(log);
        }
        if (heldOut != null) {
            options.heldOut(heldOut);
        }
        Fit fit = minimizer.fit(training, options.build());
        HealthVerdict verdict = diagnostics.verdict();
        RunFacts facts = RunFacts.of(diagnostics.run()).withFit(fit);
        return new Outcome(label, fit, verdict, facts, recorder, diagnostics.failures());
    }

    /**
     * What one diagnosed fit gave.
     *
     * @param label    the label of its log lines and report
     * @param fit      the fit
     * @param verdict  the health verdict of the run
     * @param facts    the run's configuration and outcome, for the report
     * @param recorder the recorded events
     * @param failures monitors or subscribers that threw and were detached (normally none)
     */
    public record Outcome(String label, Fit fit, HealthVerdict verdict, RunFacts facts, TraceRecorder recorder,
                          List<String> failures) {

        /** @return the HTML report of this fit, with these facts plus the extra ones given */
        public HtmlReport report(Map<String, String> extraFacts) {
            RunFacts all = facts;
            for (Map.Entry<String, String> e : extraFacts.entrySet()) {
                all = all.with(e.getKey(), e.getValue());
            }
            return HtmlReport.of(recorder).withTitle(label).withFacts(all).withVerdict(verdict);
        }

        /** Writes {@link #report(Map)} to the file (UTF-8, replaced if it exists). */
        public void writeReport(Path file, Map<String, String> extraFacts) throws IOException {
            report(extraFacts).write(file);
        }
    }
}
