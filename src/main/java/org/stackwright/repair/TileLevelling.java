package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.stackwright.volume.Volume;

/**
 * Estimates a gain per tile of a stitched image from the bands beside each seam (where neighbouring tiles
 * overlapped): just left and right of a vertical seam (above and below a horizontal one) the two tiles see nearly
 * the same specimen, so for each line across the seam each side's strip is fitted by a straight line and carried to the seam centre
 * (so that a slope of the specimen is not taken for a gain step), and the ratio of the medians over all lines of
 * the two sides above the dark level, median(I_b - offset) / median(I_a - offset), estimates g_b / g_a (medians
 * ignore defective pixels and the lines where structure differs across the seam). A structure that runs along a
 * seam over most of its length biases the pair; the misfit around closed loops of tiles (rmsLogResidual) shows it. The log gains of
 * all tiles follow by linear least squares over every neighbouring pair, with their mean fixed at 0 (gains
 * relative to the average tile). This is a report: nothing is changed unless {@link #apply} is called on request.
 */
public final class TileLevelling {

    /**
     * @param gains per tile, row-major (rows x columns), geometric mean 1
     * @param pairs number of neighbouring tile pairs used
     * @param rmsLogResidual root mean square misfit of the pair ratios in log units (consistency of the estimate)
     */
    public record Gains(int rows, int columns, double[] gains, int pairs, double rmsLogResidual) {
    }

    private TileLevelling() {
    }

    /**
     * @param image the stitched image or stack, not modified
     * @param columnBands vertical seam bands [start, end) in x, ascending (columns - 1 of them)
     * @param rowBands horizontal seam bands [start, end) in y, ascending (rows - 1)
     * @param strip width of the band used on each side of a seam, pixels
     * @param offset camera offset (dark level) subtracted before ratios
     */
    public static Gains estimate(Volume image, List<int[]> columnBands, List<int[]> rowBands, int strip, double offset) {
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
                            ratios(image, y0[r], y1[r], x1[c], x0[c + 1], strip, true, offset));
                }
                if (r + 1 < rows) {
                    addPair(eq, r * cols + c, (r + 1) * cols + c,
                            ratios(image, x0[c], x1[c], y1[r], y0[r + 1], strip, false, offset));
                }
            }
        }
        int n = rows * cols;
        if (n == 1) {
            return new Gains(rows, cols, new double[] {1}, 0, 0);
        }
        if (eq.isEmpty()) {
            // every pair had no signal above the offset beside its seam (the data lie below the offset)
            throw new IllegalArgumentException("offset = " + offset + ": no pair of neighbouring tiles has signal above"
                    + " the offset beside its seam, so no tile gain can be estimated; allowed: an offset below the"
                    + " image's dark level (check --offset)");
        }
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
        RealVector x;
        try {
            x = new QRDecomposition(a).getSolver().solve(b);
        } catch (org.apache.commons.math3.linear.SingularMatrixException e) {
            throw new IllegalArgumentException("offset = " + offset + ": some tiles have no neighbour with signal above"
                    + " the offset beside a seam, so their gains cannot be estimated (check --offset)", e);
        }
        double ss = 0;
        for (int k = 0; k < eq.size(); k++) {
            double[] e = eq.get(k);
            double res = x.getEntry((int) e[1]) - x.getEntry((int) e[0]) - e[2];
            ss += res * res;
        }
        double[] g = new double[n];
        for (int t = 0; t < n; t++) {
            g[t] = Math.exp(x.getEntry(t));
        }
        return new Gains(rows, cols, g, eq.size(), Math.sqrt(ss / eq.size()));
    }

    private static void addPair(List<double[]> eq, int ta, int tb, double[][] sides) {
        int m = sides[0].length;
        if (m == 0) {
            return;
        }
        double a = RobustStats.median(sides[0], m);
        double b = RobustStats.median(sides[1], m);
        if (a > 0 && b > 0) {
            eq.add(new double[] {ta, tb, Math.log(b / a)});
        }
    }

    /**
     * The two sides' values above the offset, carried to the seam centre, for every line [lineFrom, lineTo)
     * across one seam whose band is [bandStart, bandEnd) along x (alongX) or y, in every slice.
     */
    private static double[][] ratios(Volume image, int lineFrom, int lineTo, int bandStart, int bandEnd, int strip,
            boolean alongX, double offset) {
        double[] outA = new double[(lineTo - lineFrom) * image.depth()];
        double[] outB = new double[outA.length];
        int m = 0;
        double centre = 0.5 * (bandStart + bandEnd - 1);
        for (int z = 0; z < image.depth(); z++) {
            for (int l = lineFrom; l < lineTo; l++) {
                double a = extrapolate(image, bandStart - strip, bandStart, l, z, alongX, centre) - offset;
                double b = extrapolate(image, bandEnd, bandEnd + strip, l, z, alongX, centre) - offset;
                if (Double.isFinite(a) && Double.isFinite(b)) {
                    outA[m] = a;
                    outB[m++] = b;
                }
            }
        }
        return new double[][] {java.util.Arrays.copyOf(outA, m), java.util.Arrays.copyOf(outB, m)};
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
     * Fits a straight line to the pixels [from, to) of one line across a seam (along x when alongX, at row line;
     * else along y at column line) and returns its value at position at: the specimen seen by that tile, carried
     * to the seam centre, so that a slope of the specimen does not pass for a gain difference.
     */
    private static double extrapolate(Volume v, int from, int to, int line, int z, boolean alongX, double at) {
        int n = alongX ? v.width() : v.height();
        from = Math.max(0, from);
        to = Math.min(n, to);
        int m = to - from;
        if (m <= 0) {
            return Double.NaN;
        }
        double st = 0;
        double sv = 0;
        double stt = 0;
        double stv = 0;
        for (int t = from; t < to; t++) {
            double val = alongX ? v.get(t, line, z) : v.get(line, t, z);
            st += t;
            sv += val;
            stt += (double) t * t;
            stv += t * val;
        }
        double mt = st / m;
        double mv = sv / m;
        double var = stt / m - mt * mt;
        double slope = var > 0 ? (stv / m - mt * mv) / var : 0;
        return mv + slope * (at - mt);
    }

    /**
     * Divides each tile's signal above the offset by its gain; only on explicit request (seam bands are left as
     * they are: they are to be filled).
     *
     * @return a levelled copy; the input is not modified
     */
    public static Volume apply(Volume image, List<int[]> columnBands, List<int[]> rowBands, Gains gains, double offset) {
        int cols = gains.columns();
        int rows = gains.rows();
        int w = image.width();
        int h = image.height();
        int[][] xs = spans(columnBands, w);
        int[][] ys = spans(rowBands, h);
        int[] x0 = xs[0];
        int[] x1 = xs[1];
        int[] y0 = ys[0];
        int[] y1 = ys[1];
        Volume out = image.copy();
        for (int r = 0; r < rows; r++) {
            for (int c = 0; c < cols; c++) {
                double g = gains.gains()[r * cols + c];
                for (int z = 0; z < image.depth(); z++) {
                    for (int y = y0[r]; y < y1[r]; y++) {
                        for (int x = x0[c]; x < x1[c]; x++) {
                            out.set(x, y, z, (float) (offset + (image.get(x, y, z) - offset) / g));
                        }
                    }
                }
            }
        }
        return out;
    }
}
