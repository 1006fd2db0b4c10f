package org.stackwright.inspect;

import java.awt.Color;
import java.util.List;

import ij.gui.Plot;

/**
 * ImageJ plots of the residual analysis and of a run's convergence. They work headless: {@code
 * plot.getProcessor()} renders to an image without a display (tested), {@code plot.show()} opens a window when
 * there is one.
 */
public final class InspectPlots {

    /** Plot frame size in pixels (the drawing area; axes and labels come on top). */
    public static final int WIDTH = 420;
    public static final int HEIGHT = 240;

    private static final Color OBSERVED = new Color(0x1f, 0x5f, 0xbf);
    private static final Color MODEL = new Color(0xd0, 0x40, 0x20);

    private InspectPlots() {
    }

    /** Histogram of normalised residuals (fraction per unit of r) with the N(0, 1) density for comparison. */
    public static Plot histogram(ResidualHistogram h) {
        double[] x = h.centres();
        double[] observed = new double[x.length];
        double[] expected = new double[x.length];
        double width = h.edges()[1] - h.edges()[0];
        for (int i = 0; i < x.length; i++) {
            observed[i] = h.counts()[i] / (h.total() * width);
            expected[i] = h.expected()[i] / (h.total() * width);
        }
        Plot p = new Plot("Normalised residuals", "r (noise standard deviations)", "fraction per unit r");
        p.setFrameSize(WIDTH, HEIGHT);
        p.setLimits(-ResidualHistogram.LIMIT, ResidualHistogram.LIMIT, 0, 1.1 * Math.max(max(observed), max(expected)));
        p.setColor(OBSERVED, OBSERVED);
        p.add("separated bar", x, observed);
        p.setColor(MODEL);
        p.setLineWidth(2);
        p.add("line", x, expected);
        p.setLineWidth(1);
        p.setColor(Color.BLACK);
        p.addLegend("residuals\tN(0, 1)", "top-right");
        return p;
    }

    /** Radially averaged power spectrum of the normalised residual, log scale, with the white-noise level 1. */
    public static Plot spectrum(ResidualSpectrum s) {
        int n = 0;
        for (double v : s.power()) {
            if (Double.isFinite(v) && v > 0) {
                n++;
            }
        }
        double[] f = new double[n];
        double[] p = new double[n];
        for (int i = 0, j = 0; i < s.power().length; i++) {
            if (Double.isFinite(s.power()[i]) && s.power()[i] > 0) {
                f[j] = s.frequency()[i];
                p[j++] = s.power()[i];
            }
        }
        Plot plot = new Plot("Residual power spectrum", "spatial frequency (cycles per voxel)", "power");
        plot.setFrameSize(WIDTH, HEIGHT);
        // log scale only when the low-frequency excess is large; a flat spectrum reads best on a linear axis
        boolean log = max(p) > 5;
        double hi = log ? 1.5 * max(p) : Math.max(2, 1.15 * max(p));
        double lo = log ? Math.min(0.5, 0.8 * min(p)) : 0;
        plot.setLimits(0, 0.5, lo, hi);
        if (log) {
            plot.setLogScaleY();
        }
        plot.setColor(MODEL);
        plot.add("line", new double[] {0, 0.5}, new double[] {1, 1});
        plot.setColor(OBSERVED);
        plot.setLineWidth(2);
        plot.add("line", f, p);
        plot.setLineWidth(1);
        plot.setColor(Color.BLACK);
        plot.addLegend("white noise\tresidual", "top-right");
        return plot;
    }

    /** chi^2 per voxel of each slice, with the expected level 1. */
    public static Plot chi2PerSlice(double[] chi2) {
        return chi2PerSlice(chi2, 0, chi2.length - 1);
    }

    /**
     * chi^2 per voxel of each slice, with the expected level 1; slices outside first..last (0-based, the trusted
     * planes) are drawn grey on a grey background: the border band.
     */
    public static Plot chi2PerSlice(double[] chi2, int first, int last) {
        if (first > 0 || last < chi2.length - 1) {
            return chi2WithBand(chi2, first, last);
        }
        double[] z = new double[chi2.length];
        for (int i = 0; i < z.length; i++) {
            z[i] = i + 1;
        }
        Plot p = new Plot("chi^2 per slice", "slice", "chi^2 per voxel");
        p.setFrameSize(WIDTH, HEIGHT);
        double hi = Math.max(1.5, 1.1 * max(chi2));
        double lo = Math.min(0.5, 0.9 * min(chi2));
        p.setLimits(0.5, Math.max(1.5, chi2.length + 0.5), Math.max(0, lo), hi);
        p.setColor(MODEL);
        p.add("line", new double[] {0.5, chi2.length + 0.5}, new double[] {1, 1});
        p.setColor(OBSERVED);
        p.setLineWidth(2);
        p.add(chi2.length > 1 ? "connected circle" : "circle", z, chi2);
        p.setLineWidth(1);
        p.setColor(Color.BLACK);
        p.addLegend("expected\tdata", "bottom-right");
        return p;
    }

    private static Plot chi2WithBand(double[] chi2, int first, int last) {
        Plot p = new Plot("chi^2 per slice", "slice", "chi^2 per voxel");
        p.setFrameSize(WIDTH, HEIGHT);
        // the axis follows the trusted planes; band values beyond it are drawn at its top edge
        double[] inside = java.util.Arrays.copyOfRange(chi2, first, last + 1);
        double hi = Math.max(1.5, 1.2 * max(inside));
        double lo = Math.max(0, Math.min(0.5, 0.9 * min(inside)));
        p.setLimits(0.5, Math.max(1.5, chi2.length + 0.5), lo, hi);
        Color shade = new Color(0xe4, 0xe4, 0xe4);
        p.setColor(shade, shade);
        if (first > 0) {
            p.add("bar", range(1, first), filled(first, hi));
        }
        if (last < chi2.length - 1) {
            p.add("bar", range(last + 2, chi2.length - last - 1), filled(chi2.length - last - 1, hi));
        }
        p.setColor(MODEL);
        p.add("line", new double[] {0.5, chi2.length + 0.5}, new double[] {1, 1});
        p.setLabel(-1, "expected");
        List<double[]> band = new java.util.ArrayList<>();
        List<double[]> inner = new java.util.ArrayList<>();
        for (int z = 0; z < chi2.length; z++) {
            if (Double.isFinite(chi2[z])) {
                boolean out = z < first || z > last;
                (out ? band : inner).add(new double[] {z + 1, out ? Math.min(chi2[z], 0.98 * hi) : chi2[z]});
            }
        }
        p.setColor(Color.GRAY);
        p.add("circle", column(band, 0), column(band, 1));
        p.setLabel(-1, "border band");
        p.setColor(OBSERVED);
        p.setLineWidth(2);
        p.add(inner.size() > 1 ? "connected circle" : "circle", column(inner, 0), column(inner, 1));
        p.setLabel(-1, "trusted planes");
        p.setLineWidth(1);
        p.setColor(Color.BLACK);
        p.addLegend(null, "bottom-right");
        return p;
    }

    private static double[] range(int from, int n) {
        double[] a = new double[n];
        for (int i = 0; i < n; i++) {
            a[i] = from + i;
        }
        return a;
    }

    private static double[] filled(int n, double v) {
        double[] a = new double[n];
        java.util.Arrays.fill(a, v);
        return a;
    }

    private static double[] column(List<double[]> rows, int c) {
        double[] a = new double[rows.size()];
        for (int i = 0; i < a.length; i++) {
            a[i] = rows.get(i)[c];
        }
        return a;
    }

    /**
     * The convergence curve of a run: the objective per iteration (a run record's history), on a log scale when
     * all values are positive and span more than a factor of 10.
     *
     * @param history objective value per iteration, first iteration first
     * @param objective what the values are, for the axis label (e.g. "negative log-likelihood")
     * @throws IllegalArgumentException when the history is empty or holds a non-finite value
     */
    public static Plot convergence(List<? extends Number> history, String objective) {
        if (history == null || history.isEmpty()) {
            throw new IllegalArgumentException("history is empty: give the objective value of each iteration");
        }
        double[] it = new double[history.size()];
        double[] v = new double[history.size()];
        for (int i = 0; i < v.length; i++) {
            Number x = history.get(i);
            v[i] = x == null ? Double.NaN : x.doubleValue();
            if (!Double.isFinite(v[i])) {
                throw new IllegalArgumentException("history[" + i + "] = " + x + " is not a finite number");
            }
            it[i] = i + 1;
        }
        Plot p = new Plot("Convergence", "iteration", objective);
        p.setFrameSize(WIDTH, HEIGHT);
        double lo = min(v);
        double hi = max(v);
        boolean log = lo > 0 && hi > 10 * lo;
        double pad = hi > lo ? 0.05 * (hi - lo) : Math.max(1e-12, 0.05 * Math.abs(hi));
        p.setLimits(0.5, v.length + 0.5, log ? lo / 1.2 : lo - pad, log ? hi * 1.2 : hi + pad);
        if (log) {
            p.setLogScaleY();
        }
        p.setColor(OBSERVED);
        p.setLineWidth(2);
        p.add(v.length > 1 ? "connected circle" : "circle", it, v);
        return p;
    }

    /**
     * The photon-transfer plot of one image: noise variance against mean level over the smooth parts (bins with
     * their standard errors) and the fitted line variance = gain * level + intercept (Janesick, "Photon Transfer",
     * SPIE 2007).
     *
     * @param levels (level ADU, variance ADU^2, standard error) per bin
     */
    public static Plot photonTransfer(double[][] levels, double slope, double intercept) {
        double[] x = new double[levels.length];
        double[] y = new double[levels.length];
        double[] e = new double[levels.length];
        for (int i = 0; i < levels.length; i++) {
            x[i] = levels[i][0];
            y[i] = levels[i][1];
            e[i] = levels[i][2];
        }
        Plot p = new Plot("Photon transfer", "mean level (ADU)", "noise variance (ADU^2)");
        p.setFrameSize(WIDTH, HEIGHT);
        double lo = min(x);
        double hi = max(x);
        double pad = hi > lo ? 0.05 * (hi - lo) : 1;
        double yHi = 0;
        for (int i = 0; i < y.length; i++) {
            yHi = Math.max(yHi, y[i] + e[i]);
        }
        p.setLimits(lo - pad, hi + pad, 0, 1.1 * Math.max(yHi, slope * (hi + pad) + intercept));
        p.setColor(OBSERVED);
        p.addPoints(x, y, e, Plot.CIRCLE);
        p.setColor(MODEL);
        p.setLineWidth(2);
        p.add("line", new double[] {lo - pad, hi + pad},
                new double[] {slope * (lo - pad) + intercept, slope * (hi + pad) + intercept});
        p.setLineWidth(1);
        p.setColor(Color.BLACK);
        p.addLegend("smooth blocks, binned\tfit", "top-left");
        return p;
    }

    static double max(double[] a) {
        double m = Double.NEGATIVE_INFINITY;
        for (double v : a) {
            if (Double.isFinite(v)) {
                m = Math.max(m, v);
            }
        }
        return m == Double.NEGATIVE_INFINITY ? 1 : m;
    }

    static double min(double[] a) {
        double m = Double.POSITIVE_INFINITY;
        for (double v : a) {
            if (Double.isFinite(v)) {
                m = Math.min(m, v);
            }
        }
        return m == Double.POSITIVE_INFINITY ? 0 : m;
    }
}
