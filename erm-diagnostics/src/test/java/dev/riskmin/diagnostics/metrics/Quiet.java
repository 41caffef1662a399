package dev.riskmin.diagnostics.metrics;

/** Keeps Micrometer's start-up DEBUG line off the test output (the tests' logback runs unconfigured, at DEBUG). */
final class Quiet {
    private Quiet() {
    }

    static void micrometer() {
        ((ch.qos.logback.classic.Logger) org.slf4j.LoggerFactory.getLogger("io.micrometer"))
                .setLevel(ch.qos.logback.classic.Level.INFO);
    }
}
