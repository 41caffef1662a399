package dev.riskmin.hook;

import dev.riskmin.Fit;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

import java.util.ArrayList;
import java.util.List;

/**
 * The listeners of one fit, notified in order and in isolation: a listener that throws an
 * {@link Exception} or an {@link AssertionError} is detached for the rest of the fit, the failure is
 * recorded (see {@link #failures()}) and logged once at WARN, and the fit goes on. Other errors
 * (out of memory, stack overflow) propagate. Every fit loop — in memory or distributed — uses this
 * class, so the promise is kept in one place. Not thread-safe; {@link #step} and {@link #epochEnded}
 * allocate nothing unless a listener fails.
 */
public final class ListenerGroup {
    private static final Logger LOG = LoggerFactory.getLogger(ListenerGroup.class);

    private final FitListener[] listeners;
    private final boolean[] detached;
    private final List<String> failures = new ArrayList<>();

    private ListenerGroup(List<FitListener> listeners) {
        this.listeners = listeners.toArray(new FitListener[0]);
        this.detached = new boolean[this.listeners.length];
    }

    /** @param listeners read only (copied) */
    public static ListenerGroup of(List<FitListener> listeners) {
        return new ListenerGroup(listeners);
    }

    /** Calls {@link FitListener#started} on every listener. */
    public void started(RunInfo run) {
        for (int l = 0; l < listeners.length; l++) {
            try {
                listeners[l].started(run);
            } catch (Exception | AssertionError e) {
                detach(l, "started", 0, e);
            }
        }
    }

    /** Calls {@link FitListener#step} on every attached listener. */
    public void step(StepView view, FitControl control) {
        for (int l = 0; l < listeners.length; l++) {
            if (!detached[l]) {
                try {
                    listeners[l].step(view, control);
                } catch (Exception | AssertionError e) {
                    detach(l, "step", view.step(), e);
                }
            }
        }
    }

    /** Calls {@link FitListener#epochEnded} on every attached listener. */
    public void epochEnded(StepView view, FitControl control) {
        for (int l = 0; l < listeners.length; l++) {
            if (!detached[l]) {
                try {
                    listeners[l].epochEnded(view, control);
                } catch (Exception | AssertionError e) {
                    detach(l, "epochEnded", view.step(), e);
                }
            }
        }
    }

    /** Informs every listener (detached ones too) of the finished fit; a failure here is only logged. */
    public static void finished(List<FitListener> listeners, Fit fit) {
        for (FitListener listener : listeners) {
            try {
                listener.finished(fit);
            } catch (Exception | AssertionError e) {
                LOG.warn("listener {} failed in finished(): {}", listener.getClass().getName(), e.toString());
            }
        }
    }

    /** @return the number of listeners */
    public int size() {
        return listeners.length;
    }

    /** @return listener l */
    public FitListener get(int l) {
        return listeners[l];
    }

    /** @return whether listener l is still attached */
    public boolean attached(int l) {
        return !detached[l];
    }

    /**
     * Detaches listener l after it threw in {@code where} at {@code step}, recording and logging why —
     * for callbacks a fit loop adds of its own (for example per-round reports).
     */
    public void detach(int l, String where, long step, Throwable e) {
        detached[l] = true;
        String line = listeners[l].getClass().getName() + " threw in " + where + "() at step " + step + ": " + e;
        failures.add(line);
        LOG.warn("listener detached for the rest of the fit: {}", line, e);
    }

    /** @return one line per listener that threw and was detached (a copy) */
    public List<String> failures() {
        return List.copyOf(failures);
    }
}
