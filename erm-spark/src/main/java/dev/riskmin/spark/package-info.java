/**
 * The minimizers and diagnostics of riskmin over data held by Spark: a {@link dev.riskmin.spark.DistributedMinimizer}
 * fits a single-output linear model to the rows of a Spark {@code Dataset<Row>} or {@code JavaRDD<Row>}, converted
 * once into cached blocks of the core's dense layout ({@link dev.riskmin.spark.PartitionedData}), by one of three
 * {@link dev.riskmin.spark.Strategy strategies}, and returns the core's {@link dev.riskmin.Fit}. The driver runs
 * the core's listeners and stopping tests ({@link dev.riskmin.hook}) over rounds; nothing a listener holds is
 * ever serialized.
 *
 * <p>Null policy: no argument may be null unless its documentation says so. Thread safety: configurations
 * ({@code DistributedMinimizer}, {@code Strategy}, {@code Columns}, {@code Recipe}s) are immutable; a
 * {@code PartitionedData} may serve several fits, also at the same time; each fit's state lives in its own
 * driver loop.
 */
package dev.riskmin.spark;
