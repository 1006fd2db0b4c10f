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
 * itself: a retrospective flat field. Each tile is cut into blocks; the log of each block's median above the dark
 * level, minus the tile's median, is one sample of log shading + log specimen; the median over all tiles at each
 * block position keeps the shading and drops most of the specimen, and a low-order polynomial surface fitted to
 * those medians (robustly: blocks far off the surface are dropped and the fit repeated) smooths what is left. This
 * is the "mean tile profile" approach of retrospective shading correction (Likar, Maintz, Viergever &amp; Pernus,
 * "Retrospective shading correction based on entropy minimization", J. Microsc. 197:285-295, 2000, model of
 * multiplicative shading; Peng et al., "A BaSiC tool for background and shading correction of optical microscopy
 * images", Nat. Commun. 8:14836, 2017, shading shared by all tiles) with a polynomial surface instead of their
 * optimisers. Tile-by-tile gains are not part of it: {@link TileLevelling} estimates them on the shading-corrected
 * image. Nothing is changed unless {@link #apply} is called on request.
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
        Tiles t = Tiles.of(columnBands, rowBands, image.width(), image.height());
        int spanX = t.spanX();
        int spanY = t.spanY();
        int b = Math.max(1, Math.min(t.stepX(), t.stepY()) / 24);
        int nbx = (spanX + b - 1) / b;
        int nby = (spanY + b - 1) / b;
        int samples = t.columns() * t.rows() * image.depth();
        double[][] logs = new double[nbx * nby][samples];
        int[] count = new int[nbx * nby];
        double[] block = new double[b * b];
        double[] tileLogs = new double[nbx * nby];
        int[] where = new int[nbx * nby];
        // mean position of the pixels each block position was measured at (blocks cut by a border differ)
        double[] centreU = new double[nbx * nby];
        double[] centreV = new double[nbx * nby];
        for (int z = 0; z < image.depth(); z++) {
            for (int r = 0; r < t.rows(); r++) {
                for (int c = 0; c < t.columns(); c++) {
                    int m = 0;
                    for (int by = 0; by < nby; by++) {
                        for (int bx = 0; bx < nbx; bx++) {
                            // blocks cut by the tile's border keep the part inside it (at least half a block)
                            int xa = Math.max(t.x0()[c], t.originX()[c] + bx * b);
                            int ya = Math.max(t.y0()[r], t.originY()[r] + by * b);
                            int xb = Math.min(t.x1()[c], t.originX()[c] + (bx + 1) * b);
                            int yb = Math.min(t.y1()[r], t.originY()[r] + (by + 1) * b);
                            int n = 0;
                            double su = 0;
                            double sv = 0;
                            for (int y = ya; y < yb; y++) {
                                for (int x = xa; x < xb; x++) {
                                    float v = image.get(x, y, z);
                                    if (v != 0 && Float.isFinite(v)) {
                                        block[n++] = v - offset;
                                        su += x - t.originX()[c];
                                        sv += y - t.originY()[r];
                                    }
                                }
                            }
                            double med = 2 * n >= b * b ? RobustStats.medianInPlace(block, n) : Double.NaN;
                            if (med > 0) {
                                tileLogs[m] = Math.log(med);
                                centreU[by * nbx + bx] += su / n;
                                centreV[by * nbx + bx] += sv / n;
                                where[m++] = by * nbx + bx;
                            }
                        }
                    }
                    if (m == 0) {
                        continue;
                    }
                    double level = RobustStats.median(tileLogs, m);
                    for (int k = 0; k < m; k++) {
                        logs[where[k]][count[where[k]]++] = tileLogs[k] - level;
                    }
                }
            }
        }
        int need = Math.max(1, Math.min(3, samples / 2));
        double[] ua = new double[nbx * nby];
        double[] va = new double[nbx * nby];
        double[] ya = new double[nbx * nby];
        int n = 0;
        for (int k = 0; k < nbx * nby; k++) {
            if (count[k] >= need) {
                ua[n] = centreU[k] / count[k];
                va[n] = centreV[k] / count[k];
                ya[n++] = RobustStats.median(logs[k], count[k]);
            }
        }
        if (n < 2 * terms(0, 0).length) {
            throw new IllegalArgumentException("shading: too few tile blocks to estimate the shading (" + n
                    + "); the tiles are too small or mostly gaps");
        }
        double[] coef = fit(ua, va, ya, n, spanX, spanY);
        return normalised(coef, spanX, spanY, t.stepX(), t.stepY(), n);
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
