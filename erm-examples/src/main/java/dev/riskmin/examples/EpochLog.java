package dev.riskmin.examples;

import dev.riskmin.Fit;
import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.EventFilter;
import dev.riskmin.diagnostics.EventKind;
import dev.riskmin.diagnostics.EventListener;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.RunInfo;
import dev.riskmin.hook.StepView;
import dev.riskmin.util.Arguments;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.util.Locale;

/**
 * Logs one readable line per epoch of a fit through SLF4J (logger {@value #LOGGER}, INFO), built
 * from the latest figures the diagnostics published before the epoch ended, for example
 * <pre>
 * [minutes] epoch 3/12: batch loss ≈ 0.1339, objective 0.1329, gradient norm 0.0312,
 *     held-out loss 0.1404, step size 0.09635, batch 64, noise scale 40.65
 * </pre>
 * (one line in the log) and a last line when the fit finishes (stop reason, steps, epochs, objective, wall time).
 *
 * <p>Figures: "batch loss ≈" is the exponentially smoothed batch loss of the loss monitor; the
 * objective L(h), the full-gradient norm ‖∇L(h)‖ and the held-out loss appear when the loss monitor
 * measured them since the previous line (at its cadences); the noise scale
 * B<sub>simple</sub> = tr Σ/‖G‖² (McCandlish et al., arXiv:1812.06162, 2018) and the running mean of
 * the descent cosine cos φ = ⟨g<sub>B</sub>, G⟩/(‖g<sub>B</sub>‖ ‖G‖) are the noise and angle monitors'
 * latest. A figure not measured is left out. The noise scale is left out under SVRG and SAGA: their
 * steps carry no noise floor, and a large noise scale there only says that ‖G‖ has become small
 * (the verdict ignores it for them too).
 *
 * <p>Wiring: the log is two listeners in one. Subscribe it to the fit's diagnostics with
 * {@link #events()} and pass it with the fit's listeners, after the diagnostics:
 * <pre>{@code
 * EpochLog log = EpochLog.labelled("minutes");
 * Diagnostics diagnostics = Diagnostics.builder()...subscribe(log, EpochLog.events()).build();
 * minimizer.fit(data, FitOptions.builder().listener(diagnostics).listener(log).build());
 * }</pre>
 * A long fit logs every k-th epoch, with k chosen so that at most {@code maxLines} lines (default
 * {@value #DEFAULT_LINES}) cover the planned epochs.
 *
 * <p>One instance serves one fit at a time. Receiving an event stores a few numbers (no allocation);
 * a line is formatted only at an epoch end, and only when the logger is enabled for INFO.
 */
public final class EpochLog implements FitListener, EventListener {
    /** The logger's name. */
    public static final String LOGGER = "dev.riskmin.examples.progress";
    /** The default largest number of epoch lines per fit. */
    public static final int DEFAULT_LINES = 20;

    private final Logger logger;
    private final String label;
    private final int maxLines;

    private int sampleCount;
    private boolean showNoise;
    private double plannedEpochs;
    private long every;
    private double smoothedLoss;
    private double objective;
    private double heldOut;
    private double noiseScale;
    private double gradientNorm;
    private double meanCosine;
    private int batchSize;

    private EpochLog(String label, int maxLines) {
        this.logger = LoggerFactory.getLogger(LOGGER);
        this.label = label;
        this.maxLines = maxLines;
    }

    /** A log whose lines start with "[label]", at most {@value #DEFAULT_LINES} epoch lines per fit. */
    public static EpochLog labelled(String label) {
        return new EpochLog(Arguments.notNull("label", label), DEFAULT_LINES);
    }

    /**
     * @return this log with at most this many epoch lines per fit (≥ 1)
     * @throws IllegalArgumentException naming maxLines if it is below 1
     */
    public EpochLog withMaxLines(int value) {
        return new EpochLog(label, Arguments.positive("maxLines", value));
    }

    /** @return the events the log reads: loss, noise and angle events, every one */
    public static EventFilter events() {
        return EventFilter.of(EventKind.LOSS, EventKind.NOISE, EventKind.ANGLE);
    }

    @Override
    public void started(RunInfo run) {
        sampleCount = run.sampleCount();
        showNoise = !run.varianceReduced();
        plannedEpochs = run.plannedSteps() >= 0
                ? (double) run.plannedSteps() * run.batchSize() / run.sampleCount() : Double.NaN;
        every = Double.isNaN(plannedEpochs) ? 1 : Math.max(1, (long) Math.ceil(plannedEpochs / maxLines));
        batchSize = run.batchSize();
        smoothedLoss = Double.NaN;
        noiseScale = Double.NaN;
        meanCosine = Double.NaN;
        clearEpochFigures();
    }

    private void clearEpochFigures() {
        objective = Double.NaN;
        heldOut = Double.NaN;
        gradientNorm = Double.NaN;
    }

    @Override
    public void onEvent(DiagnosticEvent event) {
        if (event instanceof LossEvent e) {
            smoothedLoss = keep(smoothedLoss, e.smoothedBatchLoss());
            objective = keep(objective, e.objective());
            heldOut = keep(heldOut, e.heldOutLoss());
            gradientNorm = keep(gradientNorm, e.gradientNorm());
            batchSize = e.batchSize();
        } else if (event instanceof NoiseEvent e) {
            noiseScale = keep(noiseScale, e.noiseScale());
        } else if (event instanceof AngleEvent e) {
            meanCosine = keep(meanCosine, e.meanCosine());
        }
    }

    private static double keep(double old, double measured) {
        return Double.isNaN(measured) ? old : measured;
    }

    @Override
    public void epochEnded(StepView view, FitControl control) {
        long epoch = Math.round((double) view.draws() / sampleCount);
        if (epoch % every == 0 && logger.isInfoEnabled()) {
            StringBuilder b = new StringBuilder(160);
            b.append('[').append(label).append("] epoch ").append(epoch);
            if (!Double.isNaN(plannedEpochs)) {
                b.append('/').append(figure(plannedEpochs));
            }
            b.append(':');
            int mark = b.length();
            add(b, "batch loss ≈ ", smoothedLoss);
            add(b, "objective ", objective);
            add(b, "gradient norm ", gradientNorm);
            add(b, "held-out loss ", heldOut);
            add(b, "step size ", view.stepSize());
            b.append(", batch ").append(batchSize);
            if (showNoise) {
                add(b, "noise scale ", noiseScale);
            }
            add(b, "mean descent cosine ", meanCosine);
            b.deleteCharAt(mark);
            logger.info(b.toString());
            clearEpochFigures();
        }
    }

    @Override
    public void finished(Fit fit) {
        if (logger.isInfoEnabled()) {
            logger.info(String.format(Locale.ROOT, "[%s] finished: %s after %d steps (%s epochs), objective %s, %d ms",
                    label, fit.stopReason(), fit.steps(), figure(fit.epochs()), figure(fit.finalObjective()),
                    fit.wallTime().toMillis()));
        }
    }

    private static void add(StringBuilder b, String name, double value) {
        if (!Double.isNaN(value)) {
            b.append(", ").append(name).append(figure(value));
        }
    }

    /** Four significant digits, trailing zeros dropped, in {@link Locale#ROOT}: 0.0921, 212, 1.5e-07. */
    public static String figure(double v) {
        if (!Double.isFinite(v)) {
            return Double.toString(v);
        }
        if (v == Math.rint(v) && Math.abs(v) < 1e7) {
            return Long.toString((long) v);
        }
        String s = String.format(Locale.ROOT, "%.4g", v);
        int e = s.indexOf('e');
        String mantissa = e < 0 ? s : s.substring(0, e);
        if (mantissa.indexOf('.') >= 0) {
            int end = mantissa.length();
            while (mantissa.charAt(end - 1) == '0') {
                end--;
            }
            if (mantissa.charAt(end - 1) == '.') {
                end--;
            }
            mantissa = mantissa.substring(0, end);
        }
        return mantissa + (e < 0 ? "" : s.substring(e));
    }
}
