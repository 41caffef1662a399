package dev.riskmin.diagnostics.stopping;

import ch.qos.logback.classic.Level;
import ch.qos.logback.classic.Logger;
import dev.riskmin.diagnostics.Diagnostics;
import org.slf4j.LoggerFactory;

/** Silences the host's WARN about a detached monitor while a test provokes it on purpose. */
final class QuietHost implements AutoCloseable {
    private final Logger logger = (Logger) LoggerFactory.getLogger(Diagnostics.class);
    private final Level previous = logger.getLevel();

    QuietHost() {
        logger.setLevel(Level.OFF);
    }

    @Override
    public void close() {
        logger.setLevel(previous);
    }
}
