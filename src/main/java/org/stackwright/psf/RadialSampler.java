package org.stackwright.psf;

/**
 * Turns a radial profile f(r) (samples at r = 0, dr, 2 dr, ...) into one plane of pixels centred on the middle
 * pixel, each pixel holding the mean of f over its area. The area mean is a midpoint rule on s x s sub-pixels, and
 * f between radial samples is interpolated with the Keys cubic (a = -0.5; Keys, "Cubic convolution interpolation
 * for digital image processing", IEEE TASSP 29(6):1153-1160, 1981). All of this is linear in f, so the weights of
 * every pixel are summed once into a short run of radial samples; a plane then costs about ten multiply-adds per
 * pixel. Pixels are filled by mirror symmetry from one quadrant, so x and y profiles of a square-pixel plane are
 * exactly equal.
 */
final class RadialSampler {

    private final int nx;
    private final int hx;
    private final int hy;
    private final int[] start;
    private final int[] length;
    private final int[] offset;
    private final double[] weight;
    private final int needed;

    /**
     * @param nx plane width, odd
     * @param ny plane height, odd
     * @param px pixel width, micrometres
     * @param py pixel height, micrometres
     * @param dr radial spacing of the profiles, micrometres
     * @param sub sub-pixels per pixel side (odd; 1 = value at the pixel centre)
     */
    RadialSampler(int nx, int ny, double px, double py, double dr, int sub) {
        this.nx = nx;
        this.hx = nx / 2;
        this.hy = ny / 2;
        int cells = (hx + 1) * (hy + 1);
        start = new int[cells];
        length = new int[cells];
        offset = new int[cells];
        double maxR = Math.hypot((hx + 0.5) * px, (hy + 0.5) * py);
        int maxIndex = (int) Math.ceil(maxR / dr) + 3;
        double[] local = new double[maxIndex + 2];
        java.util.ArrayList<double[]> runs = new java.util.ArrayList<>();
        int total = 0;
        int most = 0;
        double share = 1.0 / (sub * sub);
        for (int ay = 0; ay <= hy; ay++) {
            for (int ax = 0; ax <= hx; ax++) {
                int lo = Integer.MAX_VALUE;
                int hi = -1;
                for (int v = 0; v < sub; v++) {
                    double y = (ay + (v - (sub - 1) / 2.0) / sub) * py;
                    for (int u = 0; u < sub; u++) {
                        double x = (ax + (u - (sub - 1) / 2.0) / sub) * px;
                        double t = Math.hypot(x, y) / dr;
                        int i = (int) Math.floor(t);
                        double f = t - i;
                        for (int tap = -1; tap <= 2; tap++) {
                            int idx = Math.abs(i + tap);
                            local[idx] += share * KeysCubic.kernel(tap - f);
                            lo = Math.min(lo, idx);
                            hi = Math.max(hi, idx);
                        }
                    }
                }
                int cell = ay * (hx + 1) + ax;
                double[] run = new double[hi - lo + 1];
                for (int i = lo; i <= hi; i++) {
                    run[i - lo] = local[i];
                    local[i] = 0;
                }
                start[cell] = lo;
                length[cell] = run.length;
                offset[cell] = total;
                total += run.length;
                most = Math.max(most, hi + 1);
                runs.add(run);
            }
        }
        weight = new double[total];
        for (int c = 0; c < cells; c++) {
            System.arraycopy(runs.get(c), 0, weight, offset[c], length[c]);
        }
        needed = most;
    }


    /** @return how many radial samples a profile must hold */
    int neededRadii() {
        return needed;
    }

    /**
     * Fills one plane from a profile; negative interpolation overshoots near zeros of f are set to 0.
     *
     * @param profile at least {@link #neededRadii()} samples, not modified
     * @param plane receives nx*ny pixels starting at planeOffset (modified)
     */
    void fill(double[] profile, float[] plane, int planeOffset) {
        for (int ay = 0; ay <= hy; ay++) {
            for (int ax = 0; ax <= hx; ax++) {
                int cell = ay * (hx + 1) + ax;
                int s0 = start[cell];
                int o = offset[cell];
                double v = 0;
                for (int i = 0; i < length[cell]; i++) {
                    v += weight[o + i] * profile[s0 + i];
                }
                float f = (float) Math.max(0, v);
                int xp = hx + ax;
                int xm = hx - ax;
                int yp = planeOffset + (hy + ay) * nx;
                int ym = planeOffset + (hy - ay) * nx;
                plane[yp + xp] = f;
                plane[yp + xm] = f;
                plane[ym + xp] = f;
                plane[ym + xm] = f;
            }
        }
    }
}
