/**
 * The command line ({@link dev.riskmin.examples.cli.FitCommand}): fits a model to a CSV file and
 * writes the model, the trace and the report; see {@code docs/cli.md}. Arguments are parsed by
 * picocli, CSV by Apache Commons CSV. Classes here are not thread-safe; null is never a valid
 * argument.
 */
package dev.riskmin.examples.cli;
