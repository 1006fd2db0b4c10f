package org.stackwright.solve;

import java.util.Locale;

/**
 * A stopping rule with its maximum number of iterations and tolerance, and the check a solver calls after each
 * iteration.
 *
 * @param rule the rule
 * @param maxIterations upper bound on iterations, at least 1 (always applied)
 * @param tolerance for {@link StopRule#CHANGE}: the relative change (or primal-dual gap) to reach, positive
 */
public record Stopping(StopRule rule, int maxIterations, double tolerance) {

    public Stopping {
        if (maxIterations < 1) {
            throw new IllegalArgumentException("iterations = " + maxIterations + " is not allowed; give 1 or more");
        }
        if (!(tolerance > 0) || !Double.isFinite(tolerance)) {
            throw new IllegalArgumentException("tolerance = " + tolerance + " is not allowed; give a positive number");
        }
    }

    /**
     * Iterations the automatic rule waits after the best held-out fit before it stops: 10, or 30% of the iterations
     * to the best when that is more (the held-out fit is flat near its best and wiggles by a little; common practice,
     * no source).
     *
     * @param best iterations to the best held-out fit
     */
    public static int patience(int best) {
        return Math.max(10, (int) Math.ceil(0.3 * best));
    }

    /**
     * @param heldOut held-out fit per iteration (index k = the estimate after k iterations), NaN where not measured
     * @return the index of the smallest value, -1 when none is measured
     */
    public static int bestHeldOut(double[] heldOut) {
        int best = -1;
        for (int k = 0; k < heldOut.length; k++) {
            if (!Double.isNaN(heldOut[k]) && (best < 0 || heldOut[k] < heldOut[best])) {
                best = k;
            }
        }
        return best;
    }

    /**
     * The automatic rule for a regularised method, whose held-out fit levels off at the minimiser of its objective
     * instead of turning up: stop when the best held-out fit improved, over the last {@link #patience} iterations, by
     * less than its own statistical fluctuation, the standard error of a mean over the held-out pixels. Smaller gains
     * cannot be told from noise in a fresh recording (the "improvement below its statistical fluctuation" criterion).
     * For Poisson counts 2 KL is about chi-square with one degree of freedom, so the divergence per pixel has variance
     * about 1/2 (Wilks' theorem; McCullagh &amp; Nelder, "Generalized Linear Models", 2nd ed., 1989, sec. 2.3; below
     * a few counts per pixel an approximation).
     *
     * @param heldOut held-out fit per iteration so far (index k = the estimate after k iterations), not modified
     * @param heldOutPixels number of held-out pixels (0: no held-out fit, never levels off)
     * @return the stop reason, or null to go on
     */
    public static String levelledOff(double[] heldOut, int heldOutPixels) {
        int k = heldOut.length;
        int window = patience(k);
        if (heldOutPixels <= 0 || k <= window) {
            return null;
        }
        int before = bestHeldOut(java.util.Arrays.copyOf(heldOut, k - window));
        int now = bestHeldOut(heldOut);
        if (before < 0 || now < 0) {
            return null;
        }
        double gain = heldOut[before] - heldOut[now];
        double fluctuation = Math.sqrt(0.5 / heldOutPixels);
        if (gain < fluctuation) {
            return String.format(Locale.ROOT, "auto: the held-out fit levelled off at %.4f per pixel: it improved by"
                    + " %.2g in the last %d iterations, less than its statistical fluctuation %.2g", heldOut[now], gain,
                    window, fluctuation);
        }
        return null;
    }

    /**
     * Fewest iterations over which {@link #settled} judges the objective: early on the primal-dual iterates can pause
     * on a plateau far from the minimum (seen on a dim 2D specimen: flat over 20 iterations at 70 iterations, error
     * 0.9; common practice, no source).
     */
    static final int SETTLE_WINDOW = 100;

    /**
     * The automatic rule of the primal-dual method, which solves its regularised problem to convergence: stop when
     * the objective has settled within what the data can tell apart. Over the last w iterations ({@link #patience}, at least {@link #SETTLE_WINDOW})
     * the objective moved by at most r (its range in that window); at the method's O(1/k) rate (Chambolle &amp; Pock,
     * J Math Imaging Vis 40, 2011, Theorem 1) the distance left to the minimum is about r (k - w) / w. The run stops
     * when that is below the objective's own statistical fluctuation: the data term per pixel is a scaled chi-square
     * with one degree of freedom for each pixel (2 KL for Poisson counts, Wilks' theorem; McCullagh &amp; Nelder,
     * "Generalized Linear Models", 2nd ed., 1989, sec. 2.3), so its mean m over N pixels has standard deviation
     * about m sqrt(2 / N). A minimiser closer than that to the minimum cannot be told apart from it by the data: a
     * fresh recording of the same specimen moves the minimum by as much. Taking the range, not the decrease, also
     * waits out the oscillation of the primal-dual iterates.
     *
     * @param objective objective per pixel per iteration so far (index k = after k + 1 iterations), not modified
     * @param fluctuation the statistical fluctuation of the objective per pixel (positive), or 0 to never stop
     * @return the stop reason, or null to go on
     */
    public static String settled(double[] objective, double fluctuation) {
        int k = objective.length;
        int window = Math.max(SETTLE_WINDOW, patience(k));
        if (!(fluctuation > 0) || k <= window) {
            return null;
        }
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (int i = k - window - 1; i < k; i++) {
            lo = Math.min(lo, objective[i]);
            hi = Math.max(hi, objective[i]);
        }
        double left = (hi - lo) * (k - window) / window;
        if (left < fluctuation) {
            return String.format(Locale.ROOT, "auto: the objective settled at %.5f per pixel: it moved by %.2g in the"
                    + " last %d iterations, which at the method's 1/k rate leaves about %.2g to its minimum, less than its"
                    + " statistical fluctuation %.2g", objective[k - 1], hi - lo, window, left, fluctuation);
        }
        return null;
    }

    /** Exactly n iterations. */
    public static Stopping fixed(int n) {
        return new Stopping(StopRule.FIXED, n, 1e-3);
    }

    /**
     * @param iteration iterations done so far (1-based)
     * @param meanFit mean data fit per trusted pixel (NaN when not known)
     * @param expectedFit its expected value under the noise model
     * @param change relative change (or gap) of this iteration (NaN when not known)
     * @return why the run stops now, or null to go on
     */
    public String check(int iteration, double meanFit, double expectedFit, double change) {
        return check(iteration, meanFit, expectedFit, change, new double[0]);
    }

    /**
     * As {@link #check(int, double, double, double)}, with the history of the held-out fit (cross-validation).
     *
     * @param heldOut held-out fit per iteration so far (index 0 = iteration 1), NaN where not measured; not modified
     */
    public String check(int iteration, double meanFit, double expectedFit, double change, double[] heldOut) {
        if (rule == StopRule.AUTO) {
            int best = bestHeldOut(heldOut);
            if (best >= 0 && iteration - (best + 1) >= patience(best)) {
                return String.format(Locale.ROOT, "auto: the held-out fit was best after %d iterations (%.4f per pixel)"
                        + " and did not improve in the %d after", best, heldOut[best], iteration - 1 - best);
            }
        }
        boolean noise = rule == StopRule.NOISE || (rule == StopRule.AUTO && bestHeldOut(heldOut) < 0);
        if (rule == StopRule.CHANGE && change < tolerance) {
            return String.format(Locale.ROOT, "change: relative change %.3g fell below the tolerance %.3g", change, tolerance);
        }
        if (noise && meanFit <= expectedFit) {
            return String.format(Locale.ROOT, "noise: mean data fit %.4f per pixel reached its expected value %.4f "
                    + "(discrepancy principle)", meanFit, expectedFit);
        }
        if (iteration >= maxIterations) {
            return rule == StopRule.FIXED ? "fixed: " + maxIterations + " iterations done"
                    : "maximum: " + maxIterations + " iterations reached before the " + rule.word() + " rule was met";
        }
        return null;
    }
}
