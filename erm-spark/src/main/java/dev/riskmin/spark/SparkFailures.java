package dev.riskmin.spark;

/**
 * Turns the failure of a Spark job back into the error it stands for. An executor that rejects its
 * input throws an {@link IllegalArgumentException} naming the partition, row and column; Spark
 * delivers it to the driver wrapped in a job failure, whose own message buries it. The driver
 * rethrows the innermost such error (same class, same message) with the job failure as its cause.
 */
final class SparkFailures {
    private SparkFailures() {
    }

    /** @return the exception to throw on the driver for a failed job */
    static RuntimeException rethrow(Exception failure) {
        for (Throwable t = failure; t != null; t = t.getCause()) {
            if (t instanceof IllegalArgumentException) {
                return new IllegalArgumentException(t.getMessage(), failure);
            }
            if (t instanceof IllegalStateException) {
                return new IllegalStateException(t.getMessage(), failure);
            }
            if (t.getCause() == t) {
                break;
            }
        }
        if (failure instanceof RuntimeException runtime) {
            return runtime;
        }
        return new IllegalStateException("a Spark job of the distributed fit failed: " + failure, failure);
    }
}
