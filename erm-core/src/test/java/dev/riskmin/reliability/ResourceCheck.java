package dev.riskmin.reliability;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.stream.Collectors;
import java.util.stream.Stream;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

/**
 * A snapshot of the live threads and open file descriptors, to check that a scenario leaves none
 * behind. Threads the JVM or the test runner start on their own are ignored (listed by name:
 * reference handling, cleaners, the common fork-join pool, the process reaper, attach and JFR
 * threads, the runner's own); everything else that outlives the scenario is a leak. File
 * descriptors are counted in {@code /proc/self/fd} (Linux); where it is absent the count is -1 and
 * not compared. Take the snapshot after a warm-up run of the scenario: loading classes may open jar
 * files once, for good.
 */
public final class ResourceCheck {
    private static final List<String> JVM_THREADS = List.of("Reference Handler", "Finalizer", "Signal Dispatcher",
            "Common-Cleaner", "Notification Thread", "Attach Listener", "process reaper", "ForkJoinPool.commonPool",
            "surefire", "JFR", "Service Thread", "Monitor Deflation", "C1 ", "C2 ", "Sweeper", "VM ");
    private static final Path FDS = Path.of("/proc/self/fd");

    private final Set<Thread> threads;
    private final long descriptors;

    private ResourceCheck(Set<Thread> threads, long descriptors) {
        this.threads = threads;
        this.descriptors = descriptors;
    }

    /** @return the threads and descriptors open now */
    public static ResourceCheck snapshot() {
        return new ResourceCheck(liveThreads(), openFileDescriptors());
    }

    /** @return the live threads that are not the JVM's or the runner's own */
    public static Set<Thread> liveThreads() {
        return Thread.getAllStackTraces().keySet().stream().filter(t -> t.isAlive() && !jvmThread(t))
                .collect(Collectors.toCollection(HashSet::new));
    }

    private static boolean jvmThread(Thread t) {
        String name = t.getName();
        return JVM_THREADS.stream().anyMatch(name::startsWith);
    }

    /** @return the number of open file descriptors of this process, or -1 where /proc is absent */
    public static long openFileDescriptors() {
        if (!Files.isDirectory(FDS)) {
            return -1;
        }
        try (Stream<Path> entries = Files.list(FDS)) {
            return entries.count();
        } catch (IOException e) {
            return -1;
        }
    }

    /** @return whether descriptors can be counted here */
    public static boolean canCountDescriptors() {
        return openFileDescriptors() >= 0;
    }

    /**
     * Waits up to 5 s for threads started since the snapshot to end, then asserts that none is left
     * and that no more descriptors are open than at the snapshot.
     */
    public void assertNothingLeft(String scenario) throws InterruptedException {
        Set<Thread> extra = liveThreads();
        extra.removeAll(threads);
        long deadline = System.nanoTime() + 5_000_000_000L;
        for (Thread t : extra) {
            t.join(Math.max(1, (deadline - System.nanoTime()) / 1_000_000));
        }
        extra.removeIf(t -> !t.isAlive());
        assertTrue(extra.isEmpty(), scenario + " left threads behind: "
                + extra.stream().map(Thread::getName).collect(Collectors.toList()));
        if (descriptors >= 0) {
            assertEquals(descriptors, openFileDescriptors(), scenario + ": open file descriptors before and after");
        }
    }

    /** @return the number of threads (not the JVM's) in the snapshot */
    public int threadCount() {
        return threads.size();
    }

    /** @return the descriptors open at the snapshot, or -1 */
    public long descriptors() {
        return descriptors;
    }
}
