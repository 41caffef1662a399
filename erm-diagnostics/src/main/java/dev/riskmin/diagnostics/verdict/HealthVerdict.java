package dev.riskmin.diagnostics.verdict;

import java.util.Map;

/**
 * A plain-language judgement of a run: its {@link Condition}, one sentence saying why with the
 * figures behind it, and the concrete change to try. Immutable.
 *
 * @param condition the state found
 * @param summary   why, in words, with figures
 * @param advice    what to change (e.g. "raise the batch size to about 240"), or "nothing" when converged
 * @param figures   the named figures the judgement used (read only)
 */
public record HealthVerdict(Condition condition, String summary, String advice, Map<String, Double> figures) {
    public HealthVerdict {
        figures = Map.copyOf(figures);
    }

    @Override
    public String toString() {
        return condition + ": " + summary + " Advice: " + advice;
    }
}
