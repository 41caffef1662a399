package dev.riskmin.examples.bench;

import dev.riskmin.Fit;
import dev.riskmin.Minimizer;
import dev.riskmin.data.Dataset;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.Averaging;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.objective.LinearObjective;
import dev.riskmin.penalty.Penalty;
import dev.riskmin.reference.LeastSquares;
import dev.riskmin.reference.LeastSquaresSolution;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * Figure 3: time to 10<sup>−4</sup> relative suboptimality on least squares against the exact QR
 * solve. Data: n = 10<sup>6</sup>, d = 100 standard-normal features, y = x·β + e with
 * β<sub>j</sub> ~ N(0, 1/d) and e ~ N(0, 1) (signal and noise of equal variance, so L* ≈ ½ and
 * L(0) − L* ≈ ½: the relative suboptimality (L(h) − L*)/|L*| used here is within a factor of about
 * one of (L(h) − L*)/(L(0) − L*)). L* is the objective at the QR solution ({@link LeastSquares},
 * Householder QR through EJML), first timed after a small warm-up solve.
 *
 * <p>Each candidate rule runs on a ladder of budgets (¼, ½, ¾, 1, 1½, 2, 3, … epochs); every rung
 * is a complete timed fit without listeners, checked afterwards by the objective the fit itself
 * computes at its result ({@link Fit#finalObjective()}), so no checking cost is inside the time.
 * The first rung that reaches the tolerance is repeated; its median time over the first QR time is
 * the candidate's row. The best candidate then runs three more rounds, each a QR solve followed by
 * the fit, and the median of those paired ratios is the target row (≤ 0.1). A ladder stops once a
 * fit takes 0.4 × the QR time (four times the target: the candidate cannot pass). Every candidate is
 * reported.
 */
final class TimeToAccuracy {
    static final double TOLERANCE = 1e-4;
    private static final Target TARGET = Target.atMost(0.1);
    private static final double[] LADDER = {0.25, 0.5, 0.75, 1, 1.5, 2, 3, 4, 5, 6, 8, 10, 12, 16};
    private static final double GIVE_UP_RATIO = 0.4;

    private TimeToAccuracy() {
    }

    /** A rule and its settings, as tried. */
    private record Candidate(String name, Minimizer.Builder builder) {
    }

    static List<ResultRow> run(BenchSettings s) {
        int n = s.quick() ? 20_000 : 1_000_000;
        int d = s.quick() ? 20 : 100;
        double[] x = SyntheticData.gaussian(n * d, 3);
        double[] y = SyntheticData.targets(x, n, d, SyntheticData.plantedCoefficients(d, 3), 1.0, false, 3);
        Dataset data = Dataset.builder().flatFeatures(x, n, d, false).targets(y).build();

        warmUpQr(d);
        long start = System.nanoTime();
        LeastSquaresSolution exact = LeastSquares.withIntercept().solve(data);
        double qr = System.nanoTime() - start;
        LinearObjective objective = LinearObjective.of(data, Losses.squared(), Penalty.none(), true);
        double lStar = objective.value(exact.parameters());
        Timing.log("[3] n=%d d=%d: QR %s, L* = %.10g", n, d, Timing.duration(qr), lStar);

        double lMax = 0;
        for (int i = 0; i < n; i++) {
            lMax = Math.max(lMax, objective.sampleSmoothness(i));
        }
        List<Candidate> candidates = List.of(
                new Candidate("saga, default step 1/(3 Lmax)", base().updateRule(UpdateRule.saga())),
                new Candidate("svrg, default step 0.1/Lmax", base().updateRule(UpdateRule.svrg())),
                new Candidate("svrg, step 1/(4 Lmax)", base().updateRule(UpdateRule.svrg()).stepSize(0.25 / lMax)),
                // Constant step 1/(4R²), R² = E‖(x, 1)‖² = d + 1, with averaging: Bach & Moulines, NIPS 2013.
                new Candidate("sgd + Polyak-Ruppert, step 1/(4(d+1))", base().updateRule(UpdateRule.sgd())
                        .stepSize(0.25 / (d + 1)).averaging(Averaging.polyakRuppert())));

        List<ResultRow> rows = new ArrayList<>();
        ResultRow best = null;
        Minimizer bestMinimizer = null;
        for (Candidate c : candidates) {
            ResultRow row = ladder(c, data, lStar, qr, s);
            rows.add(row);
            if (!Double.isNaN(row.ratio()) && (best == null || row.ratio() < best.ratio())) {
                best = row;
                bestMinimizer = c.builder().build(); // the builder still holds the rung that reached the tolerance
            }
        }
        List<ResultRow> out = new ArrayList<>();
        if (best == null) {
            out.add(ResultRow.unavailable("3 time to 1e-4 / QR (best)", "no candidate reached 1e-4", TARGET,
                    "every ladder stopped at " + GIVE_UP_RATIO + " x QR"));
        } else {
            out.add(paired(best, bestMinimizer, data, lStar, s));
        }
        out.addAll(rows);
        return out;
    }

    /**
     * The target row: rounds of (QR solve, best fit) one right after the other, the median of the
     * paired ratios; a burst of load from other processes during one solve then moves one ratio,
     * not the figure.
     */
    private static ResultRow paired(ResultRow best, Minimizer m, Dataset data, double lStar, BenchSettings s) {
        int rounds = s.quick() ? 1 : 3;
        double[] solves = new double[rounds];
        double[] fits = new double[rounds];
        double worst = 0;
        for (int r = 0; r < rounds; r++) {
            long start = System.nanoTime();
            LeastSquares.withIntercept().solve(data);
            solves[r] = System.nanoTime() - start;
            start = System.nanoTime();
            Fit fit = m.fit(data);
            fits[r] = System.nanoTime() - start;
            worst = Math.max(worst, (fit.finalObjective() - lStar) / Math.abs(lStar));
        }
        double ratio = Timing.pairedRatio(fits, solves);
        Timing.log("[3] best, paired with the QR solve: fit %s, QR %s, ratio %.3f", Timing.duration(Timing.median(fits)),
                Timing.duration(Timing.median(solves)), ratio);
        String rule = best.id().substring(2);
        return new ResultRow("3 time to 1e-4 / QR (best)", Timing.duration(Timing.median(fits)) + ", " + rule,
                "QR " + Timing.duration(Timing.median(solves)), ratio, TARGET,
                String.format(Locale.ROOT, "%d paired rounds; relative suboptimality %.2g", rounds, worst));
    }

    private static Minimizer.Builder base() {
        return Minimizer.builder().loss(Losses.squared()).standardize(false).seed(7);
    }

    private static ResultRow ladder(Candidate c, Dataset data, double lStar, double qr, BenchSettings s) {
        String id = "3 " + c.name();
        for (double epochs : LADDER) {
            Minimizer m = c.builder().epochs(epochs).build();
            long start = System.nanoTime();
            Fit fit = m.fit(data);
            double t = System.nanoTime() - start;
            double rel = (fit.finalObjective() - lStar) / Math.abs(lStar);
            Timing.log("[3] %s, %s epochs: %s, relative suboptimality %.3g", c.name(), fmt(epochs),
                    Timing.duration(t), rel);
            if (rel <= TOLERANCE) {
                double[] times = new double[s.repetitions()];
                times[0] = t;
                double worst = rel;
                for (int r = 1; r < times.length; r++) {
                    start = System.nanoTime();
                    Fit again = m.fit(data);
                    times[r] = System.nanoTime() - start;
                    worst = Math.max(worst, (again.finalObjective() - lStar) / Math.abs(lStar));
                }
                double median = Timing.median(times);
                return new ResultRow(id, Timing.duration(median) + " (" + fmt(epochs) + " epochs)",
                        "QR " + Timing.duration(qr), median / qr, null,
                        String.format(Locale.ROOT, "relative suboptimality %.2g", worst));
            }
            if (t > GIVE_UP_RATIO * qr) {
                return ResultRow.unavailable(id, "not reached", null, String.format(Locale.ROOT,
                        "%.2g after %s epochs (%s)", rel, fmt(epochs), Timing.duration(t)));
            }
        }
        return ResultRow.unavailable(id, "not reached", null, "not within " + fmt(LADDER[LADDER.length - 1])
                + " epochs");
    }

    /** Compiles EJML's QR on a small problem so the timed solve runs compiled code. */
    private static void warmUpQr(int d) {
        int n = 20 * d;
        double[] x = SyntheticData.gaussian(n * d, 11);
        double[] y = SyntheticData.targets(x, n, d, SyntheticData.plantedCoefficients(d, 11), 1.0, false, 11);
        Dataset small = Dataset.builder().flatFeatures(x, n, d, false).targets(y).build();
        for (int k = 0; k < 3; k++) {
            LeastSquares.withIntercept().solve(small);
        }
    }

    private static String fmt(double v) {
        return v == Math.rint(v) ? Long.toString((long) v) : Double.toString(v);
    }
}
