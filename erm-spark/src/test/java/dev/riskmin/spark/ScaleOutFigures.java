package dev.riskmin.spark;

import dev.riskmin.Fit;
import dev.riskmin.FitOptions;
import dev.riskmin.Minimizer;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.reference.NewtonSolver;
import dev.riskmin.step.StepSchedule;

import java.util.Locale;

/**
 * The figures of docs/scale-out.md: each strategy on a generated logistic problem in a local[2] session,
 * next to the in-memory minimizer doing the same work on the same rows, with the relative gap to the exact
 * optimum (Newton's method). Not a test: run it with
 * {@code mvn -B -q -pl erm-spark -am test-compile exec:java -Dexec.mainClass=dev.riskmin.spark.ScaleOutFigures
 * -Dexec.classpathScope=test [-Dexec.args="rows features partitions"]}.
 */
public final class ScaleOutFigures {
    private static final double L2 = 1e-3;

    private ScaleOutFigures() {
    }

    public static void main(String[] args) {
        int n = args.length > 0 ? Integer.parseInt(args[0]) : 200_000;
        int d = args.length > 1 ? Integer.parseInt(args[1]) : 20;
        int partitions = args.length > 2 ? Integer.parseInt(args[2]) : 8;
        LogisticRows rows = LogisticRows.generate(71, n, d, 0.5);
        double[] optimum = NewtonSolver.logistic().withL2(L2).solve(rows.dataset()).parameters();
        double best = LinearObjective.of(rows.dataset(), Losses.logistic(), Penalty.l2(L2), true).value(optimum);
        SharedSpark.session();
        long c0 = System.nanoTime();
        try (PartitionedData data = PartitionedData.of(rows.frame(partitions), rows.columns())) {
            long c1 = System.nanoTime();
            for (int k = 0; k < 5; k++) {
                data.blocks().count();
            }
            long e0 = System.nanoTime();
            for (int k = 0; k < 20; k++) {
                data.blocks().count();
            }
            long e1 = System.nanoTime();
            DistributedMinimizer objective = DistributedMinimizer.builder().loss(Losses::logistic).build();
            double[] zero = new double[d + 1];
            double[] g = new double[d + 1];
            for (int k = 0; k < 5; k++) {
                objective.gradient(data, zero, g);
            }
            long f0 = System.nanoTime();
            for (int k = 0; k < 20; k++) {
                objective.gradient(data, zero, g);
            }
            long f1 = System.nanoTime();
            LinearObjective local = LinearObjective.of(rows.dataset(), Losses.logistic(), Penalty.none(), true);
            for (int k = 0; k < 5; k++) {
                local.gradient(zero, g);
            }
            long m0 = System.nanoTime();
            for (int k = 0; k < 20; k++) {
                local.gradient(zero, g);
            }
            long m1 = System.nanoTime();
            System.out.printf(Locale.ROOT, "%d rows x %d features in %d partitions, local[2]; conversion %.0f ms; "
                    + "a job that only counts the cached blocks %.1f ms; a full gradient %.1f ms by tree aggregation, "
                    + "%.1f ms in memory; L* = %.6f%n%n", n, d, partitions, (c1 - c0) / 1e6, (e1 - e0) / 20e6,
                    (f1 - f0) / 20e6, (m1 - m0) / 20e6, best);
            System.out.println("| strategy | rounds | ms per round | of which the slowest partition computed | "
                    + "relative gap | in memory, same work: ms per round-equivalent | in-memory gap |");
            System.out.println("|---|---|---|---|---|---|---|");
            int perPartition = n / partitions;
            row(data, best, DistributedMinimizer.builder().loss(Losses::logistic).penalty(() -> Penalty.l2(L2))
                            .strategy(Strategy.miniBatch()).batchSize(n / 5)
                            .schedule(() -> StepSchedule.stepDecay(3.0, 0.5, 8)).rounds(50).seed(1).build(),
                    Minimizer.builder().loss(Losses.logistic()).penalty(Penalty.l2(L2)).batchSize(n / 5)
                            .schedule(StepSchedule.stepDecay(3.0, 0.5, 8)).maxSteps(50).seed(1).build(),
                    rows);
            int h = perPartition / 50;
            row(data, best, DistributedMinimizer.builder().loss(Losses::logistic).penalty(() -> Penalty.l2(L2))
                            .strategy(Strategy.localSgd(h)).batchSize(25)
                            .schedule(() -> StepSchedule.stepDecay(1.0, 0.5, 3L * h)).rounds(30).seed(1).build(),
                    Minimizer.builder().loss(Losses.logistic()).penalty(Penalty.l2(L2)).batchSize(25)
                            .schedule(StepSchedule.stepDecay(1.0, 0.5, 3L * h * partitions))
                            .maxSteps(30L * h * partitions).seed(1).build(),
                    rows);
            int m = perPartition / 20;
            row(data, best, DistributedMinimizer.builder().loss(Losses::logistic).penalty(() -> Penalty.l2(L2))
                            .strategy(Strategy.svrg(m)).batchSize(20).stepSize(0.05).rounds(10).seed(1).build(),
                    Minimizer.builder().loss(Losses.logistic()).penalty(Penalty.l2(L2)).batchSize(20)
                            .updateRule(UpdateRule.svrg()).stepSize(0.05).epochs(10).seed(1).build(),
                    rows);
        }
    }

    private static void row(PartitionedData data, double best, DistributedMinimizer distributed, Minimizer inMemory,
                            LogisticRows rows) {
        long[] slowest = new long[1];
        RoundListener partitions = new RoundListener() {
            @Override
            public void roundEnded(RoundReport report) {
                slowest[0] += report.slowestPartitionNanos();
            }
        };
        distributed.fit(data, FitOptions.none()); // warm-up: both paths are timed on their second run
        long t0 = System.nanoTime();
        Fit fit = distributed.fit(data, FitOptions.listeners(partitions));
        long t1 = System.nanoTime();
        inMemory.fit(rows.dataset());
        long t2 = System.nanoTime();
        Fit memory = inMemory.fit(rows.dataset());
        long t3 = System.nanoTime();
        System.out.printf(Locale.ROOT, "| %s | %d | %.1f | %.1f | %.1e | %.2f | %.1e |%n", distributed.strategy().name(),
                fit.steps(), (t1 - t0) / 1e6 / fit.steps(), slowest[0] / 1e6 / fit.steps(),
                (fit.finalObjective() - best) / best, (t3 - t2) / 1e6 / fit.steps(),
                (memory.finalObjective() - best) / best);
    }
}
