package dev.riskmin.diagnostics.reliability;

import dev.riskmin.diagnostics.Diagnostics;
import dev.riskmin.diagnostics.EventListener;
import dev.riskmin.diagnostics.estimator.AngleMonitor;
import dev.riskmin.diagnostics.estimator.LossMonitor;
import dev.riskmin.diagnostics.estimator.NoiseMonitor;
import dev.riskmin.diagnostics.estimator.OscillationMonitor;

/** The monitors of {@link Diagnostics#standard()}, without its SLF4J reporters (the tests keep the console quiet). */
final class Monitors {
    private Monitors() {
    }

    static Diagnostics standardWith(EventListener... subscribers) {
        Diagnostics.Builder b = Diagnostics.builder().monitor(NoiseMonitor.defaults()).monitor(AngleMonitor.defaults())
                .monitor(LossMonitor.defaults()).monitor(OscillationMonitor.defaults());
        for (EventListener s : subscribers) {
            b.subscribe(s);
        }
        return b.build();
    }
}
