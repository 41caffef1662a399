package dev.riskmin.diagnostics.sink;

import org.slf4j.Logger;

import java.io.BufferedWriter;
import java.io.IOException;
import java.io.Writer;

/**
 * A buffered character stream that never throws: the first {@link IOException} is recorded and
 * reported once at WARN, the stream is closed at once (so no handle outlives the failure), and every
 * later write is dropped. Guarded by its own monitor, so the fitting thread may write while another
 * thread flushes, reads the failure or closes.
 */
final class TraceOutput {
    private final Writer out;
    private final String target;
    private final Logger log;
    private IOException failure;
    private boolean closed;
    private long records;
    private long dropped;

    TraceOutput(Writer out, String target, Logger log) {
        this.out = out instanceof BufferedWriter ? out : new BufferedWriter(out);
        this.target = target;
        this.log = log;
    }

    /** Writes one record (already formatted, with its line end); drops it after a failure or close. */
    synchronized void write(CharSequence record, boolean flush) {
        if (closed || failure != null) {
            dropped++;
            return;
        }
        try {
            out.append(record);
            records++;
            if (flush) {
                out.flush();
            }
        } catch (IOException | RuntimeException e) {
            fail(e);
        }
    }

    /** Writes a header (not counted as a record). */
    synchronized void header(CharSequence text) {
        if (closed || failure != null) {
            return;
        }
        try {
            out.append(text);
        } catch (IOException | RuntimeException e) {
            fail(e);
        }
    }

    synchronized void flush() {
        if (closed || failure != null) {
            return;
        }
        try {
            out.flush();
        } catch (IOException | RuntimeException e) {
            fail(e);
        }
    }

    synchronized void close() {
        if (closed) {
            return;
        }
        closed = true;
        if (failure != null) {
            return; // closed when it failed
        }
        try {
            out.close();
        } catch (IOException | RuntimeException e) {
            record(e);
        }
    }

    synchronized IOException failure() {
        return failure;
    }

    synchronized long records() {
        return records;
    }

    synchronized long dropped() {
        return dropped;
    }

    synchronized boolean closed() {
        return closed;
    }

    private void fail(Exception e) {
        dropped++;
        record(e);
        try {
            out.close();
        } catch (IOException | RuntimeException second) {
            if (second != failure) {
                failure.addSuppressed(second);
            }
        }
    }

    private void record(Exception e) {
        failure = e instanceof IOException io ? io : new IOException("the stream threw " + e, e);
        // One report, at WARN: the fit goes on without this trace, and the failure stays readable.
        log.warn("trace {}: writing failed after {} records; later events are dropped", target, records, failure);
    }
}
