package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.QRDecomposition;
import org.stackwright.volume.Volume;

/**
 * Estimates a gain per tile of a stitched image from the pixels beside each seam: just left and right of a vertical
 * seam (above and below a horizontal one) the two tiles see nearly the same specimen. For each line across the seam,
 * one straight line with a step at the seam is fitted to a strip on each side (the specimen's slope is shared, so it
 * does not pass for a gain step; gaps of zeros are skipped), and the log ratio of the two sides at the seam is one
 * sample of log(g_b / g_a). Tukey's biweight over the lines gives the pair's ratio: the lines where a cell or a
 * fibre lies on one side only fall out, and unlike a median it is not pushed into the tail when such lines lean one
 * way (the ratio of the two sides' medians, used before, erred by up to 19 % under a dense specimen). The strips
 * lie right beside the seam, where the two sides' specimen is most alike (strips 8 px apart already differ by
 * several per cent under cells and fibres), unless the band's own pixels are damaged (a darker line): both are
 * tried and the one that agrees better around the loops of the tile grid is kept. The log gains of all tiles follow
 * by linear least squares over every neighbouring pair, with their mean fixed at 0 (gains relative to the average
 * tile): common practice for gain compensation of mosaics, no single source. A structure that runs along a seam over
 * most of its length still biases the pair; the misfit around closed loops of tiles (rmsLogResidual) shows it. This
 * is a report: nothing is changed unless {@link #apply} is called on request.
 */
public final class TileLevelling {

    /**
     * @param gains per tile, row-major (rows x columns), geometric mean 1
     * @param pairs number of neighbouring tile pairs used
     * @param rmsLogResidual root mean square misfit of the pair ratios in log units (consistency of the estimate)
     * @param ratios the pair equations {tile a, tile b, log(g_b / g_a)} measured at the seams
     */
    public record Gains(int rows, int columns, double[] gains, int pairs, double rmsLogResidual, List<double[]> ratios) {
    }

    /** most exact zeros (no data) skipped at the start of a strip: a gap a stitcher left between the tiles */
    static final int GAP_SKIP = 16;

    private TileLevelling() {
    }

    /**
     * @param image the stitched image or stack, not modified
     * @param columnBands vertical seam bands [start, end) in x, ascending (columns - 1 of them)
     * @param rowBands horizontal seam bands [start, end) in y, ascending (rows - 1)
     * @param strip width of the band used on each side of a seam, pixels
     * @param offset camera offset (dark level) subtracted before ratios
     * @return the gains from strips right beside the seam (inside the band: the specimen on both sides is nearest
     *     alike there) or from strips outside the band (when the band's own pixels are damaged, e.g. a darker line),
     *     whichever agrees better around the loops of the tile grid (smaller rmsLogResidual)
     */
    public static Gains estimate(Volume image, List<int[]> columnBands, List<int[]> rowBands, int strip, double offset) {
        Gains near = estimate(image, columnBands, rowBands, strip, offset, true);
        Gains outside = estimate(image, columnBands, rowBands, strip, offset, false);
        return near.rmsLogResidual() <= outside.rmsLogResidual() ? near : outside;
    }

    /** @param beside strips start right beside the seam (inside its band) when true, else just outside the band */
    static Gains estimate(Volume image, List<int[]> columnBands, List<int[]> rowBands, int strip, double offset,
            boolean beside) {
        int cols = columnBands.size() + 1;
        int rows = rowBands.size() + 1;
        int w = image.width();
        int h = image.height();
        int[][] xs = spans(columnBands, w);
        int[][] ys = spans(rowBands, h);
        int[] x0 = xs[0];
        int[] x1 = xs[1];
        int[] y0 = ys[0];
        int[] y1 = ys[1];
        List<double[]> eq = new ArrayList<>();
        for (int r = 0; r < rows; r++) {
            for (int c = 0; c < cols; c++) {
                if (c + 1 < cols) {
                    addPair(eq, r * cols + c, r * cols + c + 1,
                            ratios(image, y0[r], y1[r], x1[c], x0[c + 1], strip, true, offset, beside));
                }
                if (r + 1 < rows) {
                    addPair(eq, r * cols + c, (r + 1) * cols + c,
                            ratios(image, x0[c], x1[c], y1[r], y0[r + 1], strip, false, offset, beside));
                }
            }
        }
        int n = rows * cols;
        if (n == 1) {
            return new Gains(rows, cols, new double[] {1}, 0, 0, eq);
        }
        if (eq.isEmpty()) {
            // every pair had no signal above the offset beside its seam (the data lie below the offset)
            throw new IllegalArgumentException("offset = " + offset + ": no pair of neighbouring tiles has signal above"
                    + " the offset beside its seam, so no tile gain can be estimated; allowed: an offset below the"
                    + " image's dark level (check --offset)");
        }
        double[] x;
        try {
            x = solve(n, eq);
        } catch (org.apache.commons.math3.linear.SingularMatrixException e) {
            throw new IllegalArgumentException("offset = " + offset + ": some tiles have no neighbour with signal above"
                    + " the offset beside a seam, so their gains cannot be estimated (check --offset)", e);
        }
        double[] g = new double[n];
        for (int t = 0; t < n; t++) {
            g[t] = Math.exp(x[t]);
        }
        return new Gains(rows, cols, g, eq.size(), misfit(eq, x), eq);
    }

    /** @return root mean square misfit of the pair equations {a, b, log(g_b / g_a)} for the log gains x */
    static double misfit(List<double[]> eq, double[] x) {
        double ss = 0;
        for (double[] e : eq) {
            double res = x[(int) e[1]] - x[(int) e[0]] - e[2];
            ss += res * res;
        }
        return eq.isEmpty() ? 0 : Math.sqrt(ss / eq.size());
    }

    /**
     * Least squares for the log gains of n tiles from every pair equation {a, b, log(g_b / g_a)}, with the mean of
     * the log gains fixed at 0.
     *
     * @return the log gains
     */
    private static double[] solve(int n, List<double[]> eq) {
        Array2DRowRealMatrix a = new Array2DRowRealMatrix(eq.size() + 1, n);
        ArrayRealVector b = new ArrayRealVector(eq.size() + 1);
        for (int k = 0; k < eq.size(); k++) {
            double[] e = eq.get(k);
            a.setEntry(k, (int) e[0], -1);
            a.setEntry(k, (int) e[1], 1);
            b.setEntry(k, e[2]);
        }
        for (int t = 0; t < n; t++) {
            a.setEntry(eq.size(), t, 1);
        }
        return new QRDecomposition(a).getSolver().solve(b).toArray();
    }

    private static void addPair(List<double[]> eq, int ta, int tb, double[] logRatios) {
        if (logRatios.length > 0) {
            eq.add(new double[] {ta, tb, RobustStats.biweight(logRatios, logRatios.length)});
        }
    }

    /**
     * The log ratio log((I_b - offset) / (I_a - offset)) of the two sides at the seam centre, for every line
     * [lineFrom, lineTo) across one seam whose band is [bandStart, bandEnd) along x (alongX) or y, in every slice;
     * lines where a side has no signal above the offset are left out. Each line is fitted by one straight line
     * across both strips with a step at the seam ({@link #stepFit}): the specimen's slope is shared by both sides,
     * so it is estimated from twice the pixels and does not pass for a gain difference.
     */
    private static double[] ratios(Volume image, int lineFrom, int lineTo, int bandStart, int bandEnd, int strip,
            boolean alongX, double offset, boolean beside) {
        double[] out = new double[(lineTo - lineFrom) * image.depth()];
        int m = 0;
        // the seam lies between pixels mid - 1 and mid; each side's strip starts there (beside) or outside the band
        int mid = (bandStart + bandEnd) / 2;
        double[] ta = new double[strip];
        double[] va = new double[strip];
        double[] tb = new double[strip];
        double[] vb = new double[strip];
        for (int z = 0; z < image.depth(); z++) {
            for (int l = lineFrom; l < lineTo; l++) {
                int na = side(image, beside ? mid - 1 : bandStart - 1, -1, strip, l, z, alongX, mid - 0.5, ta, va);
                int nb = side(image, beside ? mid : bandEnd, 1, strip, l, z, alongX, mid - 0.5, tb, vb);
                if (na == 0 || nb == 0) {
                    continue;
                }
                double[] ab = stepFit(ta, va, na, tb, vb, nb);
                double a = ab[0] - offset;
                double b = ab[1] - offset;
                if (a > 0 && b > 0) {
                    out[m++] = Math.log(b / a);
                }
            }
        }
        return java.util.Arrays.copyOf(out, m);
    }

    /**
     * Least-squares fit of v = c + s t + d [side b] to both sides' pixels (positions t relative to the seam centre):
     * a straight specimen with a step at the seam.
     *
     * @return {value of side a at the seam, value of side b at the seam}; with one pixel per side and no slope
     *     information the slope is taken as 0
     */
    private static double[] stepFit(double[] ta, double[] va, int na, double[] tb, double[] vb, int nb) {
        // normal equations in the unknowns (ca, cb, s): side a's level, side b's level, shared slope
        double sta = 0;
        double sva = 0;
        double stb = 0;
        double svb = 0;
        double stt = 0;
        double stv = 0;
        for (int i = 0; i < na; i++) {
            sta += ta[i];
            sva += va[i];
            stt += ta[i] * ta[i];
            stv += ta[i] * va[i];
        }
        for (int i = 0; i < nb; i++) {
            stb += tb[i];
            svb += vb[i];
            stt += tb[i] * tb[i];
            stv += tb[i] * vb[i];
        }
        // eliminate the levels: ca = (sva - s sta) / na, cb = (svb - s stb) / nb
        double den = stt - sta * sta / na - stb * stb / nb;
        double slope = den > 1e-9 ? (stv - sta * sva / na - stb * svb / nb) / den : 0;
        return new double[] {(sva - slope * sta) / na, (svb - slope * stb) / nb};
    }

    /**
     * The first `strip` pixels with data of one line from position start outward in direction step (+1 or -1),
     * skipping exact zeros (a gap of no data between the tiles; at most {@link #GAP_SKIP} of them).
     *
     * @param t receives the positions relative to centre (modified)
     * @param val receives the values (modified)
     * @return the number of pixels found
     */
    private static int side(Volume v, int start, int step, int strip, int line, int z, boolean alongX, double centre,
            double[] t, double[] val) {
        int n = alongX ? v.width() : v.height();
        int m = 0;
        int skipped = 0;
        for (int p = start; p >= 0 && p < n && m < strip; p += step) {
            double x = alongX ? v.get(p, line, z) : v.get(line, p, z);
            if (x == 0 && skipped < GAP_SKIP) {
                skipped++;
                continue;
            }
            t[m] = p - centre;
            val[m++] = x;
        }
        return m;
    }

    /** @return {first, end} pixel of each tile along one axis of n pixels cut by the seam bands: tile k spans
     *     [lo[k], hi[k]) */
    static int[][] spans(List<int[]> bands, int n) {
        int[] lo = new int[bands.size() + 1];
        int[] hi = new int[bands.size() + 1];
        lo[0] = 0;
        for (int k = 0; k < bands.size(); k++) {
            hi[k] = bands.get(k)[0];
            lo[k + 1] = bands.get(k)[1];
        }
        hi[bands.size()] = n;
        return new int[][] {lo, hi};
    }

    /**
     * @return {first, end} pixel of each tile along one axis of n pixels when every pixel belongs to a tile: the seam
     *     lies at the middle of its band ((start + end) / 2, where the next tile begins), so a band pixel belongs to
     *     the tile on its side of the seam
     */
    static int[][] cells(List<int[]> bands, int n) {
        int[] lo = new int[bands.size() + 1];
        int[] hi = new int[bands.size() + 1];
        for (int k = 0; k < bands.size(); k++) {
            int mid = (bands.get(k)[0] + bands.get(k)[1]) / 2;
            hi[k] = mid;
            lo[k + 1] = mid;
        }
        hi[bands.size()] = n;
        return new int[][] {lo, hi};
    }

    /**
     * Divides each tile's signal above the offset by its gain; only on explicit request. A seam band's pixels are
     * levelled with the tile on their side of the seam ({@link #cells}); exact zeros (gaps without data) stay 0.
     *
     * @return a levelled copy; the input is not modified
     */
    public static Volume apply(Volume image, List<int[]> columnBands, List<int[]> rowBands, Gains gains, double offset) {
        int cols = gains.columns();
        int[][] xs = cells(columnBands, image.width());
        int[][] ys = cells(rowBands, image.height());
        Volume out = image.copy();
        for (int r = 0; r < gains.rows(); r++) {
            for (int c = 0; c < cols; c++) {
                double g = gains.gains()[r * cols + c];
                for (int z = 0; z < image.depth(); z++) {
                    for (int y = ys[0][r]; y < ys[1][r]; y++) {
                        for (int x = xs[0][c]; x < xs[1][c]; x++) {
                            float v = image.get(x, y, z);
                            if (v != 0) {
                                out.set(x, y, z, (float) (offset + (v - offset) / g));
                            }
                        }
                    }
                }
            }
        }
        return out;
    }
}
