package dev.riskmin.diagnostics.report;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/** Invented events of every kind over 1,000 steps (100 steps per epoch), with NaNs where a figure is unmeasured. */
final class ReportFixtures {
    static final String HOSTILE = "</svg><script>alert('x')</script> & \"quoted\" <b>bold</b> ]]> -->";

    private ReportFixtures() {
    }

    static List<DiagnosticEvent> run() {
        List<DiagnosticEvent> events = new ArrayList<>();
        for (int t = 0; t <= 1000; t += 10) {
            int epoch = t / 100;
            double batch = 2 + Math.sin(t * 0.37) * 0.5 + 3 * Math.exp(-t / 150.0);
            double smooth = 2 + 3 * Math.exp(-t / 150.0);
            double objective = t % 100 == 0 ? 1.9 + 3 * Math.exp(-t / 150.0) : Double.NaN;
            double heldOut = t % 200 == 0 ? 2.1 + 3 * Math.exp(-t / 150.0) : Double.NaN;
            double norm = t % 100 == 0 ? Math.pow(10, -3.0 * t / 1000) : Double.NaN; // 1 down to 1e-3
            double step = t < 500 ? 0.1 : 0.05;
            int b = t < 500 ? 16 : 32;
            events.add(new LossEvent(t, epoch, batch, smooth, objective, heldOut, norm, step, b));
            if (t % 50 == 0) {
                double trace = 4 + Math.cos(t * 0.1);
                double g2 = 2 * Math.exp(-t / 200.0);
                events.add(new NoiseEvent(t, epoch, b, trace, trace / b, g2, t == 0 ? Double.NaN : trace / g2,
                        (int) Math.ceil(trace / g2)));
            }
            if (t % 20 == 0) {
                double c = t == 0 ? 1.0 : t == 20 ? -1.0 : Math.sin(t * 0.11);
                events.add(new AngleEvent(t, epoch, c, 0.3 + 0.1 * Math.sin(t), 0.5 + t / 4000.0, Double.NaN,
                        Double.NaN));
            }
            if (t > 0 && t % 100 == 0) {
                Decision d = t == 500 ? Decision.CUT_STEP : Decision.CONTINUE;
                events.add(new StoppingEvent(t, epoch, "pflug", 50 - t / 10.0, 0, d, "sum at step " + t));
                double best = 2.2 + 3 * Math.exp(-t / 150.0);
                events.add(new StoppingEvent(t, epoch, "held-out-worsening", best,
                        t == 100 ? Double.POSITIVE_INFINITY : best + 0.01,
                        t == 1000 ? Decision.STOP_AND_RESTORE : Decision.CONTINUE, "held-out at " + t));
            }
        }
        Map<String, Double> figures = new LinkedHashMap<>();
        figures.put("steps", 1000.0);
        figures.put("noiseScale", 14.25);
        figures.put("gradientNorm", 1e-3);
        figures.put("recentDecreaseError", Double.NaN);
        events.add(new VerdictEvent(1000, 10, new HealthVerdict(Condition.STILL_DESCENDING,
                "the objective was still falling", "double the budget, to about 20 epochs (2000 steps)", figures)));
        return events;
    }

    /** The finite (step, value) pairs of a figure over events of one type. */
    static <E extends DiagnosticEvent> List<double[]> finite(List<DiagnosticEvent> events, Class<E> type,
                                                             java.util.function.ToDoubleFunction<E> value) {
        List<double[]> rows = new ArrayList<>();
        for (DiagnosticEvent e : events) {
            if (type.isInstance(e)) {
                double v = value.applyAsDouble(type.cast(e));
                if (Double.isFinite(v)) {
                    rows.add(new double[] {e.step(), v});
                }
            }
        }
        return rows;
    }
}
