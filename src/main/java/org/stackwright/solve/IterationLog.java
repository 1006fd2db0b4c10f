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
    private final double[] heldOut;
    private final long t0 = System.nanoTime();
    private int done;
    private double best = Double.POSITIVE_INFINITY;
    private String reason;
    private int levelOffPixels;
    private boolean settle;
    private double fluctuation;

    IterationLog(String method, Stopping stopping, RunContext context, IterationListener listener) {
        this.method = method;
        this.stopping = stopping;
        this.context = context;
        this.listener = listener;
        this.objective = new double[stopping.maxIterations()];
        this.change = new double[stopping.maxIterations()];
        this.heldOut = new double[stopping.maxIterations()];
    }

    /**
     * For a regularised method under the automatic rule: also stop when the held-out fit levels off
     * ({@link Stopping#levelledOff}).
     *
     * @param heldOutPixels number of held-out pixels of the problem (0 = none)
     */
    void stopWhenLevelledOff(int heldOutPixels) {
        levelOffPixels = stopping.rule() == StopRule.AUTO ? heldOutPixels : 0;
    }

    /**
     * For the primal-dual method under the automatic rule: stop when the objective has settled within its statistical
     * fluctuation ({@link Stopping#settled}), given before each {@link #after} by {@link #fluctuation}. Replaces the
     * rule's other checks (held-out fit, noise), which do not apply to a method solved to convergence.
     */
    void stopWhenSettled() {
        settle = stopping.rule() == StopRule.AUTO;
    }

    /** @param perPixel the objective's statistical fluctuation per pixel at the current iterate */
    void fluctuation(double perPixel) {
        fluctuation = perPixel;
    }

    /** @return iterations recorded so far */
    int done() {
        return done;
    }

    /** Checks for cancel before an iteration. */
    void before() {
        context.checkCancelled();
    }

    /**
     * Records one iteration and decides whether to stop.
     *
     * @param obj the objective
     * @param meanFit mean data fit per trusted pixel of the estimate that entered the iteration
     * @param expectedFit its expected value
     * @param ch relative change or gap
     * @param held mean fit of the held-out pixels (NaN when none), computed in the same pass as meanFit
     * @param estimate the estimate after the iteration (read by listeners, not modified)
     * @return true to stop
     */
    boolean after(double obj, double meanFit, double expectedFit, double ch, double held, float[] estimate) {
        NumericalGuard.iteration(method, done + 1, obj, meanFit, ch);
        NumericalGuard.notDiverged(method, done + 1, obj, best);
        best = Math.min(best, obj);
        objective[done] = obj;
        change[done] = ch;
        heldOut[done] = held;
        done++;
        listener.iteration(done, stopping.maxIterations(), obj, ch);
        listener.state(new IterationState(done, stopping.maxIterations(), obj, meanFit, expectedFit, held, ch, estimate));
        context.progress((double) done / stopping.maxIterations(),
                String.format(Locale.ROOT, "%s iteration %d of at most %d", method, done, stopping.maxIterations()));
        double[] history = Arrays.copyOf(heldOut, done);
        if (settle) {
            reason = Stopping.settled(Arrays.copyOf(objective, done), fluctuation);
            if (reason == null && done >= stopping.maxIterations()) {
                reason = "maximum: " + done + " iterations reached before the objective settled within its statistical"
                        + " fluctuation (the auto rule); give a larger --iterations";
            }
            return reason != null;
        }
        reason = stopping.check(done, meanFit, expectedFit, ch, history);
        if (levelOffPixels > 0 && (reason == null || reason.startsWith("maximum"))) {
            String levelled = Stopping.levelledOff(history, levelOffPixels);
            reason = levelled != null ? levelled : reason;
        }
        return reason != null;
    }

    Solution finish(float[] estimate) {
        double seconds = (System.nanoTime() - t0) * 1e-9;
        return new Solution(estimate, done, reason == null ? "maximum" : reason, Arrays.copyOf(objective, done),
                Arrays.copyOf(change, done), seconds);
    }
}
