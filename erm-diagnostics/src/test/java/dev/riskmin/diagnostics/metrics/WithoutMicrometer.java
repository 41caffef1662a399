package dev.riskmin.diagnostics.metrics;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.sink.CsvTraceWriter;
import dev.riskmin.diagnostics.sink.JsonLinesTraceWriter;
import dev.riskmin.diagnostics.sink.TraceRecorder;
import dev.riskmin.diagnostics.stopping.GradientNormCriterion;
import dev.riskmin.testing.LeastSquaresProblem;

import java.io.StringWriter;

/**
 * A fit with the standard diagnostics, a stopping test and every sink but the bridge, run by
 * {@link OptionalMicrometerTest} inside a class loader that has no Micrometer. It must itself refer
 * to no Micrometer class.
 */
public final class WithoutMicrometer {
    private WithoutMicrometer() {
    }

    /** @return "steps events csvChars jsonChars failures condition" of the fit */
    public static String run() {
        // The standard reporter logs at INFO; the isolated logback would print it.
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger(org.slf4j.Logger.ROOT_LOGGER_NAME))
                .setLevel(ch.qos.logback.classic.Level.OFF);
        LeastSquaresProblem problem = LeastSquaresProblem.gaussian(3, 500, 3, 0.3);
        TraceRecorder recorder = TraceRecorder.unbounded();
        StringWriter csv = new StringWriter();
        StringWriter json = new StringWriter();
        Diagnostics diagnostics = Diagnostics.standard()
                .monitor(GradientNormCriterion.defaults())
                .subscribe(recorder)
                .subscribe(CsvTraceWriter.to(csv))
                .subscribe(JsonLinesTraceWriter.to(json))
                .build();
        Fit fit = Minimizer.builder().batchSize(4).epochs(3).seed(1).build()
                .fit(problem.data, FitOptions.listeners(diagnostics));
        return fit.steps() + " " + recorder.events().size() + " " + csv.toString().length() + " "
                + json.toString().length() + " " + (diagnostics.failures().size() + fit.listenerFailures().size())
                + " " + diagnostics.verdict().condition();
    }
}
