package dev.riskmin.diagnostics.sink;

import org.slf4j.Logger;

import java.io.BufferedWriter;
import java.io.Closeable;
import java.io.IOException;
import java.io.OutputStream;
import java.io.OutputStreamWriter;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

/**
 * A buffered character stream that never throws: the first {@link IOException} is recorded and
 * reported once at WARN, the underlying handle is closed at once without another write (so no handle
 * outlives the failure and a failed device is not written again), and every later write is dropped.
 * Guarded by its own monitor, so the fitting thread may write while another thread flushes, reads the
 * failure or closes.
 */
final class TraceOutput {
    private final Writer out;
    private final Closeable handle;
    private final boolean layered;
    private final String target;
    private final Logger log;
    private IOException failure;
    private boolean closed;
    private long records;
    private long dropped;

    private TraceOutput(Writer out, Closeable handle, boolean layered, String target, Logger log) {
        this.out = out;
        this.handle = handle;
        this.layered = layered;
        this.target = target;
        this.log = log;
    }

    /** Buffers writes to a caller's stream, which it then owns. */
    static TraceOutput of(Writer stream, String target, Logger log) {
        return new TraceOutput(new BufferedWriter(stream), stream, false, target, log);
    }

    /**
     * Opens a file (created or truncated) for UTF-8 text. The encoder replaces what UTF-8 cannot
     * carry (a lone surrogate becomes '?') rather than failing the trace.
     */
    static TraceOutput open(Path file, String target, Logger log) throws IOException {
        OutputStream stream = Files.newOutputStream(file);
        return new TraceOutput(new BufferedWriter(new OutputStreamWriter(stream, StandardCharsets.UTF_8)), stream,
                true, target, log);
    }

    /** Writes one record (already formatted, with its line end); drops it after a failure or close. */
    synchronized void write(CharSequence record, boolean flush) {
        if (closed || failure != null) {
            dropped++;
            return;
        }
        try {
            out.append(record);
            if (flush) {
                out.flush();
            }
            records++;
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
            if (layered) {
                closeHandle(); // the encoder between may have failed before closing the file
            }
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
        closeHandle();
    }

    private void closeHandle() {
        try {
            handle.close();
        } catch (IOException | RuntimeException second) {
            if (failure == null) {
                record(second);
            } else if (second != failure) {
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
