package org.stackwright.solve;

import java.util.Locale;

import org.stackwright.op.RunFailedException;

/**
 * The one numerical safety check every solver passes through: a non-finite objective, data fit or change during
 * the iterations ({@link IterationLog} calls {@link #iteration}), or a non-finite value in a solver's result
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
                    + " iteration %d (objective %s, data fit %s, change %s); no result is written. Check that --offset,"
                    + " --gain and --background describe the data, or try --acceleration off or another method",
                    method, iteration, objective, fit, change));
        }
    }

    /**
     * @param method the solver's name
     * @param solution what it returned; its estimate is scanned, not modified
     * @throws RunFailedException when the estimate holds a NaN or infinite value
     */
    public static void estimate(String method, Solution solution) {
        float[] x = solution.estimate();
        int bad = 0;
        for (float v : x) {
            if (!Float.isFinite(v)) {
                bad++;
            }
        }
        if (bad > 0) {
            throw new RunFailedException(String.format(Locale.ROOT, "%s: %d of %d values of the result are NaN or"
                    + " infinite after %d iteration(s); no result is written. Check that --offset, --gain and"
                    + " --background describe the data, or try --acceleration off or another method", method, bad,
                    x.length, solution.iterations()));
        }
    }
}
