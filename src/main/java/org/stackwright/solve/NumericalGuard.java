package org.stackwright.solve;

import java.util.Locale;

import org.stackwright.op.RunFailedException;

/**
 * The one numerical safety check every solver passes through: a non-finite objective, data fit or change during
 * the iterations, or an objective that diverged ({@link IterationLog} calls {@link #iteration} and
 * {@link #notDiverged}), or a non-finite value in a solver's result
 * ({@link Deconvolution} calls {@link #estimate} on every solution, whatever the method), stops the run with a
 * {@link RunFailedException} that names the method and the iteration. No result is returned then, so no door can
 * write one: a NaN image with exit code 0 cannot happen. The solvers themselves keep their numbers in range (the
 * model floor of {@link org.stackwright.model.DeconvolutionProblem#modelFloor()}, double sums); this guard is
 * what makes a failure of that loud instead of silent.
 */
public final class NumericalGuard {

    private NumericalGuard() {
    }

    /**
     * @param method the solver's name
     * @param iteration 1-based
     * @param objective the objective just computed
     * @param fit the mean data fit just computed
     * @param change the relative change (or gap); NaN is allowed only where a solver has none (not from here)
     * @throws RunFailedException when any of them is NaN or infinite
     */
    public static void iteration(String method, int iteration, double objective, double fit, double change) {
        if (!Double.isFinite(objective) || !Double.isFinite(fit) || !Double.isFinite(change)) {
            throw new RunFailedException(String.format(Locale.ROOT, "%s: the computation left the range of numbers at"
                    + " iteration %d (objective %s, data fit %s, change %s); %s", method, iteration, objective, fit,
                    change, ADVICE));
        }
    }

    /**
     * A run whose objective grows a million times above the best it reached (and above 1 per pixel) has diverged:
     * its numbers are still finite but the estimate is meaningless. The Poisson objectives are at least 0 and
     * about 1/2 per pixel at the noise level, and an EM step never raises them (Shepp &amp; Vardi 1982); the
     * extrapolation and the regularised methods may raise them a little, never by orders of magnitude.
     *
     * @param best the smallest objective of the iterations before
     * @throws RunFailedException when the objective exceeds {@link #DIVERGENCE_FACTOR} x max(best, 1)
     */
    public static void notDiverged(String method, int iteration, double objective, double best) {
        if (objective > DIVERGENCE_FACTOR * Math.max(best, 1)) {
            throw new RunFailedException(String.format(Locale.ROOT, "%s: the computation diverged at iteration %d"
                    + " (objective %.3g per pixel, best so far %.3g); %s", method, iteration, objective, best, ADVICE));
        }
    }

    /** How far above its best an objective may rise before the run counts as diverged (see {@link #notDiverged}). */
    public static final double DIVERGENCE_FACTOR = 1e6;

    private static final String ADVICE = "no result is written. Check that --offset, --gain and --background describe"
            + " the data, or try --acceleration off or another method";

    /**
     * @param method the solver's name
     * @param solution what it returned; its estimate is scanned, not modified
     * @throws RunFailedException when the estimate holds a NaN or infinite value
     */
    public static void estimate(String method, Solution solution) {
        values(method, "the result", solution.estimate(), solution.iterations() + " iteration(s)");
    }

    /**
     * The same check for results that are not one solver's estimate (the posterior mean and interval of sampling,
     * say).
     *
     * @param method the method's name
     * @param what what the values are, e.g. "the posterior mean"
     * @param x the values, not modified
     * @param after how they were reached, e.g. "400 samples"
     * @throws RunFailedException when a value is NaN or infinite
     */
    public static void values(String method, String what, float[] x, String after) {
        int bad = 0;
        for (float v : x) {
            if (!Float.isFinite(v)) {
                bad++;
            }
        }
        if (bad > 0) {
            throw new RunFailedException(String.format(Locale.ROOT, "%s: %d of %d values of %s are NaN or"
                    + " infinite after %s; %s", method, bad, x.length, what, after, ADVICE));
        }
    }
}
