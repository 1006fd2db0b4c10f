package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.junit.jupiter.api.Test;
import org.stackwright.volume.Volume;

/**
 * Shading and gain correction from the mosaic itself ({@link TileShading}, then {@link TileLevelling} on the
 * shading-corrected image), on mosaics made by {@link InventedMosaic} (its own vignetting formula, gains, specimen
 * and noise; not simulate). Goal of the issue (ours, no published benchmark): after correction the per-tile mean
 * profile of a flat invented field is flat within 2 %. The oracle is the true vignetting of the generator: dividing
 * by it leaves only noise in the profile, which the test measures beside the estimate.
 */
class MosaicShadingTest {

    /** block size of the profile, pixels: the mean of 100 pixels of 12 tiles keeps photon noise near 0.2 % */
    private static final int BLOCK = 10;

    @Test
    void flatFieldProfileIsFlatWithin2PercentAfterCorrection() {
        for (InventedMosaic.Layout l : List.of(
                new InventedMosaic.Layout(3, 4, 120, 100, 0, false, false, 0, 0.25, 0.15, 300),
                new InventedMosaic.Layout(3, 4, 128, 128, 16, false, false, 0, 0.25, 0.15, 300))) {
            InventedMosaic m = InventedMosaic.make(l, InventedMosaic.Defects.NONE, true, 61);
            List<int[]> cols = bands(m.columnSeams[0]);
            List<int[]> rows = bands(m.rowSeams);
            TileShading.Flat flat = TileShading.estimate(m.image, cols, rows, InventedMosaic.OFFSET);
            Volume shaded = TileShading.apply(m.image, cols, rows, flat, InventedMosaic.OFFSET);
            TileLevelling.Gains g = TileLevelling.estimate(shaded, cols, rows, 12, InventedMosaic.OFFSET);
            double gainError = gainError(g, m.gains);
            double gainError4 = gainError(TileLevelling.estimate(shaded, cols, rows, 4, InventedMosaic.OFFSET),
                    m.gains);
            Volume done = TileLevelling.apply(shaded, cols, rows, g, InventedMosaic.OFFSET);
            double before = profileSpread(m.image, cols, rows);
            double after = profileSpread(done, cols, rows);
            double tilesBefore = tileMedianSpread(m.image, cols, rows);
            double tilesAfter = tileMedianSpread(done, cols, rows);
            double oracle = profileSpread(oracle(m, cols, rows), cols, rows);
            System.out.printf(Locale.ROOT, "flat field, %s: per-tile mean profile max deviation %.2f %% before, "
                    + "%.2f %% after (oracle with the true vignetting %.2f %%); tile medians spread %.2f %% before, "
                    + "%.2f %% after; gains vs the truth: worst %.2f %% (strip 12), %.2f %% (strip 4); surface range "
                    + "%.3f-%.3f%n", l, 100 * before, 100 * after, 100 * oracle, 100 * tilesBefore, 100 * tilesAfter,
                    100 * gainError, 100 * gainError4, flat.min(), flat.max());
            assertTrue(before > 0.1, "the invented field is shaded: " + before);
            assertTrue(after <= 0.02, l + ": profile flat within 2 % after correction, was " + after);
            // the same 2 % for the tile levels (gains from 12-px strips; the default 4-px strips are noisier)
            assertTrue(gainError <= 0.02, l + ": gains within 2 % of the truth, was " + gainError);
        }
    }

    @Test
    void shadingUnderASpecimenIsFoundNearTheTruth() {
        InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15, 300);
        InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 80, 500, 40), false, 41);
        // 4 px bands centred on the seams; the gaps of zeros (2 px at the seam start) lie inside them
        List<int[]> cols = bands(m.columnSeams[0]);
        List<int[]> rows = bands(m.rowSeams);
        TileShading.Flat flat = TileShading.estimate(m.image, cols, rows, InventedMosaic.OFFSET);
        double worst = 0;
        double sum = 0;
        double truthMean = 0;
        int n = 0;
        for (int v = 0; v < 200; v++) {
            for (int u = 0; u < 200; u++) {
                truthMean += InventedMosaic.shading(l, u, v);
                n++;
            }
        }
        truthMean /= n;
        double[] errors = new double[n];
        int n2 = 0;
        for (int v = 0; v < 200; v++) {
            for (int u = 0; u < 200; u++) {
                double e = Math.abs(flat.value(u, v) / (InventedMosaic.shading(l, u, v) / truthMean) - 1);
                errors[n2++] = e;
                worst = Math.max(worst, e);
                sum += e;
            }
        }
        java.util.Arrays.sort(errors);
        System.out.printf(Locale.ROOT, "specimen mosaic %s: estimated shading vs the true vignetting: mean error "
                + "%.2f %%, 95th percentile %.2f %%, worst %.2f %% (at a corner; true darkening 25 %%)%n", l,
                100 * sum / n, 100 * errors[(int) (0.95 * n)], 100 * worst);
        // goal of the 2 % carried over to a specimen, on average; the corners are measured and reported only
        assertTrue(sum / n < 0.02, "shading under a specimen within 2 % on average, was " + sum / n);
    }

    /**
     * Tile gains under a specimen (cells, puncta, fibres crossing the seams), several seeds, default strip 4: with the
     * true vignetting divided out (the oracle: what the gain estimate alone can do) and with the estimated shading
     * (what --level-tiles does). Method: for each line across a seam, one straight line with a step at the seam is
     * fitted to the pixels right beside it on both sides (gaps of zeros skipped; or just outside the band when that
     * agrees better around the tile loops), the log ratio of the two sides is
     * taken per line, and Tukey's biweight over the lines gives the pair's log gain ratio; the log gains of all tiles
     * follow by least squares over the tile graph with their mean fixed (common practice for mosaic gain
     * compensation, no single source; the biweight: Mosteller &amp; Tukey, "Data Analysis and Regression", 1977).
     * Measured before this method (ratio of the two sides' medians, strips beside the 4 px mask band): worst 4.0 %,
     * 18.8 % and 4.9 % with the true vignetting on seeds 41, 31, 51. The aim of about 1 % is not reached
     * under a specimen: with no overlap the two sides see different pixels of the specimen, and the shading
     * estimate is least sure at the tile borders where the gains are measured; the bounds below guard what is
     * reached (measured 1.3-2.8 % with the true vignetting, 3.2-4.5 % with the estimated shading).
     */
    @Test
    void gainsUnderASpecimen() {
        InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15, 300);
        for (long seed : new long[] {31, 41, 51}) {
            InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 80, 500, 40), false, seed);
            List<int[]> cols = bands(m.columnSeams[0]);
            List<int[]> rows = bands(m.rowSeams);
            Volume truth = m.image.copy();
            for (int y = 0; y < truth.height(); y++) {
                for (int x = 0; x < truth.width(); x++) {
                    float v = m.image.get(x, y, 0);
                    if (v != 0) {
                        double s = InventedMosaic.shading(l, x % l.tileW(), y % l.tileH());
                        truth.set(x, y, 0, (float) (InventedMosaic.OFFSET + (v - InventedMosaic.OFFSET) / s));
                    }
                }
            }
            double oracle = gainError(TileLevelling.estimate(truth, cols, rows, 4, InventedMosaic.OFFSET), m.gains);
            TileShading.Flat flat = TileShading.estimate(m.image, cols, rows, InventedMosaic.OFFSET);
            Volume shaded = TileShading.apply(m.image, cols, rows, flat, InventedMosaic.OFFSET);
            double estimated = gainError(TileLevelling.estimate(shaded, cols, rows, 4, InventedMosaic.OFFSET),
                    m.gains);
            System.out.printf(Locale.ROOT, "specimen mosaic seed %d: gains vs the truth, worst tile: %.2f %% with the "
                    + "true vignetting divided out, %.2f %% with the estimated shading%n", seed, 100 * oracle,
                    100 * estimated);
            assertTrue(oracle <= 0.03, "seed " + seed + ": gains with the true vignetting within 3 %, was " + oracle);
            assertTrue(estimated <= 0.05, "seed " + seed + ": gains with the estimated shading within 5 %, was "
                    + estimated);
        }
    }

    /** Largest relative error of estimated gains against the true ones, both scaled to geometric mean 1. */
    private static double gainError(TileLevelling.Gains g, double[] truth) {
        double lt = 0;
        for (double t : truth) {
            lt += Math.log(t) / truth.length;
        }
        double worst = 0;
        for (int k = 0; k < truth.length; k++) {
            worst = Math.max(worst, Math.abs(g.gains()[k] / (truth[k] / Math.exp(lt)) - 1));
        }
        return worst;
    }

    static List<int[]> bands(int[] seams) {
        return bands(seams, 0);
    }

    /** 4-px bands centred on each seam (+ shift) */
    static List<int[]> bands(int[] seams, int shift) {
        List<int[]> out = new ArrayList<>();
        for (int s : seams) {
            out.add(new int[] {s + shift - 2, s + shift + 2});
        }
        return out;
    }

    /** The image divided by the true vignetting (the oracle's correction), gains left in. */
    private static Volume oracle(InventedMosaic m, List<int[]> cols, List<int[]> rows) {
        InventedMosaic.Layout l = m.layout;
        TileShading.Tiles t = TileShading.Tiles.of(cols, rows, m.image.width(), m.image.height());
        Volume out = m.image.copy();
        for (int r = 0; r < t.rows(); r++) {
            for (int c = 0; c < t.columns(); c++) {
                for (int y = t.y0()[r]; y < t.y1()[r]; y++) {
                    for (int x = t.x0()[c]; x < t.x1()[c]; x++) {
                        double s = InventedMosaic.shading(l, x - t.originX()[c], y - t.originY()[r]);
                        out.set(x, y, 0, (float) (InventedMosaic.OFFSET + (m.image.get(x, y, 0)
                                - InventedMosaic.OFFSET) / s));
                    }
                }
            }
        }
        return out;
    }

    /**
     * The per-tile mean profile: at each block of the tile step, the mean over all tiles of the signal above the
     * offset, each tile first divided by its own mean (so that gains do not count); returns the largest relative
     * deviation of a block from the profile's mean.
     */
    private static double profileSpread(Volume img, List<int[]> cols, List<int[]> rows) {
        TileShading.Tiles t = TileShading.Tiles.of(cols, rows, img.width(), img.height());
        int nbx = t.stepX() / BLOCK;
        int nby = t.stepY() / BLOCK;
        double[] sum = new double[nbx * nby];
        int[] cnt = new int[nbx * nby];
        for (int r = 0; r < t.rows(); r++) {
            for (int c = 0; c < t.columns(); c++) {
                double[] tile = new double[nbx * nby];
                int[] tn = new int[nbx * nby];
                double all = 0;
                int an = 0;
                for (int y = t.y0()[r]; y < t.y1()[r]; y++) {
                    for (int x = t.x0()[c]; x < t.x1()[c]; x++) {
                        int bx = (x - t.originX()[c]) / BLOCK;
                        int by = (y - t.originY()[r]) / BLOCK;
                        if (bx < 0 || by < 0 || bx >= nbx || by >= nby) {
                            continue;
                        }
                        double v = img.get(x, y, 0) - InventedMosaic.OFFSET;
                        tile[by * nbx + bx] += v;
                        tn[by * nbx + bx]++;
                        all += v;
                        an++;
                    }
                }
                for (int k = 0; k < tile.length; k++) {
                    if (tn[k] == BLOCK * BLOCK) {
                        sum[k] += tile[k] / tn[k] / (all / an);
                        cnt[k]++;
                    }
                }
            }
        }
        double mean = 0;
        int m = 0;
        for (int k = 0; k < sum.length; k++) {
            if (cnt[k] > 0) {
                mean += sum[k] / cnt[k];
                m++;
            }
        }
        mean /= m;
        double worst = 0;
        for (int k = 0; k < sum.length; k++) {
            if (cnt[k] > 0) {
                worst = Math.max(worst, Math.abs(sum[k] / cnt[k] / mean - 1));
            }
        }
        return worst;
    }

    /** Largest relative deviation of a tile's median (above the offset) from the median of all tiles' medians. */
    private static double tileMedianSpread(Volume img, List<int[]> cols, List<int[]> rows) {
        TileShading.Tiles t = TileShading.Tiles.of(cols, rows, img.width(), img.height());
        double[] med = new double[t.rows() * t.columns()];
        for (int r = 0; r < t.rows(); r++) {
            for (int c = 0; c < t.columns(); c++) {
                double[] v = new double[(t.y1()[r] - t.y0()[r]) * (t.x1()[c] - t.x0()[c])];
                int n = 0;
                for (int y = t.y0()[r]; y < t.y1()[r]; y++) {
                    for (int x = t.x0()[c]; x < t.x1()[c]; x++) {
                        v[n++] = img.get(x, y, 0) - InventedMosaic.OFFSET;
                    }
                }
                med[r * t.columns() + c] = RobustStats.median(v, n);
            }
        }
        double all = RobustStats.median(med, med.length);
        double worst = 0;
        for (double d : med) {
            worst = Math.max(worst, Math.abs(d / all - 1));
        }
        return worst;
    }
}
