/**
 * The health verdict on a run: a {@link dev.riskmin.diagnostics.verdict.RunSummary} of figures filled
 * as the fit goes, the {@link dev.riskmin.diagnostics.verdict.VerdictRules} that judge it, and the
 * resulting {@link dev.riskmin.diagnostics.verdict.HealthVerdict} with its condition, the figures
 * behind it and a concrete change to try. The summary is mutable and not thread-safe; verdicts are
 * immutable. Null is never a valid argument.
 */
package dev.riskmin.diagnostics.verdict;
