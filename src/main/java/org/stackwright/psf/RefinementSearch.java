package org.stackwright.psf;

import java.util.ArrayList;
import java.util.List;

import org.apache.commons.math3.analysis.MultivariateFunction;
import org.apache.commons.math3.optim.InitialGuess;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.SimpleBounds;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.nonlinear.scalar.ObjectiveFunction;
import org.apache.commons.math3.optim.nonlinear.scalar.noderiv.BOBYQAOptimizer;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.stackwright.op.RunContext;

/**
 * Minimises an objective over the fitted optical parameters within their search ranges: a coarse scan of the
 * first parameter over its whole range (a grid over the first two when two or more are fitted; the others at
 * their start values) finds the right basin, then
 * commons-math3 refines from the best scan point: Brent's method for one parameter (Brent, Algorithms for
 * Minimization without Derivatives, 1973) within one scan step of it, BOBYQA for several (Powell, "The BOBYQA
 * algorithm for bound constrained optimization without derivatives", Cambridge report NA2009/06) in units of
 * each parameter's typical change. Derivative-free on purpose: the objective is itself the optimum of inner
 * fits, known only to their tolerance.
 */
public final class RefinementSearch {

    /** Scan points across the first parameter's range. */
    public static final int SCAN_POINTS = 11;

    /** Scan points across the first and the second parameter's range, when the scan is a grid. */
    static final int SCAN_POINTS_GRID = 7;
    static final int SECOND_POINTS = 5;

    /** The objective, with parameters in their own units. */
    @FunctionalInterface
    public interface Objective {
        /**
         * @param theta the parameters
         * @param scanning true during the coarse scan, which only finds where to start: its values are compared
         *     with each other only, so the objective may use a cheaper form there (fewer beads, for instance)
         */
        double value(double[] theta, boolean scanning);
    }

    /**
     * @param best the minimiser
     * @param value the objective there
     * @param evaluations how often the objective was evaluated
     * @param scan the coarse scan: {value of the first parameter, objective}
     */
    public record Outcome(double[] best, double value, int evaluations, List<double[]> scan) {
    }

    private RefinementSearch() {
    }

    /**
     * @param free the parameters fitted
     * @param start their start values (inside the bounds)
     * @param bounds per parameter {lowest, highest}
     * @param f the objective
     * @param refine false to stop after the scan (the caller refines with derivatives of its own)
     * @param ctx cancel and progress
     */
    public static Outcome run(List<OpticsParameter> free, double[] start, double[][] bounds, Objective f, boolean refine,
            RunContext ctx) {
        int n = free.size();
        int[] count = {0};
        double[] bestSeen = {Double.POSITIVE_INFINITY};
        double[][] bestPoint = {start.clone()};
        Objective counted = (theta, scanning) -> {
            ctx.checkCancelled();
            double v = f.value(theta, scanning);
            count[0]++;
            if (!scanning && v < bestSeen[0]) {
                bestSeen[0] = v;
                bestPoint[0] = theta.clone();
            }
            ctx.progress(Math.min(0.9, 0.1 + 0.8 * count[0] / (count[0] + 20.0)),
                    "psf-refine: objective evaluation " + count[0]);
            return v;
        };
        List<double[]> scan = new ArrayList<>();
        double lo = bounds[0][0];
        double hi = bounds[0][1];
        // fewer points along the first parameter when the scan is a grid
        int points = n >= 2 ? SCAN_POINTS_GRID : SCAN_POINTS;
        double step = (hi - lo) / (points - 1);
        // with two or more parameters the scan is a grid over the first two: a search that starts on the wrong
        // line of the second parameter can end in a false minimum along a trade-off valley (depth against sample
        // index, for instance)
        int second = n >= 2 ? SECOND_POINTS : 1;
        double[] theta = start.clone();
        double bestScan = Double.POSITIVE_INFINITY;
        double[] from = start.clone();
        // the grid lines of the second parameter, and its start value (the user's best guess) as one more line
        for (int j = 0; j < second + (n >= 2 ? 1 : 0); j++) {
            if (n >= 2) {
                theta[1] = j < second ? bounds[1][0] + j * (bounds[1][1] - bounds[1][0]) / (SECOND_POINTS - 1) : start[1];
            }
            for (int i = 0; i <= points; i++) {
                // the scan points, then the start value itself (on the start line only)
                if (i == points && n >= 2) {
                    continue;
                }
                theta[0] = i < points ? lo + i * step : start[0];
                double v = counted.value(theta, true);
                scan.add(n >= 2 ? new double[] {theta[0], v, theta[1]} : new double[] {theta[0], v});
                if (v < bestScan) {
                    bestScan = v;
                    from = theta.clone();
                }
            }
        }
        double bestFirst = from[0];
        scan.sort((a, b) -> Double.compare(a[0], b[0]));
        counted.value(from, false);
        if (!refine) {
            return new Outcome(bestPoint[0], bestSeen[0], count[0], scan);
        }
        if (n == 1) {
            double a = Math.max(lo, bestFirst - step);
            double b = Math.min(hi, bestFirst + step);
            BrentOptimizer brent = new BrentOptimizer(1e-8, 1e-3 * free.get(0).scale());
            brent.optimize(new MaxEval(80), GoalType.MINIMIZE, new SearchInterval(a, b, bestFirst),
                    new UnivariateObjectiveFunction(x -> counted.value(new double[] {x}, false)));
        } else {
            double[] scale = new double[n];
            double[] u0 = new double[n];
            double[] ulo = new double[n];
            double[] uhi = new double[n];
            for (int i = 0; i < n; i++) {
                scale[i] = free.get(i).scale();
                u0[i] = from[i] / scale[i];
                ulo[i] = bounds[i][0] / scale[i];
                uhi[i] = bounds[i][1] / scale[i];
            }
            double radius = 0.5;
            for (int i = 0; i < n; i++) {
                radius = Math.min(radius, 0.45 * (uhi[i] - ulo[i]));
            }
            MultivariateFunction g = u -> {
                double[] t = new double[n];
                for (int i = 0; i < n; i++) {
                    t[i] = Math.max(bounds[i][0], Math.min(bounds[i][1], u[i] * scale[i]));
                }
                return counted.value(t, false);
            };
            BOBYQAOptimizer bobyqa = new BOBYQAOptimizer(2 * n + 1, radius, 2e-4);
            bobyqa.optimize(new MaxEval(60 + 40 * n), GoalType.MINIMIZE, new InitialGuess(u0),
                    new SimpleBounds(ulo, uhi), new ObjectiveFunction(g));
        }
        return new Outcome(bestPoint[0], bestSeen[0], count[0], scan);
    }
}
