package dev.riskmin.diagnostics.metrics;

/**
 * Keeps Micrometer's own log lines off the test output: its start-up DEBUG line (the tests' logback
 * runs unconfigured, at DEBUG) and the WARN it logs when a test registers a meter twice on purpose.
 */
final class Quiet {
    private Quiet() {
    }

    static void micrometer() {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger("io.micrometer"))
                .setLevel(ch.qos.logback.classic.Level.ERROR);
    }
}
