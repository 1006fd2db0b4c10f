package org.stackwright.repair;

import org.stackwright.volume.Volume;

/**
 * How strongly each border between two neighbouring pixel columns (or rows) looks like a tile seam, over a band of
 * lines: two sign tests and a count of missing data.
 *
 * <p>Step: for each line, the step d(b) = I(b) - I(b-1) minus the median of the nearby steps (2 to {@link #REACH}
 * pixels away on both sides, which removes smooth slopes such as vignetting and large structures). A change of
 * gain between tiles, a dimmed band or the edge of a gap steps the same way in nearly every line; structure and
 * noise do not.
 *
 * <p>Kink: for each line, k(b) = the slope of a straight-line fit over the {@link #FIT} pixels right of b minus that
 * over the FIT pixels left of b, and the corner test e(b) = k(b) - (k(b - s) + k(b + s)) / 2, s = {@link
 * #KINK_SPAN}. Shading has gentle slopes at a tile's border (a few tenths of a photon per pixel), so the fits are
 * long: the noise of a fitted slope falls as FIT^(-3/2). Where each tile is
 * darkened towards its border by shading, the profile across a seam has a corner (falling to the seam, rising after
 * it) in every line, even when the two tiles have the same gain: e keeps half of the corner's slope change. Any
 * quadratic profile (smooth shading, the top of a large structure) gives a k linear in b and e = 0 exactly.
 *
 * <p>For both, the lines are taken in blocks of {@link #BLOCK}; in each block the signs are counted and the sign-test
 * statistic z = (n+ - n-) / sqrt(N) measures how consistently the border steps (kinks) one way (Dixon & Mood, "The
 * statistical sign test", J. Am. Stat. Assoc. 41:557-566, 1946; ties count for neither side). The block z's are
 * combined as a chi-square, sum z^2 with one degree of freedom per block under the null, and reported as the
 * z-score (chi^2 - nb) / sqrt(2 nb) with the sign of the overall count: a horizontal seam between two tile rows
 * steps up under one tile and down under the next (the gains differ tile by tile), which cancels in a single count
 * over the whole line but not in the blocks. The step test is made twice, over blocks of {@link #BLOCK} and of
 * {@link #LONG_BLOCK} lines (their chi-square, over few blocks, turned into a normal deviate by Wilson & Hilferty
 * 1931), each rescaled by the empirical null, and the larger is kept: long blocks have more power where a tile is
 * much wider. Corners of shading have one sign everywhere and keep the single
 * count over all lines, which has more power for a weak consistent effect. Over a single tile row (between two
 * horizontal seams found) the border of two tiles steps one way in every line, so there the step's block statistic
 * must also show in the plain count over all lines ({@link #ONE_SIGN}): structure that steps for a few lines fills
 * a block or two (the short blocks' chi-square has heavy tails) but not the whole row. The shares of lines where
 * pixel b is a missing-data zero mark the gaps a stitcher leaves.
 */
final class SeamEvidence {

    /** steps d(b-REACH .. b-2) and d(b+2 .. b+REACH) give the local slope */
    static final int REACH = 6;
    /** pixels in each straight-line fit of the kink test */
    static final int FIT = 12;
    /** the kink at b is compared with the mean of the kinks this far on either side */
    static final int KINK_SPAN = 6;
    /** lines per block of the sign test */
    static final int BLOCK = 16;
    /** lines per block of the second, longer sign test: more power where a tile is much wider than BLOCK */
    static final int LONG_BLOCK = 64;
    /**
     * Over one tile row, the plain sign count over all its lines (a normal deviate after the empirical null) a step
     * needs for its block statistic to stand: a border between two tiles steps one way along the whole row, a
     * structure that crosses it for a few lines fills a block or two. On the independent mosaics of
     * {@code tools/reference/make_mosaics.py} (tune draws, tile rows of 90-130 lines) the block statistic exceeded
     * the tooth limit 4 at 16-19 of 1000 borders without a seam and the gate keeps 1.3-2.7 of them, while 95-100 %
     * of the seams above the tooth limit pass it (our measurement, with a numpy copy of these statistics; P(|z| >= 3)
     * = 0.0027 under the null).
     */
    static final double ONE_SIGN = 3;

    /** sign-test z of the step at border b (between pixels b-1 and b), 0 where not defined */
    final double[] step;
    /** sign-test z of the kink at border b */
    final double[] kink;
    /** share of lines in which pixel b is an exact zero */
    final double[] zeros;

    private SeamEvidence(double[] step, double[] kink, double[] zeros) {
        this.step = step;
        this.kink = kink;
        this.zeros = zeros;
    }

    /** @return the larger of |step| and |kink| at border b */
    double strength(int b) {
        return b <= 0 || b >= step.length ? 0 : Math.max(Math.abs(step[b]), Math.abs(kink[b]));
    }

    /**
     * @return the evidence at b for the tile period: 0 at the edges of a narrow line and between its two pixels (a
     *     defective column or a thin structure does not separate two tiles; the two columns of a line two pixels wide
     *     may differ: crop-tune2 e-lines-s30402, z 5 between those of its line at x=196 in one tile row, a tooth of a
     *     snake grid of 87 for 130 whose band then covered the line), else {@link #strength}
     */
    double combStrength(int b, double limit) {
        if (b <= 0 || b >= step.length) {
            return 0;
        }
        return tables(limit)[0][b];
    }

    /** combStrength and peak at every border for one limit, computed once (the comb asks millions of times) */
    private double[][] tables(double limit) {
        if (cache != null && cacheLimit == limit) {
            return cache;
        }
        int n = step.length;
        double[] comb = new double[n];
        for (int b = 1; b < n; b++) {
            comb[b] = combStrengthUncached(b, limit);
        }
        // a gap of zeros has two edges of equal strength: both count for its first border, so that the comb's
        // teeth cannot move by the width of a gap from one edge to the other
        for (int b = 2; b < n; b++) {
            if (zeros[b - 1] >= 0.5 && zeros[b] < 0.5) {
                int o = b - 1;
                while (o > 0 && zeros[o - 1] >= 0.5) {
                    o--;
                }
                if (o > 0 && b - o <= SeamDetector.MAX_BAND) {
                    comb[o] = Math.max(comb[o], comb[b]);
                    comb[b] = 0;
                }
            }
        }
        double[] pk = new double[n];
        for (int b = 1; b < n; b++) {
            boolean max = true;
            for (int d = -2; d <= 2 && max; d++) {
                max = d == 0 || b + d <= 0 || b + d >= n || comb[b + d] <= comb[b];
            }
            pk[b] = max ? comb[b] : 0;
        }
        cache = new double[][] {comb, pk};
        cacheLimit = limit;
        return cache;
    }

    private double[][] cache;
    private double cacheLimit;

    private double combStrengthUncached(int b, double limit) {
        for (int s = b - 2; s <= b; s++) {
            int wdt = narrowLine(s, limit);
            if (wdt > 0 && b - s <= wdt) {
                return 0;
            }
        }
        return strength(b);
    }

    /**
     * @return {@link #combStrength} at b when it is the largest within 2 pixels, else 0: one peak per feature, so
     *     that evidence spread over a few borders (the corner test looks 5 pixels to each side) cannot fill the
     *     teeth of a slightly wrong pitch
     */
    double peak(int b, double limit) {
        return b <= 0 || b >= step.length ? 0 : tables(limit)[1][b];
    }

    /** @return number of borders + 1: the length of the axis */
    int length() {
        return step.length;
    }

    /**
     * @param v the image, not modified
     * @param alongX true for vertical seams (borders between columns), false for horizontal ones
     * @param from first line of the band (a row for alongX, else a column)
     * @param to one past the last line
     */
    static SeamEvidence of(Volume v, boolean alongX, int from, int to) {
        return of(v, alongX, from, to, false);
    }

    /**
     * @param oneTile true when the lines [from, to) are one tile row (between two horizontal seams found): the step
     *     of a seam then keeps its sign along all of them, and block evidence the plain count over all lines does not
     *     confirm ({@link #ONE_SIGN}) is cut down to it
     */
    static SeamEvidence of(Volume v, boolean alongX, int from, int to, boolean oneTile) {
        int w = v.width();
        int h = v.height();
        int n = alongX ? w : h;
        int step = alongX ? 1 : w;
        int lineStep = alongX ? w : 1;
        long[] sp = new long[n];
        long[] sm = new long[n];
        long[] kp = new long[n];
        long[] km = new long[n];
        // counts of the current block of lines, and the sums of squared block z-scores
        long[] bsp = new long[n];
        long[] bsm = new long[n];
        long[] bkp = new long[n];
        long[] bkm = new long[n];
        double[] chiStep = new double[n];
        double[] chiKink = new double[n];
        int blocks = 0;
        int inBlock = 0;
        // the same counts over blocks of LONG_BLOCK lines
        long[] lsp = new long[n];
        long[] lsm = new long[n];
        double[] chiLong = new double[n];
        int longBlocks = 0;
        int inLong = 0;
        long[] zero = new long[n];
        float[] f = v.data();
        double[] line = new double[n];
        double[] d = new double[n];
        double[] k = new double[n];
        double[] window = new double[2 * REACH];
        int lines = 0;
        for (int z = 0; z < v.depth(); z++) {
            int base = z * w * h;
            for (int l = from; l < to; l++, lines++) {
                int o = base + l * lineStep;
                for (int i = 0; i < n; i++) {
                    line[i] = f[o + i * step];
                    if (line[i] == 0) {
                        zero[i]++;
                    }
                }
                for (int b = 1; b < n; b++) {
                    d[b] = line[b] - line[b - 1];
                }
                for (int b = REACH + 1; b < n - REACH; b++) {
                    int m = 0;
                    for (int j = 2; j <= REACH; j++) {
                        window[m++] = d[b - j];
                        window[m++] = d[b + j];
                    }
                    double e = d[b] - RobustStats.medianInPlace(window, m);
                    if (e > 0) {
                        bsp[b]++;
                    } else if (e < 0) {
                        bsm[b]++;
                    }
                }
                for (int b = FIT; b <= n - FIT; b++) {
                    k[b] = slope(line, b, b + FIT) - slope(line, b - FIT, b);
                }
                for (int b = FIT + KINK_SPAN; b <= n - FIT - KINK_SPAN; b++) {
                    double e = k[b] - 0.5 * (k[b - KINK_SPAN] + k[b + KINK_SPAN]);
                    if (e > 0) {
                        bkp[b]++;
                    } else if (e < 0) {
                        bkm[b]++;
                    }
                }
                boolean last = z == v.depth() - 1 && l == to - 1;
                if (++inBlock == BLOCK || last) {
                    inLong += inBlock;
                    double root = Math.sqrt(inBlock);
                    for (int b = 0; b < n; b++) {
                        lsp[b] += bsp[b];
                        lsm[b] += bsm[b];
                        double zs = (bsp[b] - bsm[b]) / root;
                        double zk = (bkp[b] - bkm[b]) / root;
                        chiStep[b] += zs * zs;
                        chiKink[b] += zk * zk;
                        sp[b] += bsp[b];
                        sm[b] += bsm[b];
                        kp[b] += bkp[b];
                        km[b] += bkm[b];
                    }
                    java.util.Arrays.fill(bsp, 0);
                    java.util.Arrays.fill(bsm, 0);
                    java.util.Arrays.fill(bkp, 0);
                    java.util.Arrays.fill(bkm, 0);
                    blocks++;
                    inBlock = 0;
                }
                if (inLong == LONG_BLOCK || (last && inLong > 0)) {
                    double root = Math.sqrt(inLong);
                    for (int b = 0; b < n; b++) {
                        double zl = (lsp[b] - lsm[b]) / root;
                        chiLong[b] += zl * zl;
                    }
                    java.util.Arrays.fill(lsp, 0);
                    java.util.Arrays.fill(lsm, 0);
                    longBlocks++;
                    inLong = 0;
                }
            }
        }
        double[] zs = new double[n];
        double[] zk = new double[n];
        double[] zr = new double[n];
        double nb = Math.max(1, blocks);
        double nl = Math.max(1, longBlocks);
        double[] zl = new double[n];
        for (int b = 0; b < n; b++) {
            zl[b] = Math.copySign(wilsonHilferty(chiLong[b], nl), sp[b] - sm[b] == 0 ? 1 : sp[b] - sm[b]);
            // sum of nb squared block z's: chi-square with nb degrees of freedom under the null, as a z-score
            zs[b] = Math.copySign((chiStep[b] - nb) / Math.sqrt(2 * nb), sp[b] - sm[b] == 0 ? 1 : sp[b] - sm[b]);
            // shading darkens every tile towards its border: its corners have one sign everywhere, so the plain count
            // over all lines keeps more power than the blocks
            zk[b] = (kp[b] - km[b]) / Math.sqrt(Math.max(1, lines));
            zr[b] = zero[b] / (double) Math.max(1, lines);
        }
        emptyNull(zs, REACH + 1, n - REACH);
        if (longBlocks > 1) {
            // a seam whose step keeps its sign over a whole tile width: the long blocks have more power
            emptyNull(zl, REACH + 1, n - REACH);
            for (int b = 0; b < n; b++) {
                if (Math.abs(zl[b]) > Math.abs(zs[b])) {
                    zs[b] = zl[b];
                }
            }
        }
        if (oneTile) {
            // one tile row: a seam steps one way along all of it; a block statistic the plain count does not confirm
            // is a structure that steps for a few lines, and falls to the plain count
            double[] zp = new double[n];
            for (int b = 0; b < n; b++) {
                zp[b] = (sp[b] - sm[b]) / Math.sqrt(Math.max(1, lines));
            }
            emptyNull(zp, REACH + 1, n - REACH);
            for (int b = 0; b < n; b++) {
                if ((Math.abs(zp[b]) < ONE_SIGN || zp[b] * zs[b] < 0) && Math.abs(zp[b]) < Math.abs(zs[b])) {
                    zs[b] = zp[b];
                }
            }
        }
        emptyNull(zk, FIT + KINK_SPAN, n - FIT - KINK_SPAN + 1);
        // a step inside the fit windows looks like a change of slope: corners next to a stronger step are its echo
        double[] kink = zk.clone();
        for (int b = 0; b < n; b++) {
            for (int q = Math.max(0, b - FIT - KINK_SPAN); q <= Math.min(n - 1, b + FIT + KINK_SPAN) && kink[b] != 0; q++) {
                if (q != b && Math.abs(zs[q]) > Math.abs(zk[b])) {
                    kink[b] = 0;
                }
            }
        }
        return new SeamEvidence(zs, kink, zr);
    }

    /**
     * Rescales z over [from, to) by the empirical null: z' = (z - median) / max(1, 1.4826 MAD) over all borders.
     * Lines of one image are not independent (structure runs across many of them, slices repeat the specimen), so
     * z spreads wider than N(0, 1) even where there is no seam; seams are few, so the median and MAD of all borders
     * measure that spread (Efron, "Large-scale simultaneous hypothesis testing: the choice of a null hypothesis",
     * J. Am. Stat. Assoc. 99:96-104, 2004). The scale is never taken below 1, the spread of the sign test itself.
     */
    static void emptyNull(double[] z, int from, int to) {
        if (to - from < 8) {
            return;
        }
        double[] ms = RobustStats.medianSigma(java.util.Arrays.copyOfRange(z, from, to), to - from);
        double scale = Math.max(1, ms[1]);
        for (int b = 0; b < z.length; b++) {
            z[b] = b >= from && b < to ? (z[b] - ms[0]) / scale : 0;
        }
    }

    /**
     * @return the chi-square value c with k degrees of freedom as a standard normal deviate (Wilson & Hilferty, "The
     *     distribution of chi-square", Proc. Natl. Acad. Sci. USA 17:684-688, 1931): with few blocks the chi-square
     *     is skewed, and the empirical null's median and MAD would misjudge its upper tail
     */
    static double wilsonHilferty(double c, double k) {
        double v = 2 / (9 * k);
        return (Math.cbrt(Math.max(0, c) / k) - (1 - v)) / Math.sqrt(v);
    }

    /** Least-squares slope of line[from .. to) against the position. */
    private static double slope(double[] line, int from, int to) {
        int m = to - from;
        double mt = 0.5 * (from + to - 1);
        double num = 0;
        double den = 0;
        for (int t = from; t < to; t++) {
            num += (t - mt) * line[t];
            den += (t - mt) * (t - mt);
        }
        return num / den;
    }

    /** @return whether the step at e is at least as strong as every step of its sign in the 3 borders after it */
    private boolean closes(int e) {
        for (int b = e + 1; b <= Math.min(step.length - 1, e + 3); b++) {
            if (step[b] * step[e] > 0 && Math.abs(step[b]) > Math.abs(step[e])) {
                return false;
            }
        }
        return true;
    }

    /**
     * A narrow line: strong steps of opposite sign and similar size (within a factor 2) at b and within 2 pixels
     * after it (a defective column or a structure one or two pixels wide: the level after it is the level before),
     * with no missing data. A weaker opposite step inside a wider band, followed by the band's real closing edge, is
     * only the echo of removing the median of the nearby steps.
     *
     * @return the width of the line (1 or 2) starting at pixel b, or 0 when it is no narrow line
     */
    int narrowLine(int b, double limit) {
        for (int wdt = 1; wdt <= 2; wdt++) {
            int e = b + wdt;
            double lo = Math.min(Math.abs(step[Math.max(0, b)]), Math.abs(step[Math.min(step.length - 1, e)]));
            double hi = Math.max(Math.abs(step[Math.max(0, b)]), Math.abs(step[Math.min(step.length - 1, e)]));
            if (b > 0 && e < step.length && lo > limit && lo >= 0.5 * hi && step[b] * step[e] < 0 && zeros[b] < 0.5
                    && closes(e)) {
                return wdt;
            }
        }
        return 0;
    }
}
