package org.stackwright.repair;

/**
 * The common step of square tiles of a trimmed mosaic of shading only (tiles of equal gain), where neither axis has a
 * step of its own but each shows a gap of zeros at one of its seams. The gap fixes a seam exactly; the image's origin,
 * which fixes the step of an uncropped mosaic of three whole tiles (the gap at two steps), is lost by the trim, and
 * the other seams are too faint for a comb: only the vignetting every tile shares marks them, by a corner of the
 * shading's block profiles (falling to the border, rising after it) and, where the optical axis is off the tile's
 * centre, a small step (the two edges of a tile differ). Neither is exact alone: the corner's peak lies up to 5 px off
 * the border, and each axis's strongest step within that reach was the seam on about half of the axes (measured on the
 * 3x3 draws of 118 px of crop-tune and crop-tune2 b-shading). The tiles being square, one step serves both axes: the
 * step s whose teeth (through each axis's gaps) all have a corner within {@link #REACH} px, and whose summed step
 * evidence, exactly at the teeth (the weakest tooth of each axis), is the largest: exact on 17 of those 20 draws, both
 * axes of a draw supporting each other. An axis whose tiles were not square would have no teeth with corners at the
 * other axis's step; then nothing is found here. A square-tile reading of the same kind as
 * {@link SeamDetector#OTHER_AXIS}'s. Where one axis has a step (a comb) and the other none, the other takes it where
 * its teeth show corners ({@link #borrow}); else, where the square grid passes on both axes at another step, that
 * replaces the comb (two teeth of a trimmed axis, the gap and a stray step, made a comb of 191 for 118: crop-tune
 * b-shading-s7101).
 */
final class TrimmedShadingGrid {

    /**
     * the corner's robust z (about the median of all the axis's corners, in 1.4826 MAD) a tooth needs within
     * {@link #REACH}: fitted on the draws above, where the corners of true seams measured 2.9 to 10.3 and most stray
     * corners 4 or less; at 3 the grids of crop-tune s7119 and crop-tune2 s30113 failed on a seam's corner of 2.9 and
     * nothing was found, at 2.5 both meet all goals and no draw of those sets changed otherwise (17 of the 20 steps
     * exact)
     */
    static final double CORNER_Z = 2.5;
    /** pixels the corner's peak may lie from the border (fitted: 0 to 5 px on the draws above) */
    static final int REACH = 5;

    /**
     * @param step the common step
     * @param phaseX the first vertical seam border, in [0, step)
     * @param phaseY the first horizontal seam border
     * @param teethX the vertical seams' borders
     * @param teethY the horizontal seams' borders
     */
    record Grid(int step, int phaseX, int phaseY, int[] teethX, int[] teethY) {
    }

    private TrimmedShadingGrid() {
    }

    /**
     * @param ex the step evidence along x over the whole height, ey along y
     * @param px the shading's block profiles along x, py along y
     * @return the grid, or null when an axis has no gap or no step passes
     */
    static Grid find(SeamEvidence ex, SeamEvidence ey, SeamTemplate.Profiles px, SeamTemplate.Profiles py) {
        int[] gx = GapTiling.starts(ex);
        int[] gy = GapTiling.starts(ey);
        if (gx.length == 0 || gy.length == 0) {
            return null;
        }
        double[] cx = cornerZ(px);
        double[] cy = cornerZ(py);
        int hi = Math.min(ex.length(), ey.length()) - 1;
        double best = 0;
        int bestS = 0;
        for (int s = SeamComb.MIN_PITCH; s <= hi; s++) {
            double a = axisScore(ex, cx, gx, s);
            double b = axisScore(ey, cy, gy, s);
            if (a >= 0 && b >= 0 && a + b > best) {
                best = a + b;
                bestS = s;
            }
        }
        if (bestS == 0) {
            return null;
        }
        int phX = Math.floorMod(gx[0], bestS);
        int phY = Math.floorMod(gy[0], bestS);
        return new Grid(bestS, phX, phY, teeth(phX, bestS, ex.length()), teeth(phY, bestS, ey.length()));
    }

    /**
     * The other axis's step carried to an axis without one (square tiles): its teeth through the axis's gaps must all
     * show the shading's corner, as in {@link #find}.
     *
     * @param e the step evidence along the axis without a step, p its shading's block profiles
     * @param s the other axis's step
     * @return the teeth (their phase the first), or null when the axis has no gap or the step does not pass
     */
    static int[] borrow(SeamEvidence e, SeamTemplate.Profiles p, int s) {
        int[] g = GapTiling.starts(e);
        if (g.length == 0 || s < SeamComb.MIN_PITCH || axisScore(e, cornerZ(p), g, s) < 0) {
            return null;
        }
        return teeth(Math.floorMod(g[0], s), s, e.length());
    }

    /**
     * @return the weakest step evidence, exactly at the teeth of step s through the gaps, of the teeth that are not
     *     gaps, or -1 when a gap lies off the teeth (by more than a pixel), no tooth but the gaps can be weighed, or a
     *     tooth has no corner of at least {@link #CORNER_Z} within {@link #REACH} px
     */
    private static double axisScore(SeamEvidence e, double[] corner, int[] gaps, int s) {
        int n = e.length();
        int ph = Math.floorMod(gaps[0], s);
        for (int g : gaps) {
            int d = Math.floorMod(g - ph, s);
            if (Math.min(d, s - d) > 1) {
                return -1;
            }
        }
        double weakest = Double.MAX_VALUE;
        int counted = 0;
        for (int t : teeth(ph, s, n)) {
            boolean gap = false;
            for (int g : gaps) {
                gap |= Math.abs(t - g) <= 1;
            }
            if (gap) {
                continue;
            }
            double top = Double.NEGATIVE_INFINITY;
            for (int q = Math.max(0, t - REACH); q <= Math.min(n - 1, t + REACH); q++) {
                top = Double.isNaN(corner[q]) ? top : Math.max(top, corner[q]);
            }
            if (top < CORNER_Z) {
                return -1;
            }
            weakest = Math.min(weakest, e.strength(t));
            counted++;
        }
        return counted == 0 ? -1 : weakest;
    }

    /** @return the borders ph + k s where the corner can be weighed (its fits inside the axis) */
    static int[] teeth(int ph, int s, int n) {
        int fit = SeamTemplate.FIT;
        return java.util.stream.IntStream.iterate(ph, b -> b < n, b -> b + s).filter(b -> b >= fit && b + fit <= n)
                .toArray();
    }

    /**
     * @return at every border b the corner of the shading's block profiles (slope of a straight line over the
     *     {@link SeamTemplate#FIT} positions after b less that over the FIT before, median over the blocks) as a robust
     *     z about the median of all borders, NaN where a fit meets a position without data
     */
    static double[] cornerZ(SeamTemplate.Profiles p) {
        int n = p.length();
        int fit = SeamTemplate.FIT;
        double[] k = new double[n];
        java.util.Arrays.fill(k, Double.NaN);
        double[] all = new double[n];
        double[] c = new double[p.m.length];
        int m = 0;
        for (int b = fit; b + fit <= n; b++) {
            boolean valid = true;
            for (int i = b - fit; i < b + fit; i++) {
                valid &= p.valid[i];
            }
            if (!valid) {
                continue;
            }
            for (int j = 0; j < p.m.length; j++) {
                c[j] = ShadingRules.slope(p.m[j], b) - ShadingRules.slope(p.m[j], b - fit);
            }
            k[b] = SeamTemplate.select(c, c.length);
            all[m++] = k[b];
        }
        if (m < 2) {
            return k;
        }
        double[] ms = RobustStats.medianSigma(all, m);
        for (int b = 0; b < n; b++) {
            k[b] = ms[1] > 0 ? (k[b] - ms[0]) / ms[1] : Double.NaN;
        }
        return k;
    }
}
