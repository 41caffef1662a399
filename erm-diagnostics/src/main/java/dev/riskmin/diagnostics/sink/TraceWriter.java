package dev.riskmin.diagnostics.sink;

import dev.riskmin.diagnostics.EventListener;

import java.io.IOException;
import java.util.Optional;

/**
 * A sink that writes every event it receives to a character stream, one record per event, and
 * never throws into the fit. Writes are buffered; the buffer is flushed at each verdict event, on
 * {@link #flush()} and on {@link #close()}.
 *
 * <p>Failure: the first {@link IOException} of the stream is recorded ({@link #failure()}), reported
 * once through SLF4J at WARN, and the stream is closed at once; later events are dropped and counted
 * ({@link #droppedEvents()}). The fit is not disturbed. {@link #close()} does not throw either:
 * check {@link #failure()} after it when the trace matters.
 */
public interface TraceWriter extends EventListener, AutoCloseable {

    /** Writes the buffered records through to the stream. */
    void flush();

    /** Flushes and closes the stream (which the writer owns); idempotent. Later events are dropped. */
    @Override
    void close();

    /** @return the first failure of the stream, if any */
    Optional<IOException> failure();

    /**
     * @return the events accepted (into the buffer or through to the stream); after a failure, those
     * still in the buffer when the stream failed never reached it. Accepted plus dropped is every
     * event received.
     */
    long eventsWritten();

    /** @return the events dropped because the stream had failed or the writer was closed */
    long droppedEvents();
}
