package dev.riskmin.reliability;

import dev.riskmin.Fit;
import dev.riskmin.model.LinearModel;
import dev.riskmin.model.MulticlassModel;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.util.Arrays;
import java.util.regex.Pattern;

/**
 * The judgement of one hostile case against the reliability promise: it either fits with finite
 * parameters (and a model that predicts finite values) or is refused with an
 * {@link IllegalArgumentException} or {@link IllegalStateException} whose message names the
 * problem. Anything else is a failure.
 *
 * @param kind    fitted, refused or failed
 * @param label   the stop reason, the exception class, or the kind of failure (for the tally)
 * @param detail  for a failure, what went wrong with the case's description and the stack trace
 */
public record HostileOutcome(Kind kind, String label, String detail) {
    /** The three outcomes. */
    public enum Kind { FITTED, REFUSED, FAILED }

    /**
     * A message names the problem when it names an indexed entry ({@code x[3, 1]}, {@code weights[2]}),
     * an option with its value ({@code batchSize (0)}) or one of the words below. The list is the
     * vocabulary of the library's messages for the options and parts of the data a caller sets
     * (common practice, no source): a message with none of them names nothing the caller could fix.
     */
    private static final Pattern NAMES = Pattern.compile(
            "\\w+\\[-?\\d|\\w+ \\(|\\b(row|rows|column|columns|sample|stratum|strata|classes|class labels|features"
                    + "|targets|weights|labels|batch|step|stepSize|loss|sampling|averaging|held-out|heldOut"
                    + "|initialParameters|objective|budget|dimension|smoothness|parameters|penalty|epochs)\\b");

    static HostileOutcome fitted(String reason) {
        return new HostileOutcome(Kind.FITTED, reason, "");
    }

    static HostileOutcome refused(Throwable e) {
        return new HostileOutcome(Kind.REFUSED, e.getClass().getSimpleName(), "");
    }

    public static HostileOutcome failed(String label, HostileCase c, String what, Throwable e) {
        StringBuilder s = new StringBuilder();
        s.append("seed ").append(c.seed()).append(": ").append(what).append("\n    case: ").append(c.description());
        if (e != null) {
            StringWriter trace = new StringWriter();
            e.printStackTrace(new PrintWriter(trace));
            String[] lines = trace.toString().split("\n");
            s.append("\n    ").append(String.join("\n    ", Arrays.copyOf(lines, Math.min(lines.length, 12))));
        }
        return new HostileOutcome(Kind.FAILED, label, s.toString());
    }

    /** Runs the case and judges what it does. */
    public static HostileOutcome of(HostileCase c) {
        return of(c, fit -> null);
    }

    /**
     * Runs the case and judges what it does, with one more check of a returned fit.
     *
     * @param more says what else is wrong with a returned fit, or null
     */
    public static HostileOutcome of(HostileCase c, java.util.function.Function<Fit, String> more) {
        Fit fit;
        try {
            fit = c.run();
        } catch (IllegalArgumentException | IllegalStateException e) {
            return judgeRefusal(c, e);
        } catch (Throwable e) {
            return failed(e.getClass().getSimpleName(), c, "threw " + e, e);
        }
        String problem = problems(fit, c);
        if (problem == null) {
            problem = more.apply(fit);
        }
        if (problem != null) {
            return failed("bad fit", c, problem + " — " + fit, null);
        }
        return fitted(fit.stopReason().name());
    }

    private static HostileOutcome judgeRefusal(HostileCase c, RuntimeException e) {
        if (e.getClass() != IllegalArgumentException.class && e.getClass() != IllegalStateException.class) {
            return failed(e.getClass().getSimpleName(), c, "threw a subclass " + e, e);
        }
        String message = e.getMessage();
        if (message == null || message.isBlank()) {
            return failed("no message", c, "refused without a message", e);
        }
        StackTraceElement top = e.getStackTrace().length > 0 ? e.getStackTrace()[0] : null;
        if (top == null || !top.getClassName().startsWith("dev.riskmin.")
                || top.getClassName().startsWith("dev.riskmin.reliability.")) {
            return failed("not the library's", c, "the exception did not come from the library: " + e, e);
        }
        if (!NAMES.matcher(message).find()) {
            return failed("names nothing", c, "the message names nothing: " + message, e);
        }
        // A non-finite model built from finite inputs is the library's fault, not the caller's.
        if (message.startsWith("coefficients[") || message.startsWith("intercept is")
                || message.startsWith("intercepts[")) {
            return failed("non-finite model", c, "the fit built a non-finite model: " + message, e);
        }
        // The generator uses the library's own schedules, which must never give a non-finite step for
        // options they accepted (the fit loop's refusal is meant for a caller's broken schedule).
        if (message.contains("gave step size")) {
            return failed("schedule overflow", c, message, e);
        }
        return refused(e);
    }

    /** @return what is wrong with a returned fit, or null */
    static String problems(Fit fit, HostileCase c) {
        if (fit.stopReason() == null || fit.stopDetail() == null) {
            return "no stop reason or detail";
        }
        if (!allFinite(fit.parameters())) {
            return "non-finite parameters " + Arrays.toString(fit.parameters());
        }
        if (!allFinite(fit.lastIterate())) {
            return "non-finite last iterate " + Arrays.toString(fit.lastIterate());
        }
        double start = fit.initialObjective(); // exact here: n <= 50 rows is within the estimate's sample
        if (fit.stopReason() != dev.riskmin.StopReason.DIVERGED
                && !(fit.finalObjective() <= start + 10 * (Math.abs(start) + 1))) {
            return "the objective ended at " + fit.finalObjective() + " from " + start + " without DIVERGED";
        }
        if (c.sawNonFiniteView()) {
            return "a listener saw a non-finite batch loss or step size";
        }
        if (fit.hasModel()) {
            LinearModel m = fit.model();
            double[] zeros = new double[m.dimension()];
            double[] ones = new double[m.dimension()];
            Arrays.fill(ones, 1.0);
            if (!Double.isFinite(m.decisionValue(zeros)) || Double.isNaN(m.predict(zeros))
                    || Double.isNaN(m.decisionValue(ones)) || Double.isNaN(m.predict(ones))) {
                return "the model predicts NaN or a non-finite decision value on a finite row: " + m;
            }
        } else {
            try {
                MulticlassModel m = fit.multiclassModel();
                double[] zeros = new double[m.dimension()];
                double[] out = new double[m.classes()];
                int k = m.predictClass(zeros);
                if (k < 0 || k >= m.classes()) {
                    return "predicted class " + k + " of " + m.classes();
                }
                if (m.hasProbability()) {
                    m.probabilities(zeros, out);
                    if (!allFinite(out)) {
                        return "non-finite class probabilities " + Arrays.toString(out);
                    }
                }
            } catch (IllegalStateException notMulticlass) {
                // a general objective's fit has parameters only
            }
        }
        return null;
    }

    static boolean allFinite(double[] v) {
        for (double x : v) {
            if (!Double.isFinite(x)) {
                return false;
            }
        }
        return true;
    }
}
