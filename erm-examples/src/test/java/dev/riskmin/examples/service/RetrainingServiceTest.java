package dev.riskmin.examples.service;

import dev.riskmin.Minimizer;
import dev.riskmin.StopReason;
import dev.riskmin.diagnostics.verdict.Condition;
import dev.riskmin.loss.Losses;
import dev.riskmin.method.UpdateRule;
import dev.riskmin.model.LinearModel;
import dev.riskmin.model.ModelFile;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.FileTime;
import java.time.Duration;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The retraining service publishes converged models only, and leaves no thread behind. */
class RetrainingServiceTest {
    private static final Duration WAIT = Duration.ofSeconds(30);
    private static final int ROWS = 4000;

    @TempDir
    Path dir;

    @AfterEach
    void noSchedulerThreadIsLeft() throws InterruptedException {
        // close() waits for the thread to end; allow the thread a moment to leave the run queue.
        long deadline = System.nanoTime() + Duration.ofSeconds(5).toNanos();
        while (!schedulerThreads().isEmpty() && System.nanoTime() < deadline) {
            Thread.sleep(10);
        }
        assertEquals(List.of(), schedulerThreads(), "threads left behind");
    }

    private static List<String> schedulerThreads() {
        return Thread.getAllStackTraces().keySet().stream()
                .filter(Thread::isAlive)
                .map(Thread::getName)
                .filter(n -> n.startsWith(RetrainingService.THREAD_PREFIX))
                .toList();
    }

    private RetrainingService.Builder service(String name, Minimizer minimizer, int rounds) {
        return RetrainingService.builder()
                .name(name)
                .minimizer(minimizer)
                .data(k -> RetrainingDemo.crossings(k, ROWS, 3))
                .publishTo(dir.resolve("models").resolve("delay.model"))
                .every(Duration.ofMillis(20))
                .rounds(rounds);
    }

    @Test
    void aSoundConfigurationPublishesEveryRoundAndTracksTheDrift() throws Exception {
        try (RetrainingService s = service("sound", RetrainingDemo.sound(), 3).build()) {
            s.start();
            assertTrue(s.awaitRounds(3, WAIT), "three rounds");
            List<Round> rounds = s.rounds();
            assertEquals(3, rounds.size());
            for (Round r : rounds) {
                assertEquals(Condition.CONVERGED, r.condition(), r.summary());
                assertTrue(r.published(), "round " + r.number());
                assertEquals(s.modelFile(), r.model());
            }
            LinearModel published = ModelFile.defaults().readLinear(s.modelFile());
            // The last round's data were generated with wind effect 0.7 and noise 2 on 3,200 rows: the
            // least-squares standard error of that coefficient is about 2/(sqrt(3200) x 3.46) = 0.01.
            assertEquals(RetrainingDemo.windEffect(3), published.coefficient(0), 0.05);
            assertTrue(Math.abs(published.coefficient(0) - RetrainingDemo.windEffect(1)) > 0.15,
                    "the published model is the latest round's, not the first's");
        }
    }

    @Test
    void aStepTooLargeIsRefusedAndThePreviousModelStaysUntouched() throws Exception {
        try (RetrainingService sound = service("first", RetrainingDemo.sound(), 1).build()) {
            sound.start();
            assertTrue(sound.awaitRounds(1, WAIT));
            assertTrue(sound.rounds().get(0).published(), sound.rounds().get(0).summary());
        }
        Path model = dir.resolve("models").resolve("delay.model");
        byte[] before = Files.readAllBytes(model);
        FileTime modified = Files.getLastModifiedTime(model);
        try (RetrainingService bad = service("step-too-large", RetrainingDemo.stepTooLarge(), 2).build()) {
            bad.start();
            assertTrue(bad.awaitRounds(2, WAIT));
            for (Round r : bad.rounds()) {
                assertFalse(r.published(), "round " + r.number());
                assertNull(r.model());
                assertEquals(Condition.DIVERGED, r.condition(), r.summary());
                assertTrue(r.advice().contains("cut the step size"), r.advice());
            }
        }
        assertArrayEquals(before, Files.readAllBytes(model), "the published file's content");
        assertEquals(modified, Files.getLastModifiedTime(model), "the published file was not rewritten");
        try (var files = Files.list(model.getParent())) {
            assertEquals(List.of(model), files.toList(), "no temporary file left beside the model");
        }
    }

    @Test
    void aBudgetTooShortIsRefused() throws Exception {
        Minimizer tooShort = Minimizer.builder().loss(Losses.squared()).updateRule(UpdateRule.sgd())
                .standardize(true).maxSteps(20).seed(11).build();
        try (RetrainingService s = service("too-short", tooShort, 1).build()) {
            s.start();
            assertTrue(s.awaitRounds(1, WAIT));
            Round r = s.rounds().get(0);
            assertEquals(StopReason.STEP_BUDGET, r.stopReason());
            assertNotEquals(Condition.CONVERGED, r.condition(), r.summary());
            assertFalse(r.published());
            assertFalse(Files.exists(s.modelFile()), "nothing was ever published");
        }
    }

    @Test
    void closeCancelsARunningFitWhichIsNotPublished() throws Exception {
        Minimizer endless = Minimizer.builder().loss(Losses.squared()).updateRule(UpdateRule.saga())
                .standardize(true).epochs(1_000_000).seed(11).build();
        RetrainingService s = service("endless", endless, 1).build();
        s.start();
        Thread.sleep(200); // the fit is under way
        long start = System.nanoTime();
        s.close();
        long millis = (System.nanoTime() - start) / 1_000_000;
        assertTrue(s.terminated(), "the scheduler ended");
        assertTrue(millis < 5000, "close took " + millis + " ms");
        Round r = s.rounds().get(0);
        assertEquals(StopReason.CANCELLED, r.stopReason());
        assertFalse(r.published());
        assertFalse(Files.exists(s.modelFile()));
        s.close(); // idempotent
        assertThrows(IllegalStateException.class, s::start);
    }

    @Test
    void aFailingRoundIsRecordedAndTheScheduleGoesOn() throws Exception {
        try (RetrainingService s = service("flaky", RetrainingDemo.sound(), 2)
                .data(k -> {
                    if (k == 1) {
                        throw new IllegalStateException("the data store is down");
                    }
                    return RetrainingDemo.crossings(k, ROWS, 3);
                })
                .build()) {
            s.start();
            assertTrue(s.awaitRounds(2, WAIT));
            Round failed = s.rounds().get(0);
            assertFalse(failed.published());
            assertNull(failed.condition());
            assertTrue(failed.summary().contains("the data store is down"), failed.summary());
            assertTrue(s.rounds().get(1).published(), s.rounds().get(1).summary());
        }
    }

    @Test
    void theConfigurationIsChecked() throws IOException {
        IllegalArgumentException missing = assertThrows(IllegalArgumentException.class,
                () -> RetrainingService.builder().minimizer(RetrainingDemo.sound()).build());
        assertEquals("data is not set", missing.getMessage());
        assertThrows(IllegalArgumentException.class, () -> RetrainingService.builder().every(Duration.ZERO));
        assertThrows(IllegalArgumentException.class, () -> RetrainingService.builder().name("no spaces"));
        // A service built but never started has no thread to leave behind.
        service("idle", RetrainingDemo.sound(), 1).build().close();
    }
}
