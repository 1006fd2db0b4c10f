package org.stackwright.inspect;

import org.apache.commons.math3.special.Erf;

/**
 * Histogram of normalised residuals on fixed bins from -{@value #LIMIT} to +{@value #LIMIT}, with the counts a
 * standard normal N(0, 1) would give for the same number of values. Values beyond the range are counted apart.
 *
 * @param edges bin edges, length bins + 1
 * @param counts observed counts per bin
 * @param expected counts expected under N(0, 1): n (Phi(b) - Phi(a))
 * @param below values below the first edge
 * @param above values above the last edge
 * @param total number of values
 */
public record ResidualHistogram(double[] edges, long[] counts, double[] expected, long below, long above, long total) {

    /** Range of the bins, in standard deviations. */
    public static final double LIMIT = 6;
    /** Bin width, in standard deviations. */
    public static final double WIDTH = 0.25;

    /** Counts the values (not modified). */
    public static ResidualHistogram of(float[] r) {
        int bins = (int) Math.round(2 * LIMIT / WIDTH);
        double[] edges = new double[bins + 1];
        for (int i = 0; i <= bins; i++) {
            edges[i] = -LIMIT + i * WIDTH;
        }
        long[] counts = new long[bins];
        long below = 0;
        long above = 0;
        for (float v : r) {
            if (v < -LIMIT) {
                below++;
            } else if (v >= LIMIT) {
                above++;
            } else {
                counts[Math.min(bins - 1, (int) ((v + LIMIT) / WIDTH))]++;
            }
        }
        double[] expected = new double[bins];
        for (int i = 0; i < bins; i++) {
            expected[i] = r.length * normalMass(edges[i], edges[i + 1]);
        }
        return new ResidualHistogram(edges, counts, expected, below, above, r.length);
    }

    /** @return P(a <= Z < b) for a standard normal Z */
    static double normalMass(double a, double b) {
        return 0.5 * Erf.erf(a / Math.sqrt(2), b / Math.sqrt(2));
    }

    /** @return bin centres */
    public double[] centres() {
        double[] c = new double[counts.length];
        for (int i = 0; i < c.length; i++) {
            c[i] = 0.5 * (edges[i] + edges[i + 1]);
        }
        return c;
    }
}
