package org.stackwright.solve;

import java.util.Arrays;
import java.util.Locale;

import org.stackwright.op.RunContext;

/**
 * The bookkeeping every iterative solver shares: history arrays sized once, cancel checks, progress, listener
 * calls, the stop decision and the {@link NumericalGuard} after each iteration.
 */
final class IterationLog {

    private final Stopping stopping;
    private final RunContext context;
    private final IterationListener listener;
    private final String method;
    private final double[] objective;
    private final double[] change;
    private final long t0 = System.nanoTime();
    private int done;
    private double best = Double.POSITIVE_INFINITY;
    private String reason;

    IterationLog(String method, Stopping stopping, RunContext context, IterationListener listener) {
        this.method = method;
        this.stopping = stopping;
        this.context = context;
        this.listener = listener;
        this.objective = new double[stopping.maxIterations()];
        this.change = new double[stopping.maxIterations()];
    }

    /** Checks for cancel before an iteration. */
    void before() {
        context.checkCancelled();
    }

    /**
     * Records one iteration and decides whether to stop.
     *
     * @return true to stop
     */
    boolean after(double obj, double meanFit, double expectedFit, double ch) {
        NumericalGuard.iteration(method, done + 1, obj, meanFit, ch);
        NumericalGuard.notDiverged(method, done + 1, obj, best);
        best = Math.min(best, obj);
        objective[done] = obj;
        change[done] = ch;
        done++;
        listener.iteration(done, stopping.maxIterations(), obj, ch);
        context.progress((double) done / stopping.maxIterations(),
                String.format(Locale.ROOT, "%s iteration %d of at most %d", method, done, stopping.maxIterations()));
        reason = stopping.check(done, meanFit, expectedFit, ch);
        return reason != null;
    }

    Solution finish(float[] estimate) {
        double seconds = (System.nanoTime() - t0) * 1e-9;
        return new Solution(estimate, done, reason == null ? "maximum" : reason, Arrays.copyOf(objective, done),
                Arrays.copyOf(change, done), seconds);
    }
}
