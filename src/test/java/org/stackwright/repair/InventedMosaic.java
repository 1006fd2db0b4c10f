package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * An invented stitched mosaic with its truth, made independently of the project's {@code simulate} operation: its
 * own specimen (soft-edged cells, Gaussian puncta and fibres on a background), its own tile model (a gain per tile
 * and a vignetting that darkens each tile towards its corners), its own stitching (row-by-row or snake order, the
 * later tile covering the overlap, or a linear blend across it, gaps of zeros) and its own camera (photon noise as a
 * Gaussian of variance equal to the mean, read noise, offset) and defects placed on the mosaic (whole columns, row
 * segments, clusters of 2-3 pixels and single pixels). Test helper only.
 *
 * <p>The noise follows the acquisition: every tile is an exposure of its own, so a blended mosaic is made the way a
 * stitcher makes it, from noisy tiles (each tile's photon and read noise drawn for each of its pixels) whose overlaps
 * are then averaged with the ramp weights. Inside a blend band the noise of two (at corners four) independent
 * exposures is averaged, so its variance drops to w^2 + (1 - w)^2 of a single exposure's (0.5 in the middle of the
 * band). Without blending the later tile's pixels are the mosaic's, one exposure per pixel, and the noise is drawn
 * once per mosaic pixel after stitching (the same numbers as a draw per tile, and the same draws as before blending
 * was modelled per tile, so the other tests keep their numbers).
 */
final class InventedMosaic {

    static final double OFFSET = 100;
    static final double READ_NOISE = 2;

    /**
     * @param rows tile rows
     * @param cols tile columns
     * @param tileW tile width
     * @param tileH tile height
     * @param overlap overlap in pixels (both axes)
     * @param snake snake (serpentine) order instead of row-by-row
     * @param blend linear blend across the overlap instead of the later tile covering it
     * @param gap width of the gap of zeros on one vertical and one horizontal seam (0 = none)
     * @param shading darkening at the tile corners (0.25 = 25 %)
     * @param gainSpread tile gains drawn from 1 +- gainSpread
     * @param background specimen background in photons
     */
    record Layout(int rows, int cols, int tileW, int tileH, int overlap, boolean snake, boolean blend, int gap,
            double shading, double gainSpread, double background) {

        int width() {
            return cols * tileW - (cols - 1) * overlap;
        }

        int height() {
            return rows * tileH - (rows - 1) * overlap;
        }

        @Override
        public String toString() {
            return rows + "x" + cols + " tiles " + tileW + "x" + tileH + ", overlap " + overlap + (snake ? ", snake"
                    : ", row-by-row") + (blend ? ", blended" : "") + (gap > 0 ? ", gaps " + gap : "")
                    + ", shading " + shading + ", gains +-" + gainSpread;
        }
    }

    /** Defect counts to plant; 0 for none. */
    record Defects(int deadColumns, int hotColumns, int hotRowSegments, int segmentLength, int pixels, int clusters) {
        static final Defects NONE = new Defects(0, 0, 0, 0, 0, 0);
    }

    /**
     * A linear smoothing of the noise as cameras and stitchers apply it (a test variant; {@link #NONE} keeps the plain
     * mosaics and their numbers). A kind of {@code gauss} (a Gaussian of sigma {@code amount} px) or {@code mean3} (a
     * 3x3 mean) smooths the stitched mosaic; {@code shift} interpolates every tile bilinearly at a sub-pixel offset
     * drawn per tile and axis in [0, 1) (a stitcher's registration), before the tiles are blended. The random draws
     * of the shifts come from a stream of their own, so specimen, gains and noise are those of the plain mosaic of
     * the same seed.
     *
     * @param kind none, gauss, mean3, shift or median5 (a 5x5 median of the stitched mosaic: a non-linear
     *     denoising, not a smoothing the noise measure can see through)
     * @param amount the Gaussian's sigma, px (unused otherwise)
     * @param quantize round the mosaic to whole numbers at the end, as a 16-bit file stores it
     */
    record Smoothing(String kind, double amount, boolean quantize) {
        static final Smoothing NONE = new Smoothing("none", 0, false);

        @Override
        public String toString() {
            return kind.equals("gauss") ? "Gaussian sigma " + amount + (quantize ? ", whole numbers" : "")
                    : kind + (quantize ? ", whole numbers" : "");
        }
    }

    /** A planted line: x, y of its first pixel, length, vertical, hot. */
    record Line(int x, int y, int length, boolean vertical, boolean hot) {
    }

    final Layout layout;
    final Volume image;
    /** the noise-free photon signal of every pixel (before offset), for flatness checks */
    final double[] signal;
    /** y of the horizontal seams (top border of each lower tile row); with blending the first row of the band */
    final int[] rowSeams;
    /** x of the vertical seams per tile row; with blending the first column of the band */
    final int[][] columnSeams;
    /** gains per tile, row-major */
    final double[] gains;
    /** 1 = hot, 2 = dead, 0 = good, per pixel */
    final byte[] defects;
    final List<Line> lines = new ArrayList<>();
    /** pixels of planted clusters (all members) and of single defects */
    int clusterPixels;
    int singlePixels;

    private InventedMosaic(Layout l, Volume image, double[] signal, int[] rowSeams, int[][] columnSeams, double[] gains,
            byte[] defects) {
        this.layout = l;
        this.image = image;
        this.signal = signal;
        this.rowSeams = rowSeams;
        this.columnSeams = columnSeams;
        this.gains = gains;
        this.defects = defects;
    }

    /** The specimen in photons at mosaic position (x, y), before tiles, gains and shading. */
    static double[] specimen(int w, int h, double background, boolean flat, SplittableRandom r) {
        double[] s = new double[w * h];
        java.util.Arrays.fill(s, background);
        if (flat) {
            return s;
        }
        int area = w * h;
        // cells: soft-edged ellipses (edge width 1.5 px), 200-900 photons
        for (int c = 0; c < area / 4000; c++) {
            double cx = w * r.nextDouble();
            double cy = h * r.nextDouble();
            double a = 6 + 14 * r.nextDouble();
            double b = 6 + 14 * r.nextDouble();
            double th = Math.PI * r.nextDouble();
            double amp = 200 + 700 * r.nextDouble();
            int rr = (int) Math.ceil(Math.max(a, b) + 6);
            for (int y = Math.max(0, (int) cy - rr); y < Math.min(h, (int) cy + rr); y++) {
                for (int x = Math.max(0, (int) cx - rr); x < Math.min(w, (int) cx + rr); x++) {
                    double dx = x - cx;
                    double dy = y - cy;
                    double u = (dx * Math.cos(th) + dy * Math.sin(th)) / a;
                    double v = (-dx * Math.sin(th) + dy * Math.cos(th)) / b;
                    double dist = (Math.sqrt(u * u + v * v) - 1) * Math.min(a, b);
                    s[y * w + x] += amp / (1 + Math.exp(dist / 1.5));
                }
            }
        }
        // puncta: Gaussian spots, sigma 1.1-1.8 px, 300-3000 photons at the peak
        for (int c = 0; c < area / 1500; c++) {
            gaussianSpot(s, w, h, w * r.nextDouble(), h * r.nextDouble(), 1.1 + 0.7 * r.nextDouble(),
                    300 + 2700 * r.nextDouble());
        }
        // fibres: random smooth paths drawn as chains of spots, sigma 1.3 px
        for (int c = 0; c < Math.max(2, area / 20000); c++) {
            double x = w * r.nextDouble();
            double y = h * r.nextDouble();
            double dir = 2 * Math.PI * r.nextDouble();
            double amp = 150 + 500 * r.nextDouble();
            for (int t = 0; t < 400; t++) {
                gaussianSpot(s, w, h, x, y, 1.3, amp * 0.35);
                dir += 0.08 * (r.nextDouble() - 0.5);
                x += 0.7 * Math.cos(dir);
                y += 0.7 * Math.sin(dir);
            }
        }
        return s;
    }

    private static void gaussianSpot(double[] s, int w, int h, double cx, double cy, double sigma, double amp) {
        int rr = (int) Math.ceil(4 * sigma);
        for (int y = Math.max(0, (int) cy - rr); y <= Math.min(h - 1, (int) cy + rr); y++) {
            for (int x = Math.max(0, (int) cx - rr); x <= Math.min(w - 1, (int) cx + rr); x++) {
                double dx = x - cx;
                double dy = y - cy;
                s[y * w + x] += amp * Math.exp(-(dx * dx + dy * dy) / (2 * sigma * sigma));
            }
        }
    }

    /** Vignetting of a tile at tile pixel (u, v): 1 at an off-centre point, 1 - shading at the far corners. */
    static double shading(Layout l, double u, double v) {
        double cu = 0.47 * l.tileW();
        double cv = 0.54 * l.tileH();
        double du = (u + 0.5 - cu) / (0.5 * l.tileW());
        double dv = (v + 0.5 - cv) / (0.5 * l.tileH());
        return 1 - l.shading() * (du * du + dv * dv) / 2.3;
    }

    static InventedMosaic make(Layout l, Defects d, boolean flatSpecimen, long seed) {
        return make(l, d, flatSpecimen, seed, Smoothing.NONE);
    }

    static InventedMosaic make(Layout l, Defects d, boolean flatSpecimen, long seed, Smoothing smoothing) {
        SplittableRandom r = new SplittableRandom(seed);
        double[][] shifts = tileShifts(l, smoothing, seed);
        int w = l.width();
        int h = l.height();
        double[] spec = specimen(w, h, l.background(), flatSpecimen, r);
        double[] gains = new double[l.rows() * l.cols()];
        for (int i = 0; i < gains.length; i++) {
            gains[i] = 1 + l.gainSpread() * (2 * r.nextDouble() - 1);
        }
        int sx = l.tileW() - l.overlap();
        int sy = l.tileH() - l.overlap();
        // expected photons of every tile's view of each mosaic pixel, stitched (the later tile covers the overlap)
        double[] mean = new double[w * h];
        for (int tr = 0; tr < (l.blend() ? 0 : l.rows()); tr++) {
            for (int k = 0; k < l.cols(); k++) {
                int tc = l.snake() && tr % 2 == 1 ? l.cols() - 1 - k : k;
                int left = tc * sx;
                int top = tr * sy;
                double g = gains[tr * l.cols() + tc];
                for (int v = 0; v < l.tileH(); v++) {
                    for (int u = 0; u < l.tileW(); u++) {
                        int p = (top + v) * w + left + u;
                        mean[p] = spec[p] * g * shading(l, u, v);
                    }
                }
            }
        }
        float[] img = new float[w * h];
        double[] signal = new double[w * h];
        if (l.blend()) {
            blendNoisyTiles(l, spec, gains, r, img, signal, shifts);
        } else {
            for (int p = 0; p < img.length; p++) {
                double mu = mean[p];
                signal[p] = mu;
                img[p] = (float) (OFFSET + mu + Math.sqrt(mu) * r.nextGaussian() + READ_NOISE * r.nextGaussian());
            }
            if (shifts != null) {
                shiftCoveringTiles(l, img, shifts);
            }
        }
        if (smoothing.kind().equals("gauss") || smoothing.kind().equals("mean3")) {
            smooth(img, w, h, smoothing);
        } else if (smoothing.kind().equals("median5")) {
            median5(img, w, h);
        }
        int[] rowSeams = new int[l.rows() - 1];
        for (int i = 1; i < l.rows(); i++) {
            rowSeams[i - 1] = i * sy;
        }
        int[][] colSeams = new int[l.rows()][l.cols() - 1];
        for (int tr = 0; tr < l.rows(); tr++) {
            for (int c = 1; c < l.cols(); c++) {
                boolean reversed = l.snake() && tr % 2 == 1 && !l.blend();
                colSeams[tr][c - 1] = reversed ? (c - 1) * sx + l.tileW() : c * sx;
            }
        }
        if (l.gap() > 0) {
            int gx = l.cols() > 2 ? 1 : 0;
            int gy = l.rows() > 2 ? 1 : 0;
            for (int y = 0; y < h; y++) {
                int tr = Math.min(l.rows() - 1, y / sy);
                if (l.cols() > 1) {
                    int x0 = colSeams[tr][gx];
                    for (int x = x0; x < x0 + l.gap(); x++) {
                        img[y * w + x] = 0;
                    }
                }
            }
            if (l.rows() > 1) {
                for (int y = rowSeams[gy]; y < rowSeams[gy] + l.gap(); y++) {
                    for (int x = 0; x < w; x++) {
                        img[y * w + x] = 0;
                    }
                }
            }
        }
        byte[] truth = new byte[w * h];
        InventedMosaic m = new InventedMosaic(l, new Volume(w, h, 1, img, VoxelSize.UNIT), signal, rowSeams, colSeams,
                gains, truth);
        m.plant(d, r);
        if (smoothing.quantize()) {
            for (int p = 0; p < img.length; p++) {
                img[p] = Math.round(img[p]);
            }
        }
        return m;
    }

    /** @return each tile's sub-pixel offset {dx, dy}, row-major, for a {@code shift} smoothing; else null */
    private static double[][] tileShifts(Layout l, Smoothing smoothing, long seed) {
        if (!smoothing.kind().equals("shift")) {
            return null;
        }
        SplittableRandom r = new SplittableRandom(seed ^ 0x5eedL);
        double[][] s = new double[l.rows() * l.cols()][];
        for (int t = 0; t < s.length; t++) {
            s[t] = new double[] {r.nextDouble(), r.nextDouble()};
        }
        return s;
    }

    /** The value of a tile (or image) of size w x h at (x + dx, y + dy), bilinear, clamped at its borders. */
    private static double bilinear(double[] v, int w, int h, double x, double y) {
        int x0 = (int) Math.floor(x);
        int y0 = (int) Math.floor(y);
        double fx = x - x0;
        double fy = y - y0;
        int xa = Math.max(0, Math.min(w - 1, x0));
        int xb = Math.max(0, Math.min(w - 1, x0 + 1));
        int ya = Math.max(0, Math.min(h - 1, y0));
        int yb = Math.max(0, Math.min(h - 1, y0 + 1));
        return (1 - fy) * ((1 - fx) * v[ya * w + xa] + fx * v[ya * w + xb])
                + fy * ((1 - fx) * v[yb * w + xa] + fx * v[yb * w + xb]);
    }

    /**
     * Without blending every pixel belongs to the tile that covers it last: each pixel is interpolated at that
     * tile's offset from the stitched mosaic (the same noise statistics as interpolating the tile itself).
     */
    private static void shiftCoveringTiles(Layout l, float[] img, double[][] shifts) {
        int w = l.width();
        int h = l.height();
        int sx = l.tileW() - l.overlap();
        int sy = l.tileH() - l.overlap();
        int[] owner = new int[w * h];
        for (int tr = 0; tr < l.rows(); tr++) {
            for (int k = 0; k < l.cols(); k++) {
                int tc = l.snake() && tr % 2 == 1 ? l.cols() - 1 - k : k;
                for (int v = 0; v < l.tileH(); v++) {
                    for (int u = 0; u < l.tileW(); u++) {
                        owner[(tr * sy + v) * w + tc * sx + u] = tr * l.cols() + tc;
                    }
                }
            }
        }
        double[] src = new double[img.length];
        for (int p = 0; p < img.length; p++) {
            src[p] = img[p];
        }
        for (int p = 0; p < img.length; p++) {
            double[] o = shifts[owner[p]];
            img[p] = (float) bilinear(src, w, h, p % w + o[0], p / w + o[1]);
        }
    }

    /** A Gaussian (separable, kernel to 4 sigma, normalised) or 3x3 mean of the whole mosaic, mirrored borders. */
    private static void smooth(float[] img, int w, int h, Smoothing smoothing) {
        double[] k;
        if (smoothing.kind().equals("mean3")) {
            k = new double[] {1 / 3.0, 1 / 3.0, 1 / 3.0};
        } else {
            double sg = smoothing.amount();
            int rad = (int) Math.ceil(4 * sg);
            k = new double[2 * rad + 1];
            double sum = 0;
            for (int i = -rad; i <= rad; i++) {
                k[i + rad] = Math.exp(-i * i / (2 * sg * sg));
                sum += k[i + rad];
            }
            for (int i = 0; i < k.length; i++) {
                k[i] /= sum;
            }
        }
        int rad = k.length / 2;
        float[] tmp = new float[img.length];
        for (int pass = 0; pass < 2; pass++) {
            float[] from = pass == 0 ? img : tmp;
            float[] to = pass == 0 ? tmp : img;
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double acc = 0;
                    for (int i = -rad; i <= rad; i++) {
                        int xx = pass == 0 ? mirror(x + i, w) : x;
                        int yy = pass == 0 ? y : mirror(y + i, h);
                        acc += k[i + rad] * from[yy * w + xx];
                    }
                    to[y * w + x] = (float) acc;
                }
            }
        }
    }

    /** A 5x5 median of the whole mosaic, mirrored borders: a non-linear denoising. */
    private static void median5(float[] img, int w, int h) {
        float[] src = img.clone();
        double[] win = new double[25];
        for (int y = 0; y < h; y++) {
            for (int x = 0; x < w; x++) {
                int m = 0;
                for (int j = -2; j <= 2; j++) {
                    for (int i = -2; i <= 2; i++) {
                        win[m++] = src[mirror(y + j, h) * w + mirror(x + i, w)];
                    }
                }
                img[y * w + x] = (float) RobustStats.medianInPlace(win, 25);
            }
        }
    }

    private static int mirror(int i, int n) {
        int j = i < 0 ? -i - 1 : i >= n ? 2 * n - 1 - i : i;
        return Math.max(0, Math.min(n - 1, j));
    }

    /**
     * A blended mosaic from noisy tiles: each tile is exposed on its own (photon noise of its expected photons, read
     * noise, offset), then the stitcher averages the tiles over each overlap with the ramp weights.
     *
     * @param img the mosaic, written
     * @param signal the noise-free blended photons, written
     */
    private static void blendNoisyTiles(Layout l, double[] spec, double[] gains, SplittableRandom r, float[] img,
            double[] signal, double[][] shifts) {
        int w = l.width();
        int sx = l.tileW() - l.overlap();
        int sy = l.tileH() - l.overlap();
        double[] sum = new double[img.length];
        double[] weight = new double[img.length];
        double[] tile = new double[l.tileW() * l.tileH()];
        for (int tr = 0; tr < l.rows(); tr++) {
            for (int k = 0; k < l.cols(); k++) {
                int tc = l.snake() && tr % 2 == 1 ? l.cols() - 1 - k : k;
                double g = gains[tr * l.cols() + tc];
                for (int v = 0; v < l.tileH(); v++) {
                    for (int u = 0; u < l.tileW(); u++) {
                        int p = (tr * sy + v) * w + tc * sx + u;
                        double mu = spec[p] * g * shading(l, u, v);
                        tile[v * l.tileW() + u] = OFFSET + mu + Math.sqrt(mu) * r.nextGaussian() + READ_NOISE
                                * r.nextGaussian();
                    }
                }
                double[] o = shifts == null ? null : shifts[tr * l.cols() + tc];
                for (int v = 0; v < l.tileH(); v++) {
                    for (int u = 0; u < l.tileW(); u++) {
                        int p = (tr * sy + v) * w + tc * sx + u;
                        double mu = spec[p] * g * shading(l, u, v);
                        double exposed = o == null ? tile[v * l.tileW() + u]
                                : bilinear(tile, l.tileW(), l.tileH(), u + o[0], v + o[1]);
                        double wgt = ramp(u, l.overlap(), l.tileW(), tc > 0, tc < l.cols() - 1)
                                * ramp(v, l.overlap(), l.tileH(), tr > 0, tr < l.rows() - 1);
                        sum[p] += wgt * exposed;
                        signal[p] += wgt * mu;
                        weight[p] += wgt;
                    }
                }
            }
        }
        for (int p = 0; p < img.length; p++) {
            img[p] = (float) (sum[p] / weight[p]);
            signal[p] /= weight[p];
        }
    }

    /** Blending weight along one axis: a linear ramp over the overlap at a side shared with another tile. */
    private static double ramp(int u, int overlap, int size, boolean lowShared, boolean highShared) {
        double wgt = 1;
        if (lowShared && overlap > 0 && u < overlap) {
            wgt = Math.min(wgt, (u + 0.5) / overlap);
        }
        if (highShared && overlap > 0 && u >= size - overlap) {
            wgt = Math.min(wgt, (size - u - 0.5) / overlap);
        }
        return wgt;
    }

    /** Whether a pixel lies on a seam band (within 3 px of a seam or inside a blend band or gap). */
    boolean nearSeam(int x, int y) {
        int band = layout.blend() ? layout.overlap() : layout.gap();
        for (int s : rowSeams) {
            if (y >= s - 3 && y < s + band + 3) {
                return true;
            }
        }
        int tr = Math.min(layout.rows() - 1, y / (layout.tileH() - layout.overlap()));
        for (int s : columnSeams[tr]) {
            if (x >= s - 3 && x < s + band + 3) {
                return true;
            }
        }
        return false;
    }

    private void plant(Defects d, SplittableRandom r) {
        int w = image.width();
        int h = image.height();
        float[] v = image.data();
        List<Integer> usedX = new ArrayList<>();
        for (int i = 0; i < d.deadColumns() + d.hotColumns(); i++) {
            int x;
            do {
                x = 3 + r.nextInt(w - 6);
            } while (nearSeam(x, 0) || nearAny(usedX, x, 6));
            usedX.add(x);
            boolean hot = i >= d.deadColumns();
            for (int y = 0; y < h; y++) {
                int p = y * w + x;
                if (v[p] == 0) {
                    continue;
                }
                v[p] = hot ? v[p] + 250 : (float) (OFFSET + READ_NOISE * r.nextGaussian());
                defects[p] = (byte) (hot ? 1 : 2);
            }
            lines.add(new Line(x, 0, h, true, hot));
        }
        List<Integer> usedY = new ArrayList<>();
        for (int i = 0; i < d.hotRowSegments(); i++) {
            int y;
            int x0;
            do {
                y = 3 + r.nextInt(h - 6);
                x0 = r.nextInt(w - d.segmentLength());
            } while (nearSeam(0, y) || nearAny(usedY, y, 6) || crossesSeamOrColumn(x0, y, d.segmentLength(), usedX));
            usedY.add(y);
            for (int x = x0; x < x0 + d.segmentLength(); x++) {
                v[y * w + x] += 300;
                defects[y * w + x] = 1;
            }
            lines.add(new Line(x0, y, d.segmentLength(), false, true));
        }
        // clusters of 2 or 3 touching hot pixels and single hot or dead pixels, 3 px apart from everything else
        int[][] shapes = {{0, 0, 1, 0}, {0, 0, 0, 1}, {0, 0, 1, 1}, {0, 0, 1, 0, 0, 1}, {0, 0, 1, 0, 2, 0},
            {0, 0, 1, 1, 2, 0}};
        for (int i = 0; i < d.clusters() + d.pixels(); i++) {
            boolean cluster = i < d.clusters();
            int[] shape = cluster ? shapes[r.nextInt(shapes.length)] : new int[] {0, 0};
            boolean hot = cluster || r.nextBoolean();
            int x;
            int y;
            do {
                x = 2 + r.nextInt(w - 6);
                y = 2 + r.nextInt(h - 6);
            } while (!free(x - 3, y - 3, x + 6, y + 6));
            for (int j = 0; j < shape.length; j += 2) {
                int p = (y + shape[j + 1]) * w + x + shape[j];
                double mu = Math.max(1, signal[p]);
                double sigma = Math.sqrt(mu + READ_NOISE * READ_NOISE);
                v[p] = hot ? (float) (v[p] + (8 + 32 * r.nextDouble()) * sigma + 30)
                        : (float) (OFFSET + READ_NOISE * r.nextGaussian());
                defects[p] = (byte) (hot ? 1 : 2);
                if (cluster) {
                    clusterPixels++;
                } else {
                    singlePixels++;
                }
            }
        }
    }

    private boolean crossesSeamOrColumn(int x0, int y, int len, List<Integer> columns) {
        for (int x = x0; x < x0 + len; x++) {
            if (nearSeam(x, y) || nearAny(columns, x, 3)) {
                return true;
            }
        }
        return false;
    }

    private boolean free(int x0, int y0, int x1, int y1) {
        int w = image.width();
        for (int y = Math.max(0, y0); y < Math.min(image.height(), y1); y++) {
            for (int x = Math.max(0, x0); x < Math.min(w, x1); x++) {
                if (defects[y * w + x] != 0 || image.data()[y * w + x] == 0) {
                    return false;
                }
            }
        }
        return true;
    }

    private static boolean nearAny(List<Integer> used, int v, int dist) {
        for (int u : used) {
            if (Math.abs(u - v) < dist) {
                return true;
            }
        }
        return false;
    }
}
