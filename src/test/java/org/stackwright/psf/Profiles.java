package org.stackwright.psf;

/** Small helpers for tests: half-maximum crossings and minima of sampled 1D profiles. */
final class Profiles {

    private Profiles() {
    }

    /**
     * @return the position (in sample units from index 0) where a profile that falls from its value at index 0
     *     first drops below half of it, by linear interpolation
     */
    static double halfMaximumFromStart(double[] p) {
        double half = p[0] / 2;
        for (int i = 1; i < p.length; i++) {
            if (p[i] < half) {
                return i - 1 + (p[i - 1] - half) / (p[i - 1] - p[i]);
            }
        }
        throw new AssertionError("profile never falls to half its maximum");
    }

    /** @return the first local minimum after index 0, refined by a parabola through three samples */
    static double firstMinimum(double[] p) {
        for (int i = 1; i < p.length - 1; i++) {
            if (p[i] <= p[i - 1] && p[i] <= p[i + 1]) {
                double den = p[i - 1] - 2 * p[i] + p[i + 1];
                return i + (den > 0 ? 0.5 * (p[i - 1] - p[i + 1]) / den : 0);
            }
        }
        throw new AssertionError("profile has no minimum");
    }

    /** @return the x profile through the centre voxel of a volume, from the centre outwards */
    static double[] fromCentreX(org.stackwright.volume.Volume v) {
        int c = v.width() / 2;
        double[] p = new double[c + 1];
        for (int i = 0; i <= c; i++) {
            p[i] = v.get(c + i, v.height() / 2, v.depth() / 2);
        }
        return p;
    }
}
