package dev.riskmin.spark;

import org.apache.spark.sql.SparkSession;

/**
 * The one local Spark session of this test JVM: two worker threads, no web UI, bound to the
 * loopback address only. Every test class of the module shares it (a session costs seconds to
 * start); it stops when the JVM exits.
 */
final class SharedSpark {
    private static SparkSession session;

    private SharedSpark() {
    }

    static synchronized SparkSession session() {
        if (session == null) {
            session = SparkSession.builder()
                    .master("local[2]")
                    .appName("riskmin-erm-spark-tests")
                    .config("spark.ui.enabled", "false")
                    .config("spark.ui.showConsoleProgress", "false")
                    .config("spark.driver.host", "127.0.0.1")
                    .config("spark.driver.bindAddress", "127.0.0.1")
                    .config("spark.sql.shuffle.partitions", "2")
                    .config("spark.default.parallelism", "2")
                    .config("spark.sql.warehouse.dir", "target/spark-warehouse")
                    .getOrCreate();
            SparkSession started = session;
            Runtime.getRuntime().addShutdownHook(new Thread(started::stop, "stop-shared-spark"));
        }
        return session;
    }
}
