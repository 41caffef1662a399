package dev.riskmin.spark;

import dev.riskmin.CancellationToken;
import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.StopReason;
import dev.riskmin.hook.FitControl;
import dev.riskmin.hook.FitListener;
import dev.riskmin.hook.StepView;
import dev.riskmin.loss.Losses;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * The driver keeps the core's contract for steering a fit (dev.riskmin.hook.FitControl and StopReason): a
 * halt keeps the parameters the round started from, a diverging round stops with the last finite
 * parameters, a cancelled token stops before the next round.
 */
class RoundControlTest {
    private static final LogisticRows ROWS = LogisticRows.generate(81, 4_000, 4);
    private static PartitionedData data;

    @BeforeAll
    static void convert() {
        data = PartitionedData.of(ROWS.frame(2), ROWS.columns());
    }

    @AfterAll
    static void release() {
        data.close();
    }

    @Test
    void aHaltKeepsTheParametersTheRoundStartedFrom() {
        double[] seen = new double[5];
        FitListener haltAtRoundTwo = new FitListener() {
            @Override
            public void step(StepView view, FitControl control) {
                if (view.step() == 2) {
                    view.copyParameters(seen);
                    control.halt(StopReason.HALTED, "enough");
                }
            }
        };
        for (Strategy strategy : new Strategy[] {Strategy.miniBatch(), Strategy.localSgd(10), Strategy.svrg(10)}) {
            Fit fit = DistributedMinimizer.builder().loss(Losses::logistic).strategy(strategy).batchSize(40)
                    .stepSize(0.1).rounds(10).build().fit(data, FitOptions.listeners(haltAtRoundTwo));
            assertEquals(StopReason.HALTED, fit.stopReason(), strategy.name());
            assertEquals(2, fit.steps(), strategy.name());
            assertArrayEquals(seen, fit.parameters(), strategy.name());
        }
    }

    @Test
    void divergingRoundsStopWithFiniteParameters() {
        for (Strategy strategy : new Strategy[] {Strategy.miniBatch(), Strategy.localSgd(50)}) {
            Fit fit = DistributedMinimizer.builder().loss(Losses::squared).strategy(strategy).batchSize(40)
                    .stepSize(50.0).rounds(200).build().fit(data, FitOptions.none());
            assertEquals(StopReason.DIVERGED, fit.stopReason(), strategy.name() + ": " + fit.stopDetail());
            for (double v : fit.parameters()) {
                assertTrue(Double.isFinite(v), strategy.name());
            }
        }
    }

    @Test
    void aCancelledTokenStopsBeforeTheNextRound() {
        CancellationToken token = new CancellationToken();
        token.cancel();
        Fit fit = DistributedMinimizer.builder().loss(Losses::logistic).rounds(10).build()
                .fit(data, FitOptions.builder().cancellation(token).build());
        assertEquals(StopReason.CANCELLED, fit.stopReason());
        assertEquals(0, fit.steps());
        assertEquals(fit.initialObjective(), fit.finalObjective(), 0.0);
    }
}
