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
            // what --level-tiles does (default strip 4), and the seam gains alone with strips of 12 and 4 px
            BackgroundGains.Choice choice = BackgroundGains.estimate(m.image, cols, rows, 4, InventedMosaic.OFFSET);
            TileShading.Flat flat = choice.flat();
            Volume shaded = choice.corrected();
            TileLevelling.Gains g = choice.gains();
            double gainError = gainError(g, m.gains);
            double gainError12 = gainError(TileLevelling.estimate(shaded, cols, rows, 12, InventedMosaic.OFFSET),
                    m.gains);
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
                    + "%.2f %% after; gains vs the truth, worst: %.2f %% (%s, levels vs seams misfit %.2f %%), seams "
                    + "alone %.2f %% (strip 12), %.2f %% (strip 4); surface range %.3f-%.3f%n", l, 100 * before,
                    100 * after, 100 * oracle, 100 * tilesBefore, 100 * tilesAfter, 100 * gainError,
                    choice.fromLevels() ? "background levels" : "seams", 100 * choice.levelMisfit(),
                    100 * gainError12, 100 * gainError4, flat.min(), flat.max());
            assertTrue(before > 0.1, "the invented field is shaded: " + before);
            assertTrue(after <= 0.02, l + ": profile flat within 2 % after correction, was " + after);
            // the same 2 % for the tile gains of --level-tiles with the default strip (background levels, measured
            // 0.15-0.19 %; the seams alone: 0.7-1.5 %)
            assertTrue(choice.fromLevels(), l + ": a flat field has one background: its levels agree with the seams");
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
     * Tile gains under a specimen (cells, puncta, fibres crossing the seams, gaps, defects), four seeds, as
     * --level-tiles gives them (default strip 4): each tile's background level after the shading is divided out
     * ({@link RobustStats#background} of its block logs; the shading and the levels estimated by alternation), used
     * because it agrees with the seam ratios ({@link BackgroundGains}). Beside it, for comparison: the seam gains alone
     * (for each line across a seam a straight line with a step at the seam fitted to the pixels beside it, Tukey's
     * biweight over the lines, least squares over the tile graph: common practice for mosaic gain compensation, no
     * single source; the biweight: Mosteller &amp; Tukey, "Data Analysis and Regression", 1977), with the estimated
     * shading and with the true vignetting divided out (the oracle of that method). Measured before the background
     * levels (seam gains on the shading of the block medians alone): worst 3.2-6.0 % on these seeds and 51, 71;
     * 1.2-4.5 % with the true vignetting. Goal of the user: about 1 % (ours, no published benchmark).
     */
    @Test
    void gainsUnderASpecimen() {
        InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15, 300);
        for (long seed : new long[] {31, 41, 61, 81}) {
            InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 80, 500, 40), false, seed);
            List<int[]> cols = bands(m.columnSeams[0]);
            List<int[]> rows = bands(m.rowSeams);
            BackgroundGains.Choice choice = BackgroundGains.estimate(m.image, cols, rows, 4, InventedMosaic.OFFSET);
            double error = gainError(choice.gains(), m.gains);
            double seams = gainError(TileLevelling.estimate(choice.corrected(), cols, rows, 4, InventedMosaic.OFFSET),
                    m.gains);
            double oracle = gainError(TileLevelling.estimate(trueVignettingOut(m), cols, rows, 4,
                    InventedMosaic.OFFSET), m.gains);
            System.out.printf(Locale.ROOT, "specimen mosaic seed %d: gains vs the truth, worst tile: %.2f %% (%s, "
                    + "levels vs seams misfit %.2f %%); seams alone %.2f %% with the estimated shading, %.2f %% with "
                    + "the true vignetting divided out%n", seed, 100 * error, choice.fromLevels() ? "background levels"
                    : "seams", 100 * choice.levelMisfit(), 100 * seams, 100 * oracle);
            assertTrue(choice.fromLevels(), "seed " + seed + ": the tiles share one background: levels used");
            // the aim of about 1 %; measured 0.23-0.39 %
            assertTrue(error <= 0.01, "seed " + seed + ": gains within 1 %, was " + error);
        }
    }

    /**
     * Where tissue 1.2 or 2 times brighter than the rest (its background too) covers part of the mosaic, the tiles
     * do not share one background: their levels are off by up to the tissue's contrast, and the check against the
     * seams must reject them (measured misfit 7.2-10.2 % at 1.2, 27-34 % at 2, against 1.0-5.0 % for a shared
     * background of 300 photons; the sweep below). The seam gains that are kept instead are not good either here (the
     * shading estimate is disturbed by the tissue's edge inside the tiles: 9-47 % worst), which README's limits say;
     * this test guards the choice.
     */
    @Test
    void levelsGiveWayToTheSeamsWhereTissueCoversPartOfTheMosaic() {
        InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15, 300);
        InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 80, 500, 40), false, 31);
        List<int[]> cols = bands(m.columnSeams[0]);
        List<int[]> rows = bands(m.rowSeams);
        for (double contrast : new double[] {1.2, 2}) {
            Volume img = withTissue(m.image, contrast);
            TileShading.Estimate est = TileShading.estimateWithLevels(img, cols, rows, InventedMosaic.OFFSET);
            BackgroundGains.Choice choice = BackgroundGains.estimate(img, cols, rows, 4, InventedMosaic.OFFSET);
            double error = gainError(choice.gains(), m.gains);
            double[] lg = new double[est.logLevels().length];
            for (int k = 0; k < lg.length; k++) {
                lg[k] = Math.exp(est.logLevels()[k]);
            }
            double levels = gainError(new TileLevelling.Gains(3, 4, lg, 0, 0, List.of()), m.gains);
            System.out.printf(Locale.ROOT, "tissue %.1f times brighter over part of the mosaic: levels vs seams misfit "
                    + "%.2f %%, gains from %s, worst %.2f %% (the levels would be %.2f %% off)%n", contrast,
                    100 * choice.levelMisfit(), choice.fromLevels() ? "background levels" : "seams", 100 * error,
                    100 * levels);
            assertTrue(!choice.fromLevels(), contrast + ": levels rejected, misfit " + choice.levelMisfit());
            assertTrue(error < levels, contrast + ": the seams do better than the rejected levels");
        }
    }

    /**
     * Gains over many seeds, backgrounds (60, 300, 1000 photons) and tissue contrasts (1: a shared background; 1.1,
     * 1.2, 2: tissue that much brighter over part of the mosaic), against the seam gains on the shading of the tiles'
     * medians (what --level-tiles did before the background levels, and still does when it rejects them). A
     * measurement for README, off by default ({@code -Dstackwright.gainsweep=N}, N seeds; about 4 s per seed).
     */
    @Test
    void gainsOverSeedsBackgroundsAndTissue() {
        int seeds = Integer.getInteger("stackwright.gainsweep", 0);
        org.junit.jupiter.api.Assumptions.assumeTrue(seeds > 0, "sweep off; -Dstackwright.gainsweep=N to run it");
        for (double contrast : new double[] {1, 1.1, 1.2, 2}) {
            for (double background : new double[] {60, 300, 1000}) {
                InventedMosaic.Layout l = new InventedMosaic.Layout(3, 4, 200, 200, 0, false, false, 2, 0.25, 0.15,
                        background);
                double worst = 0;
                double worstBefore = 0;
                double minMisfit = Double.POSITIVE_INFINITY;
                double maxMisfit = 0;
                int fromLevels = 0;
                for (long seed = 200; seed < 200 + seeds; seed++) {
                    InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 80, 500, 40), false,
                            seed);
                    List<int[]> cols = bands(m.columnSeams[0]);
                    List<int[]> rows = bands(m.rowSeams);
                    Volume img = contrast == 1 ? m.image : withTissue(m.image, contrast);
                    BackgroundGains.Choice c = BackgroundGains.estimate(img, cols, rows, 4, InventedMosaic.OFFSET);
                    TileShading.Flat byMedian = TileShading.estimateWithLevels(img, cols, rows, InventedMosaic.OFFSET)
                            .medianFlat();
                    double before = gainError(TileLevelling.estimate(TileShading.apply(img, cols, rows, byMedian,
                            InventedMosaic.OFFSET), cols, rows, 4, InventedMosaic.OFFSET), m.gains);
                    double error = gainError(c.gains(), m.gains);
                    worst = Math.max(worst, error);
                    worstBefore = Math.max(worstBefore, before);
                    minMisfit = Math.min(minMisfit, c.levelMisfit());
                    maxMisfit = Math.max(maxMisfit, c.levelMisfit());
                    fromLevels += c.fromLevels() ? 1 : 0;
                    if (contrast == 1 && background >= 300) {
                        // the aim of about 1 % where the tiles share a background of enough photons
                        assertTrue(c.fromLevels() && error <= 0.01, "seed " + seed + ", background " + background
                                + ": gains within 1 %, was " + error + " (levels used: " + c.fromLevels() + ")");
                    }
                }
                System.out.printf(Locale.ROOT, "tissue contrast %.1f, background %4.0f photons, %d seeds: levels used "
                        + "%d times (misfit %.1f-%.1f %%), gains worst %.2f %%; seams on the median shading %.2f %%%n",
                        contrast, background, seeds, fromLevels, 100 * minMisfit, 100 * maxMisfit, 100 * worst,
                        100 * worstBefore);
            }
        }
    }

    /**
     * The operation says where the gains came from: background levels on a small mosaic of the kind; on it with
     * tissue twice as bright over part of it, a warning that the levels disagree with the seams, and the record
     * names the seams.
     */
    @Test
    void levelTilesSaysWhereTheGainsCameFrom() {
        InventedMosaic.Layout l = new InventedMosaic.Layout(2, 3, 128, 128, 0, false, false, 2, 0.25, 0.15, 300);
        InventedMosaic m = InventedMosaic.make(l, new InventedMosaic.Defects(1, 1, 1, 40, 100, 10), false, 41);
        for (boolean tissue : new boolean[] {false, true}) {
            Volume img = tissue ? withTissue(m.image, 2) : m.image;
            SeamMaskOperation op = new SeamMaskOperation();
            org.stackwright.op.Values v = org.stackwright.op.Values.parse(op.name(), op.params(), java.util.Map.of(
                    "grid", "2x3", "tile", "128x128", "level-tiles", "true", "offset", "100"));
            v.withImage("input", org.stackwright.volume.ImagePlusAdapter.toImagePlus(img, "mosaic"));
            org.stackwright.op.RunContext ctx = org.stackwright.op.RunContext.quiet(1);
            org.stackwright.op.Result r = op.run(v, ctx);
            assertTrue(r.record().get("tile_gain_source").equals(tissue ? "seams" : "background levels"),
                    "gain source " + r.record().get("tile_gain_source"));
            boolean warned = ctx.warnings().stream().anyMatch(w -> w.contains("background levels disagree"));
            assertTrue(warned == tissue, "warning " + ctx.warnings());
        }
    }

    /** The specimen part multiplied by a soft-edged ellipse of tissue over the left part of the mosaic. */
    private static Volume withTissue(Volume img, double contrast) {
        Volume out = img.copy();
        int w = img.width();
        int h = img.height();
        for (int y = 0; y < h; y++) {
            for (int x = 0; x < w; x++) {
                float v = img.get(x, y, 0);
                if (v != 0) {
                    double dx = (x - 0.3 * w) / (0.3 * w);
                    double dy = (y - 0.4 * h) / (0.35 * h);
                    double k = 1 + (contrast - 1) / (1 + Math.exp(12 * (Math.sqrt(dx * dx + dy * dy) - 1)));
                    out.set(x, y, 0, (float) (InventedMosaic.OFFSET + (v - InventedMosaic.OFFSET) * k));
                }
            }
        }
        return out;
    }

    /** The mosaic with the true vignetting divided out of every tile, gains left in. */
    private static Volume trueVignettingOut(InventedMosaic m) {
        Volume truth = m.image.copy();
        for (int y = 0; y < truth.height(); y++) {
            for (int x = 0; x < truth.width(); x++) {
                float v = m.image.get(x, y, 0);
                if (v != 0) {
                    double s = InventedMosaic.shading(m.layout, x % m.layout.tileW(), y % m.layout.tileH());
                    truth.set(x, y, 0, (float) (InventedMosaic.OFFSET + (v - InventedMosaic.OFFSET) / s));
                }
            }
        }
        return truth;
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
