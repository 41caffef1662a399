package dev.riskmin.diagnostics.stopping;

import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.StepContext;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.hook.StepView;

import java.util.Locale;

/** What every stopping test does the same way: publish its evaluation, and halt with its name on record. */
final class Stops {
    private Stops() {
    }

    static void publish(StepContext context, String test, double statistic, double threshold, Decision decision,
                        String detail) {
        StepView view = context.view();
        context.publish(new StoppingEvent(view.step(), view.epoch(), test, statistic, threshold, decision, detail));
    }

    /** Halts the fit; the summary names the first test that asked. */
    static void halt(StepContext context, String test, StopReason reason, String detail) {
        if (context.control().halt(reason, detail)) {
            context.summary().stoppedBy = test;
        }
    }

    static String fmt(String pattern, Object... args) {
        return String.format(Locale.ROOT, pattern, args);
    }

    static double dot(double[] a, double[] b, int p) {
        double s = 0;
        for (int j = 0; j < p; j++) {
            s += a[j] * b[j];
        }
        return s;
    }
}
