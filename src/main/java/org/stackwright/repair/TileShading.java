package org.stackwright.repair;

import java.util.Arrays;
import java.util.List;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.stackwright.volume.Volume;

/**
 * The shading every tile of a stitched mosaic shares (vignetting, uneven illumination), estimated from the mosaic
 * itself: a retrospective flat field. Each tile is cut into blocks ({@link TileBlocks}); the log of each block's
 * median above the dark level, minus the tile's level, is one sample of log shading + log specimen; a robust average
 * over all tiles at each block position keeps the shading and drops most of the specimen, and a low-order polynomial
 * surface fitted to those averages (robustly: blocks far off the surface are dropped and the fit repeated) smooths
 * what is left. This is the "mean tile profile" approach of retrospective shading correction (Likar, Maintz,
 * Viergever &amp; Pernus, "Retrospective shading correction based on entropy minimization", J. Microsc.
 * 197:285-295, 2000, model of multiplicative shading; Peng et al., "A BaSiC tool for background and shading
 * correction of optical microscopy images", Nat. Commun. 8:14836, 2017, shading shared by all tiles, with a
 * baseline per tile) with a polynomial surface instead of their optimisers. The tiles' levels are estimated with the
 * shading, by alternation ({@link #estimateWithLevels}); each tile's background level is a candidate for its gain,
 * which {@link BackgroundGains} checks against the seams. Nothing is changed unless {@link #apply} is called on
 * request.
 */
public final class TileShading {

    /** total degree of the polynomial surface (15 terms) */
    static final int DEGREE = 4;
    /** blocks farther than this many robust sigmas from the surface are dropped before the refit */
    private static final double OUTLIER_SIGMAS = 3;

    /**
     * @param coefficients of the polynomial in the tile's normalised coordinates (see {@link #value})
     * @param spanX tile extent along x used for the normalisation (largest tile, pixels)
     * @param spanY tile extent along y
     * @param min smallest value of the surface over a tile step (the surface has mean 1 over the step)
     * @param max largest value
     * @param blocks number of block positions the surface was fitted to
     */
    public record Flat(double[] coefficients, int spanX, int spanY, double min, double max, int blocks) {

        /** @return the shading at tile pixel (u, v), mean 1 over a tile step */
        public double value(double u, double v) {
            double a = 2 * (u + 0.5) / spanX - 1;
            double b = 2 * (v + 0.5) / spanY - 1;
            double[] t = terms(a, b);
            double s = 0;
            for (int k = 0; k < t.length; k++) {
                s += coefficients[k] * t[k];
            }
            return Math.exp(s);
        }
    }

    /** Where the tiles lie: spans between the seam bands and each tile's own pixel origin. */
    record Tiles(int[] x0, int[] x1, int[] y0, int[] y1, int[] originX, int[] originY, int stepX, int stepY) {

        static Tiles of(List<int[]> columnBands, List<int[]> rowBands, int w, int h) {
            int[][] xs = TileLevelling.spans(columnBands, w);
            int[][] ys = TileLevelling.spans(rowBands, h);
            int[] sx = step(columnBands, w);
            int[] sy = step(rowBands, h);
            return new Tiles(xs[0], xs[1], ys[0], ys[1], origins(columnBands, sx[0]), origins(rowBands, sy[0]),
                    sx[0], sy[0]);
        }

        /** {step} between seam centres (the median), or the whole length when there is no seam */
        private static int[] step(List<int[]> bands, int n) {
            if (bands.isEmpty()) {
                return new int[] {n};
            }
            double[] c = new double[bands.size()];
            for (int k = 0; k < c.length; k++) {
                c[k] = centre(bands.get(k)) - (k == 0 ? 0 : centre(bands.get(k - 1)));
            }
            // the first distance is from the image edge: only used when there is a single seam
            double[] inner = bands.size() > 1 ? Arrays.copyOfRange(c, 1, c.length) : c;
            return new int[] {(int) Math.round(RobustStats.median(inner, inner.length))};
        }

        /** A tile begins at the centre of the seam before it; the first tile ends one step before the first seam. */
        private static int[] origins(List<int[]> bands, int step) {
            int[] o = new int[bands.size() + 1];
            o[0] = bands.isEmpty() ? 0 : Math.min(0, centre(bands.get(0)) - step);
            for (int k = 0; k < bands.size(); k++) {
                o[k + 1] = centre(bands.get(k));
            }
            return o;
        }

        private static int centre(int[] band) {
            return (band[0] + band[1]) / 2;
        }

        int columns() {
            return x0.length;
        }

        int rows() {
            return y0.length;
        }

        /** @return largest tile extent from its origin along x */
        int spanX() {
            int m = stepX;
            for (int c = 0; c < columns(); c++) {
                m = Math.max(m, x1[c] - originX[c]);
            }
            return m;
        }

        int spanY() {
            int m = stepY;
            for (int r = 0; r < rows(); r++) {
                m = Math.max(m, y1[r] - originY[r]);
            }
            return m;
        }
    }

    private TileShading() {
    }

    /**
     * @param image the stitched image or stack (slices pooled), not modified; pixels exactly 0 are gaps (no data)
     * @param columnBands vertical seam bands [start, end), ascending
     * @param rowBands horizontal seam bands [start, end), ascending
     * @param offset camera offset (dark level) subtracted before logs
     */
    public static Flat estimate(Volume image, List<int[]> columnBands, List<int[]> rowBands, double offset) {
        return estimateWithLevels(image, columnBands, rowBands, offset).flat();
    }

    /**
     * The shading and each tile's background level, estimated together by alternation. Each tile's level is first
     * the median of its blocks; then, three times: the shading is the surface fitted to the biweight over the tiles,
     * at each block position, of the block's log minus its tile's level; each tile's level is the background
     * ({@link RobustStats#background}) of its blocks' logs minus the shading. A level taken as the median moves with
     * the amount of specimen in the tile and passes that on to the shading; the background level does not.
     *
     * @return the shading and the log background level of every tile (mean 0 over the tiles, averaged over the
     *     slices; all NaN when a tile has no usable block in some slice)
     */
    static Estimate estimateWithLevels(Volume image, List<int[]> columnBands, List<int[]> rowBands, double offset) {
        Tiles t = Tiles.of(columnBands, rowBands, image.width(), image.height());
        TileBlocks tb = TileBlocks.of(image, t, offset);
        int ns = tb.samples();
        int np = tb.positions();
        int need = Math.max(1, Math.min(3, ns / 2));
        double[] level = new double[ns];
        double[] logShading = new double[np];
        double[] buf = new double[Math.max(ns, np)];
        levels(tb, logShading, level, buf, false);
        double[] ua = new double[np];
        double[] va = new double[np];
        double[] ya = new double[np];
        double[] coef = null;
        int n = 0;
        Flat first = null;
        for (int round = 0; round < ROUNDS; round++) {
            n = 0;
            for (int p = 0; p < np; p++) {
                int m = 0;
                for (int s = 0; s < ns; s++) {
                    if (!Double.isNaN(tb.logs[s][p]) && !Double.isNaN(level[s])) {
                        buf[m++] = tb.logs[s][p] - level[s];
                    }
                }
                if (m >= need) {
                    ua[n] = tb.u[p];
                    va[n] = tb.v[p];
                    ya[n++] = RobustStats.biweight(buf, m);
                }
            }
            if (n < 2 * terms(0, 0).length) {
                throw new IllegalArgumentException("shading: too few tile blocks to estimate the shading (" + n
                        + "); the tiles are too small or mostly gaps");
            }
            coef = fit(ua, va, ya, n, t.spanX(), t.spanY());
            if (round == 0) {
                first = normalised(coef, t.spanX(), t.spanY(), t.stepX(), t.stepY(), n);
            }
            Flat surface = new Flat(coef, t.spanX(), t.spanY(), 0, 0, n);
            for (int p = 0; p < np; p++) {
                logShading[p] = Math.log(surface.value(tb.u[p], tb.v[p]));
            }
            levels(tb, logShading, level, buf, true);
        }
        return new Estimate(normalised(coef, t.spanX(), t.spanY(), t.stepX(), t.stepY(), n), first,
                tileLevels(level, t.rows() * t.columns()));
    }

    /**
     * @param flat the shading estimated with the tiles' background levels
     * @param medianFlat the shading of the first round, with each tile's median as its level: the one to use when the
     *     tiles do not share one background ({@link BackgroundGains})
     * @param logLevels the tiles' log background levels, row-major, mean 0 (all NaN when a tile had no usable block)
     */
    record Estimate(Flat flat, Flat medianFlat, double[] logLevels) {
    }

    /** rounds of the alternation between shading and tile levels */
    private static final int ROUNDS = 3;

    /** Each sample's level: the median (first round) or the background of its block logs minus the shading. */
    private static void levels(TileBlocks tb, double[] logShading, double[] level, double[] buf, boolean background) {
        for (int s = 0; s < tb.samples(); s++) {
            int m = 0;
            for (int p = 0; p < tb.positions(); p++) {
                if (!Double.isNaN(tb.logs[s][p])) {
                    buf[m++] = tb.logs[s][p] - logShading[p];
                }
            }
            level[s] = m == 0 ? Double.NaN : background ? RobustStats.background(buf, m) : RobustStats.median(buf, m);
        }
    }

    /** Per tile: the mean over the slices of its level minus the mean level of all tiles in that slice. */
    private static double[] tileLevels(double[] level, int tiles) {
        double[] out = new double[tiles];
        int depth = level.length / tiles;
        for (int z = 0; z < depth; z++) {
            double mean = 0;
            for (int k = 0; k < tiles; k++) {
                mean += level[z * tiles + k] / tiles;
            }
            for (int k = 0; k < tiles; k++) {
                out[k] += (level[z * tiles + k] - mean) / depth;
            }
        }
        return out;
    }

    /** Robust least squares: fit, drop the blocks beyond 3 robust sigmas, fit again (twice). */
    private static double[] fit(double[] u, double[] v, double[] y, int n, int spanX, int spanY) {
        boolean[] keep = new boolean[n];
        Arrays.fill(keep, true);
        double[] coef = null;
        for (int round = 0; round < 3; round++) {
            int m = 0;
            for (int i = 0; i < n; i++) {
                m += keep[i] ? 1 : 0;
            }
            int p = terms(0, 0).length;
            Array2DRowRealMatrix a = new Array2DRowRealMatrix(m, p);
            ArrayRealVector rhs = new ArrayRealVector(m);
            int row = 0;
            for (int i = 0; i < n; i++) {
                if (keep[i]) {
                    a.setRow(row, terms(2 * (u[i] + 0.5) / spanX - 1, 2 * (v[i] + 0.5) / spanY - 1));
                    rhs.setEntry(row++, y[i]);
                }
            }
            RealVector x = new QRDecomposition(a).getSolver().solve(rhs);
            coef = x.toArray();
            double[] res = new double[n];
            for (int i = 0; i < n; i++) {
                double[] t = terms(2 * (u[i] + 0.5) / spanX - 1, 2 * (v[i] + 0.5) / spanY - 1);
                double s = 0;
                for (int k = 0; k < p; k++) {
                    s += coef[k] * t[k];
                }
                res[i] = Math.abs(y[i] - s);
            }
            double sigma = RobustStats.MAD_TO_SIGMA * RobustStats.median(res, n);
            int kept = 0;
            for (int i = 0; i < n; i++) {
                keep[i] = res[i] <= OUTLIER_SIGMAS * sigma || sigma == 0;
                kept += keep[i] ? 1 : 0;
            }
            if (kept < 2 * p) {
                break;
            }
        }
        return coef;
    }

    /** Shifts the constant term so that the surface has mean 1 over one tile step; finds its range there. */
    private static Flat normalised(double[] coef, int spanX, int spanY, int stepX, int stepY, int blocks) {
        Flat f = new Flat(coef, spanX, spanY, 0, 0, blocks);
        int gx = Math.max(1, stepX / 64);
        int gy = Math.max(1, stepY / 64);
        double sum = 0;
        int n = 0;
        double min = Double.POSITIVE_INFINITY;
        double max = 0;
        for (int v = 0; v < stepY; v += gy) {
            for (int u = 0; u < stepX; u += gx) {
                double s = f.value(u, v);
                sum += s;
                n++;
                min = Math.min(min, s);
                max = Math.max(max, s);
            }
        }
        double mean = sum / n;
        double[] c = coef.clone();
        c[0] -= Math.log(mean);
        return new Flat(c, spanX, spanY, min / mean, max / mean, blocks);
    }

    /** Monomials a^i b^j with i + j <= DEGREE; the first is the constant. */
    static double[] terms(double a, double b) {
        double[] t = new double[(DEGREE + 1) * (DEGREE + 2) / 2];
        int k = 0;
        for (int d = 0; d <= DEGREE; d++) {
            for (int i = d; i >= 0; i--) {
                t[k++] = Math.pow(a, i) * Math.pow(b, d - i);
            }
        }
        return t;
    }

    /**
     * Divides each tile's signal above the offset by the shading at its own pixel position; a seam band's pixels are
     * corrected with the tile on their side of the seam ({@link TileLevelling#cells}), so that the gains can be
     * measured right beside the seam; gaps (pixels exactly 0) are left as they are. Only on explicit request.
     *
     * @return a corrected copy; the input is not modified
     */
    public static Volume apply(Volume image, List<int[]> columnBands, List<int[]> rowBands, Flat flat, double offset) {
        Tiles t = Tiles.of(columnBands, rowBands, image.width(), image.height());
        int sx = t.spanX();
        int sy = t.spanY();
        double[] table = new double[sx * sy];
        for (int v = 0; v < sy; v++) {
            for (int u = 0; u < sx; u++) {
                table[v * sx + u] = flat.value(u, v);
            }
        }
        int[][] xs = TileLevelling.cells(columnBands, image.width());
        int[][] ys = TileLevelling.cells(rowBands, image.height());
        Volume out = image.copy();
        for (int r = 0; r < t.rows(); r++) {
            for (int c = 0; c < t.columns(); c++) {
                for (int y = ys[0][r]; y < ys[1][r]; y++) {
                    int v0 = Math.min(sy - 1, Math.max(0, y - t.originY()[r]));
                    for (int x = xs[0][c]; x < xs[1][c]; x++) {
                        double s = table[v0 * sx + Math.min(sx - 1, Math.max(0, x - t.originX()[c]))];
                        for (int z = 0; z < image.depth(); z++) {
                            float v = image.get(x, y, z);
                            if (v != 0) {
                                out.set(x, y, z, (float) (offset + (v - offset) / s));
                            }
                        }
                    }
                }
            }
        }
        return out;
    }
}
