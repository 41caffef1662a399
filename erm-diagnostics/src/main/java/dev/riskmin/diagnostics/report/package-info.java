/**
 * A report of one fit as a single self-contained HTML file with inline SVG plots:
 * {@link dev.riskmin.diagnostics.report.HtmlReport}, built from a
 * {@link dev.riskmin.diagnostics.sink.TraceRecorder} or a list of events, with the run's
 * {@link dev.riskmin.diagnostics.report.RunFacts} and its verdict. Null is never a valid argument;
 * the types are immutable.
 */
package dev.riskmin.diagnostics.report;
