package dev.riskmin.objective;

import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicReference;
import java.util.concurrent.locks.LockSupport;

/**
 * The worker threads of one fit's parallel batch gradient: T − 1 daemon threads named
 * {@code riskmin-gradient-1} … {@code riskmin-gradient-(T−1)}, which, together with the calling
 * thread, evaluate the T contiguous chunks of a large batch at once (see
 * {@link LinearObjective#batchGradient}). Chunk c is always evaluated into its own buffer and the
 * buffers are summed in the fixed order 0, 1, …, T − 1, so the result does not depend on which
 * thread finishes first: the same inputs give the same bits on every run. (Splitting a sum into
 * per-thread partial sums combined in a fixed order is common practice, no source.)
 *
 * <p>Hand-off without allocation: the caller publishes the work by incrementing a volatile
 * generation counter and unparking the workers ({@link LockSupport}); each worker spins briefly,
 * then parks, until the counter moves; it counts itself done on an {@link AtomicInteger} and the
 * last one unparks the caller. Nothing is allocated per batch.
 *
 * <p>Lifecycle: the threads start lazily, at the first parallel batch, and stop at {@link #close()}
 * (which waits for them to end). A {@code Minimizer} creates one instance per fit and closes it in
 * a {@code finally} block, whether the fit ends normally, diverges or throws. An exception thrown
 * in a worker's chunk is rethrown on the calling thread (unchecked exceptions and errors as they
 * are, anything else wrapped in an {@link IllegalStateException}) after every chunk has finished,
 * so a failing worker never leaves the fit waiting. A worker thread that dies is detected within a
 * millisecond and reported as an {@link IllegalStateException}.
 *
 * <p>Not thread-safe: one fit (one calling thread) at a time, like the objective that uses it.
 */
public final class GradientThreads implements AutoCloseable {
    /** The largest number of threads accepted. */
    public static final int MAX_THREADS = 64;
    /** The default smallest batch that is split across threads. */
    public static final int DEFAULT_PARALLEL_THRESHOLD = 1024;
    /** Thread-name prefix of the workers. */
    public static final String THREAD_NAME_PREFIX = "riskmin-gradient-";

    /**
     * Rounds of busy waiting before parking, about 0.1 ms (a round is a {@link Thread#onSpinWait()} of
     * some 25 ns, every {@value #YIELD_EVERY}th a {@link Thread#yield()}): longer than the gap between
     * two large batches, so a busy fit hands work over without waking a parked thread (tens of
     * microseconds on a virtual machine), while an idle worker soon stops using its core. The yields
     * let the thread being waited for run when both share one core (a loaded machine), where pure
     * spinning made a two-thread batch ten times slower than one thread in our measurements.
     */
    private static final int SPINS = 1 << 12;
    private static final int YIELD_EVERY = 32;
    private static final long WAIT_NANOS = 1_000_000;

    /** One parallel job: evaluate chunk c (0 on the calling thread, 1 … T−1 on the workers). */
    interface Chunks {
        void run(int chunk);
    }

    private final int threads;
    private final int parallelThreshold;
    private final Thread[] workers;
    private final AtomicInteger pending = new AtomicInteger();
    private final AtomicReference<Throwable> failure = new AtomicReference<>();
    private volatile int generation;
    private volatile boolean closed;
    private Chunks task;      // published to the workers by the volatile write of generation
    private Thread caller;    // likewise
    private boolean started;

    private GradientThreads(int threads, int parallelThreshold) {
        this.threads = threads;
        this.parallelThreshold = parallelThreshold;
        this.workers = new Thread[threads - 1];
    }

    /**
     * @param threads           T in [1, {@value #MAX_THREADS}], the calling thread included (1: no workers)
     * @param parallelThreshold the smallest batch (number of draws) split across threads, ≥ 1
     * @throws IllegalArgumentException naming the option and value if either is out of range
     */
    public static GradientThreads of(int threads, int parallelThreshold) {
        if (threads < 1 || threads > MAX_THREADS) {
            throw new IllegalArgumentException("threads (" + threads + ") must be in [1, " + MAX_THREADS + "]");
        }
        if (parallelThreshold < 1) {
            throw new IllegalArgumentException("parallelThreshold (" + parallelThreshold + ") must be >= 1");
        }
        return new GradientThreads(threads, parallelThreshold);
    }

    /** @return T, the calling thread included */
    public int threads() {
        return threads;
    }

    /** @return the smallest batch split across threads */
    public int parallelThreshold() {
        return parallelThreshold;
    }

    /** @return whether a batch of {@code length} draws is split across threads */
    boolean splits(int length) {
        return threads > 1 && length >= parallelThreshold;
    }

    /**
     * Runs {@code chunks.run(c)} for c = 0 … T−1, chunk 0 on the calling thread and chunk c on worker
     * c, and returns when all are done. Allocation-free after the first call.
     *
     * @throws IllegalStateException if closed, or if a worker thread died
     */
    void run(Chunks chunks) {
        if (closed) {
            throw new IllegalStateException("the gradient threads of this fit are closed");
        }
        if (!started) {
            start();
        }
        task = chunks;
        caller = Thread.currentThread();
        pending.set(threads - 1);
        generation = generation + 1; // single writer: the calling thread
        for (Thread worker : workers) {
            LockSupport.unpark(worker);
        }
        Throwable own = null;
        try {
            chunks.run(0);
        } catch (RuntimeException | Error e) {
            own = e;
        }
        awaitWorkers();
        task = null;
        Throwable theirs = failure.getAndSet(null);
        if (own != null) {
            if (theirs != null && theirs != own) {
                own.addSuppressed(theirs);
            }
            rethrow(own);
        }
        if (theirs != null) {
            rethrow(theirs);
        }
    }

    private void awaitWorkers() {
        int spins = 0;
        while (pending.get() != 0) {
            if (spins < SPINS) {
                pause(spins++);
            } else {
                LockSupport.parkNanos(this, WAIT_NANOS);
                // Parks return at once while the caller's interrupt flag is set; the wait is still
                // bounded by the chunks' work, and the flag stays for the fit loop to see.
                for (Thread worker : workers) {
                    if (!worker.isAlive() && pending.get() != 0) {
                        throw new IllegalStateException("gradient worker " + worker.getName() + " died");
                    }
                }
            }
        }
    }

    /** One round of a busy wait; every so often it yields, in case the thread we wait for shares our core. */
    private static void pause(int round) {
        if (round % YIELD_EVERY == YIELD_EVERY - 1) {
            Thread.yield();
        } else {
            Thread.onSpinWait();
        }
    }

    private static void rethrow(Throwable e) {
        if (e instanceof RuntimeException) {
            throw (RuntimeException) e;
        }
        if (e instanceof Error) {
            throw (Error) e;
        }
        throw new IllegalStateException("a gradient worker failed", e);
    }

    private void start() {
        for (int k = 0; k < workers.length; k++) {
            final int chunk = k + 1;
            Thread worker = new Thread(() -> work(chunk), THREAD_NAME_PREFIX + chunk);
            worker.setDaemon(true);
            workers[k] = worker;
        }
        started = true;
        for (Thread worker : workers) {
            worker.start();
        }
    }

    private void work(int chunk) {
        int seen = 0;
        while (true) {
            int spins = 0;
            int current;
            while ((current = generation) == seen && !closed) {
                if (spins < SPINS) {
                    pause(spins++);
                } else {
                    // Only close() ends a worker; a stray interrupt would turn park into a busy loop.
                    Thread.interrupted();
                    LockSupport.park(this);
                }
            }
            if (closed) {
                return;
            }
            seen = current;
            Thread waiting = caller;
            try {
                task.run(chunk);
            } catch (Throwable e) {
                failure.compareAndSet(null, e);
            }
            if (pending.decrementAndGet() == 0) {
                LockSupport.unpark(waiting);
            }
        }
    }

    /** @return whether worker threads have been started and not yet stopped by {@link #close()} */
    public boolean running() {
        return started && !closed;
    }

    /**
     * Stops the workers and waits for them to end; idempotent. Must not be called while a batch is
     * being evaluated. An interrupt of the calling thread does not cut the wait short (the workers
     * end within microseconds of being unparked) and is restored afterwards.
     */
    @Override
    public void close() {
        if (closed) {
            return;
        }
        closed = true;
        if (!started) {
            return;
        }
        for (Thread worker : workers) {
            LockSupport.unpark(worker);
        }
        boolean interrupted = false;
        for (Thread worker : workers) {
            while (worker.isAlive()) {
                try {
                    worker.join();
                } catch (InterruptedException e) {
                    interrupted = true;
                }
            }
        }
        if (interrupted) {
            Thread.currentThread().interrupt();
        }
    }

    @Override
    public String toString() {
        return "GradientThreads[threads=" + threads + ", parallelThreshold=" + parallelThreshold + "]";
    }
}
