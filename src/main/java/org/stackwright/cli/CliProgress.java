package org.stackwright.cli;

import java.io.PrintStream;
import java.util.Locale;

import org.stackwright.op.RunContext;

/** Progress on stderr, one line overwritten in place, at most every 200 ms. */
final class CliProgress implements RunContext.Progress {

    /** Clears the progress line. */
    static final String CLEAR = "";

    private final PrintStream err;
    private long last;

    CliProgress(PrintStream err) {
        this.err = err;
    }

    @Override
    public synchronized void report(double fraction, String status) {
        long now = System.nanoTime();
        if (now - last < 200_000_000L && fraction < 1) {
            return;
        }
        last = now;
        err.println(String.format(Locale.ROOT, "[%3.0f%%] %s", 100 * Math.max(0, Math.min(1, fraction)), status));
    }
}
