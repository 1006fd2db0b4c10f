package org.stackwright.psf;

/**
 * Lateral convolution of a radially symmetric profile f(r) with a uniform disc of radius a (the confocal pinhole
 * projected into the sample), done on the radial profile itself:
 *
 * <pre>
 *   (f * disc)(r) = integral_0^inf f(s) 2 phi(r, s) s ds,   phi = arccos((r^2 + s^2 - a^2) / (2 r s)) clipped to [0, pi]
 * </pre>
 *
 * where 2 phi s is the length of the circle of radius s (around the optical axis) that lies inside the disc
 * centred at distance r. The integral is taken on sub-samples of spacing dr / 8 with f linear between its
 * samples; the weights are banded (|r - s| <= a) and computed once.
 */
final class PinholeFilter {

    private static final int SUB = 8;

    private final int outputs;
    private final int[] first;
    private final double[][] rows;
    private final int inputs;

    /**
     * @param outputs number of output radii r = 0, dr, ...
     * @param dr radial spacing, micrometres
     * @param radius pinhole radius in the sample, micrometres (positive)
     */
    PinholeFilter(int outputs, double dr, double radius) {
        this.outputs = outputs;
        this.first = new int[outputs];
        this.rows = new double[outputs][];
        int most = 0;
        double ds = dr / SUB;
        for (int i = 0; i < outputs; i++) {
            double r = i * dr;
            double s0 = Math.max(0, r - radius);
            double s1 = r + radius;
            int lo = (int) Math.floor(s0 / dr);
            int hi = (int) Math.ceil(s1 / dr) + 1;
            double[] w = new double[hi - lo + 1];
            int steps = (int) Math.ceil((s1 - s0) / ds);
            double step = (s1 - s0) / steps;
            for (int q = 0; q < steps; q++) {
                double s = s0 + (q + 0.5) * step;
                double arc = 2 * angle(r, s, radius) * s * step;
                double t = s / dr;
                int b = (int) Math.floor(t);
                double f = t - b;
                w[b - lo] += arc * (1 - f);
                w[b + 1 - lo] += arc * f;
            }
            first[i] = lo;
            rows[i] = w;
            most = Math.max(most, hi + 1);
        }
        this.inputs = most;
    }

    private static double angle(double r, double s, double a) {
        if (r == 0 || s == 0) {
            return s < a ? Math.PI : 0;
        }
        double c = (r * r + s * s - a * a) / (2 * r * s);
        return c <= -1 ? Math.PI : (c >= 1 ? 0 : Math.acos(c));
    }

    /** @return how many input samples a profile must hold */
    int neededInputs() {
        return inputs;
    }

    /**
     * @param in input profile, at least {@link #neededInputs()} samples, not modified
     * @param out receives {@code outputs} samples (modified; must not be {@code in})
     */
    void apply(double[] in, double[] out) {
        for (int i = 0; i < outputs; i++) {
            double[] w = rows[i];
            int lo = first[i];
            double v = 0;
            for (int k = 0; k < w.length; k++) {
                v += w[k] * in[lo + k];
            }
            out[i] = v;
        }
    }

    /** @return the filtered value at r = 0 only */
    double atCentre(double[] in) {
        double[] w = rows[0];
        double v = 0;
        for (int k = 0; k < w.length; k++) {
            v += w[k] * in[first[0] + k];
        }
        return v;
    }
}
