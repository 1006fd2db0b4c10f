package org.stackwright.solve;

import ij.ImagePlus;
import ij.gui.Plot;

/** The convergence curve of a run: objective per iteration, with the expected data fit when it applies. */
public final class ConvergencePlot {

    private ConvergencePlot() {
    }

    /**
     * @param solution the run
     * @param objectiveName the y-axis label
     * @param expected the expected data fit (a horizontal line), or NaN for none
     * @return a picture of the curve
     */
    public static ImagePlus of(Solution solution, String objectiveName, double expected) {
        double[] y = solution.objective();
        double[] x = new double[y.length];
        for (int i = 0; i < x.length; i++) {
            x[i] = i + 1;
        }
        Plot plot = new Plot("convergence", "iteration", objectiveName);
        plot.setColor(java.awt.Color.BLUE);
        plot.add("connected circle", x, y);
        if (!Double.isNaN(expected) && y.length > 0) {
            plot.setColor(java.awt.Color.GRAY);
            plot.add("line", new double[] {1, Math.max(2, y.length)}, new double[] {expected, expected});
            plot.addLegend("objective\nexpected value (noise only)");
        }
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (double v : y) {
            lo = Math.min(lo, v);
            hi = Math.max(hi, v);
        }
        if (!Double.isNaN(expected)) {
            lo = Math.min(lo, expected);
            hi = Math.max(hi, expected);
        }
        if (y.length > 0 && hi > lo) {
            double m = 0.05 * (hi - lo);
            plot.setLimits(0.5, y.length + 0.5, lo - m, hi + m);
        }
        return plot.getImagePlus();
    }
}
