package dev.riskmin;

import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.sampling.Sampling;
import dev.riskmin.testing.LeastSquaresProblem;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

/** Same seed, same result, bit for bit; another seed, another path. */
class ReproducibilityTest {
    private static final LeastSquaresProblem PROBLEM = LeastSquaresProblem.gaussian(21, 400, 6, 0.4);

    static List<Minimizer.Builder> configurations() {
        return List.of(
                Minimizer.builder(),
                Minimizer.builder().updateRule(UpdateRule.adam()).sampling(Sampling.withReplacement()).batchSize(5),
                Minimizer.builder().updateRule(UpdateRule.saga()).penalty(Penalty.l1(1e-2)),
                Minimizer.builder().updateRule(UpdateRule.svrg()).sampling(Sampling.importance()).batchSize(3),
                Minimizer.builder().loss(Losses.huber(0.5)).averaging(Averaging.tail(0.5)).standardize(true));
    }

    @ParameterizedTest
    @MethodSource("configurations")
    void sameSeedGivesBitIdenticalParameters(Minimizer.Builder builder) {
        Minimizer a = builder.seed(1234).epochs(3).build();
        Fit first = a.fit(PROBLEM.data);
        Fit second = a.fit(PROBLEM.data);
        assertArrayEquals(first.parameters(), second.parameters(), 0.0);
        assertEquals(first.steps(), second.steps());
        Fit other = builder.seed(4321).epochs(3).build().fit(PROBLEM.data);
        assertFalse(java.util.Arrays.equals(first.parameters(), other.parameters()), "another seed, another path");
    }
}
