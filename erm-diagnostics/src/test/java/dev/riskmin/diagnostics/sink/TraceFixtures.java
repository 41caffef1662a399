package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.AngleEvent;
import dev.riskmin.diagnostics.Decision;
import dev.riskmin.diagnostics.DiagnosticEvent;
import dev.riskmin.diagnostics.LossEvent;
import dev.riskmin.diagnostics.NoiseEvent;
import dev.riskmin.diagnostics.StoppingEvent;
import dev.riskmin.diagnostics.VerdictEvent;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.diagnostics.verdict.HealthVerdict;
import dev.riskmin.testing.Cases;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.random.RandomGenerator;

/** Events for the sink tests: every kind, with the values that break naive writers. */
final class TraceFixtures {
    private static final String AWKWARD = "a \"quoted\", comma\nnew line\r\ncarriage\ttab \\ back = eq ; semi"
            + " \u0001\u001f\u007f é 漢字 \uD83D\uDE00 \u2028 \uFEFF end";

    private TraceFixtures() {
    }

    /** Every kind, with NaN, -0.0, 1e-300, the extreme doubles and text full of separators; no infinities. */
    static List<DiagnosticEvent> allKinds() {
        Map<String, Double> figures = new HashMap<>();
        figures.put("noiseScale", 14.2);
        figures.put("missing", Double.NaN);
        figures.put("negativeZero", -0.0);
        figures.put("tiny", 1e-300);
        figures.put("odd=name;with\\escapes", 2.5);
        return List.of(
                new NoiseEvent(1200, 3, 16, 0.231, 0.0144375, 0.0163, 14.2, 15),
                new NoiseEvent(0, 0, 1, Double.NaN, Double.NaN, 1e-300, Double.NaN, 1),
                new AngleEvent(40, 0, -0.0, 0.3125, 0.83, Double.NaN, Double.NaN),
                new AngleEvent(41, 0, Double.MIN_VALUE, -Double.MAX_VALUE, 1.0, 37.5, 1.5e-7),
                new LossEvent(7, 1, 0.5234567891234567, Double.NaN, 0.47, Double.NaN, 0.128, 0.05, 16),
                new LossEvent(Long.MAX_VALUE, Integer.MAX_VALUE, Double.MAX_VALUE, -1e-300, 0.1 + 0.2, -0.0,
                        Math.PI, Math.nextUp(1.0), Integer.MAX_VALUE),
                new StoppingEvent(300, 2, "norm test", 3.1, 1.0, Decision.GROW_BATCH, AWKWARD),
                new StoppingEvent(301, 2, "", Double.NaN, -0.0, Decision.STOP_AND_RESTORE, ""),
                new StoppingEvent(302, 2, null, 1e-300, 1e300, null, null),
                new VerdictEvent(4000, 10, new HealthVerdict(Condition.NOISE_DOMINATED, AWKWARD,
                        "raise the batch size to about 38, or \"not\"", figures)),
                new VerdictEvent(4001, 10, new HealthVerdict(Condition.CONVERGED, "", "nothing", Map.of())));
    }

    /** Events of random kinds with random bits for doubles (any NaN payload, no infinity) and random text. */
    static List<DiagnosticEvent> random(long seed, int count) {
        RandomGenerator rng = Cases.rng(seed);
        List<DiagnosticEvent> events = new ArrayList<>();
        for (int i = 0; i < count; i++) {
            long step = rng.nextLong(0, Long.MAX_VALUE);
            int epoch = rng.nextInt(0, Integer.MAX_VALUE);
            switch (rng.nextInt(5)) {
                case 0 -> events.add(new NoiseEvent(step, epoch, rng.nextInt(), real(rng), real(rng), real(rng),
                        real(rng), rng.nextInt()));
                case 1 -> events.add(new AngleEvent(step, epoch, real(rng), real(rng), real(rng), real(rng),
                        real(rng)));
                case 2 -> events.add(new LossEvent(step, epoch, real(rng), real(rng), real(rng), real(rng),
                        real(rng), real(rng), rng.nextInt()));
                case 3 -> events.add(new StoppingEvent(step, epoch, text(rng), real(rng), real(rng),
                        rng.nextInt(4) == 0 ? null : Decision.values()[rng.nextInt(Decision.values().length)],
                        text(rng)));
                default -> {
                    Map<String, Double> figures = new HashMap<>();
                    for (int k = rng.nextInt(4); k > 0; k--) {
                        String name = text(rng);
                        figures.put(name == null ? "x" : name, real(rng));
                    }
                    events.add(new VerdictEvent(step, epoch, new HealthVerdict(
                            Condition.values()[rng.nextInt(Condition.values().length)], text(rng), text(rng),
                            figures)));
                }
            }
        }
        return events;
    }

    private static double real(RandomGenerator rng) {
        return switch (rng.nextInt(8)) {
            case 0 -> Double.NaN;
            case 1 -> -0.0;
            case 2 -> rng.nextGaussian();
            default -> {
                double v = Double.longBitsToDouble(rng.nextLong());
                yield Double.isInfinite(v) ? 0.0 : v; // NaN payloads stay: records compare NaN as equal
            }
        };
    }

    /** Null, empty, or up to 12 characters drawn from separators, controls, surrogates and letters. */
    static String text(RandomGenerator rng) {
        int kind = rng.nextInt(10);
        if (kind == 0) {
            return null;
        }
        if (kind == 1) {
            return "";
        }
        String palette = ",\"\r\n\t\\=; {}:[]x\u0000\u0008\u000c\u001b\u007fé漢\u2028\u2029\uFEFF";
        StringBuilder b = new StringBuilder();
        for (int k = rng.nextInt(1, 13); k > 0; k--) {
            int pick = rng.nextInt(palette.length() + 3);
            if (pick < palette.length()) {
                b.append(palette.charAt(pick));
            } else if (pick == palette.length()) {
                b.append("\uD83D\uDE00"); // a surrogate pair
            } else {
                b.append(rng.nextBoolean() ? '\uD800' : '\uDC00'); // a lone surrogate
            }
        }
        return b.toString();
    }
}
