package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;

import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.simulate.Damage;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** Seam masks from a tile layout and seams detected in invented images with planted seams. */
class SeamTest {

    /** An invented noisy field (background 100 photons + blobs, offset 100, Poisson-like noise). */
    static Volume field(int w, int h, int d, long seed) {
        Well19937c rng = new Well19937c(seed);
        SplittableRandom r = new SplittableRandom(seed);
        double[][] blob = new double[60][4];
        for (double[] b : blob) {
            b[0] = w * r.nextDouble();
            b[1] = h * r.nextDouble();
            b[2] = 2 + 10 * r.nextDouble();
            b[3] = 100 + 1000 * r.nextDouble();
        }
        float[] v = new float[w * h * d];
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double mu = 100 + 40.0 * x / w;
                    for (double[] b : blob) {
                        double dx = x - b[0];
                        double dy = y - b[1];
                        mu += b[3] * Math.exp(-(dx * dx + dy * dy) / (2 * b[2] * b[2]));
                    }
                    v[(z * h + y) * w + x] = (float) (100 + mu + Math.sqrt(mu + 4) * rng.nextGaussian());
                }
            }
        }
        return new Volume(w, h, d, v, VoxelSize.UNIT);
    }

    // The layout mask of a 3x4 grid without overlap matches the seams simulate.Damage plants (borders at k n / parts).
    @Test
    void layoutMaskMatchesPlantedSeams() {
        Volume img = field(512, 384, 1, 1);
        byte[] planted = Damage.seams(img, 3, 4, 4, 0.55, 0.12, 100, 2);
        TileLayout layout = new TileLayout(3, 4, 128, 128, 0, 0, false);
        assertEquals(512, layout.width());
        assertArrayEquals(planted, layout.mask(4));
    }

    @Test
    void layoutWithOverlapAndSnakeOrder() {
        TileLayout rowByRow = new TileLayout(2, 3, 100, 80, 10, 8, false);
        TileLayout snake = new TileLayout(2, 3, 100, 80, 10, 8, true);
        assertEquals(280, rowByRow.width());
        assertEquals(152, rowByRow.height());
        assertArrayEquals(new int[] {72}, rowByRow.rowSeams());
        // row-by-row: the later (right) tile covers the overlap, the seam is its left border
        assertArrayEquals(new int[] {90, 180}, rowByRow.columnSeams(1));
        // snake, odd row runs right to left: the later (left) tile covers, the seam is its right border
        assertArrayEquals(new int[] {100, 190}, snake.columnSeams(1));
        assertArrayEquals(new int[] {90, 180}, snake.columnSeams(0));
        byte[] m = snake.mask(2);
        assertEquals((byte) 255, m[100 * 280 + 99]);
        assertEquals(0, m[100 * 280 + 89]);
        assertEquals((byte) 255, m[10 * 280 + 89]);
        assertEquals(10, TileLayout.overlapPixels("10%", 100));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> TileLayout.overlapPixels("ten", 100));
        assertTrue(e.getMessage().startsWith("overlap"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> new TileLayout(2, 2, 10, 10, 10, 0, false));
        assertTrue(e.getMessage().startsWith("overlap"), e.getMessage());
    }

    // Seams of a 3x4 grid planted as simulate.Damage does (bands dimmed to 0.55, tile gains 1 +- 0.12): found at
    // their exact positions, nothing else.
    @Test
    void detectsPlantedSeamsAtExactPositions() {
        Volume img = field(512, 384, 1, 3);
        byte[] planted = Damage.seams(img, 3, 4, 4, 0.55, 0.12, 100, 4);
        SeamDetector.Found f = SeamDetector.detect(img, 8, 4);
        System.out.println("found columns " + f.columns() + " rows " + f.rows() + " regular " + f.regular());
        assertEquals(3, f.columns().size());
        assertEquals(2, f.rows().size());
        assertTrue(f.regular());
        assertArrayEquals(planted, f.mask(512, 384));
    }

    // A tiled z-stack has its seams at one place in every slice: of a 20-slice stack the detector reads 8 slices,
    // spread evenly from the first to the last, and finds the planted seams exactly, as on one plane; the stack is
    // not modified.
    @Test
    void deepStackReadsEvenlySpreadSlices() {
        assertArrayEquals(new int[] {0, 3, 5, 8, 11, 14, 16, 19}, SeamSlices.read(20));
        assertArrayEquals(new int[] {0, 1, 2}, SeamSlices.read(3));
        Volume img = field(512, 384, 20, 3);
        byte[] planted = Damage.seams(img, 3, 4, 4, 0.55, 0.12, 100, 4);
        float[] before = img.data().clone();
        SeamDetector.Found f = SeamDetector.detect(img, 8, 4);
        assertArrayEquals(planted, f.mask(512, 384));
        assertArrayEquals(before, img.data());
    }

    // A tile row that no vertical seam crosses while the others have theirs (a snake's shifted row whose own seams
    // show no phase loses its bands, SnakeOwnRows) is named in the report and the record: the mask is thinner there
    // than the tiling, and the user must know where.
    @Test
    void reportNamesTileRowsLeftWithoutSeams() {
        SeamDetector.Tiling t = new SeamDetector.Tiling(100, 100, new int[] {50, -1, 50}, 100, -1, 0, 0, "", "", false);
        List<String> step = List.of("step");
        List<SeamDetector.Band> rows = List.of(new SeamDetector.Band(98, 102, 20, 0, 300, step),
                new SeamDetector.Band(198, 202, 20, 0, 300, step));
        List<SeamDetector.Band> cols = List.of(new SeamDetector.Band(48, 52, 20, 0, 100, step),
                new SeamDetector.Band(48, 52, 20, 200, 300, step));
        SeamDetector.Found f = new SeamDetector.Found(cols, rows, true, t, List.of(), List.of());
        Result r = new Result();
        SeamReport.detected(f, 300, 300, 1, r, RunContext.quiet(1));
        assertEquals(List.of(2), r.record().get("tile_rows_without_seams"));
        assertTrue(r.report().stream().anyMatch(l -> l.startsWith("tile row [2] (from the top) shows no vertical")),
                r.report().toString());
        // every tile row crossed: nothing said
        List<SeamDetector.Band> all = List.of(new SeamDetector.Band(48, 52, 20, 0, 300, step));
        Result whole = new Result();
        SeamReport.detected(new SeamDetector.Found(all, rows, true, t, List.of(), List.of()), 300, 300, 1, whole,
                RunContext.quiet(1));
        assertTrue(!whole.record().containsKey("tile_rows_without_seams"), whole.record().toString());
    }

    // A trimmed mosaic's step from the shading's corners of square tiles (TrimmedShadingGrid) is said, with its
    // assumption and what to do if it does not hold, and recorded, not taken for a fold of the shading.
    @Test
    void reportSaysSquareTilesWereAssumed() {
        SeamDetector.Tiling t = new SeamDetector.Tiling(118, 118, new int[] {50}, 60, -1, 0, 0, "", "xy=corners", true);
        List<String> step = List.of("shading");
        SeamDetector.Found f = new SeamDetector.Found(List.of(new SeamDetector.Band(48, 52, 3, 0, 300, step)),
                List.of(new SeamDetector.Band(58, 62, 3, 0, 300, step)), true, t, List.of(), List.of());
        Result r = new Result();
        SeamReport.detected(f, 300, 300, 1, r, RunContext.quiet(1));
        @SuppressWarnings("unchecked")
        java.util.Map<String, Object> tiling = (java.util.Map<String, Object>) r.record().get("tiling");
        assertEquals("xy", tiling.get("step_from_square_tiles"));
        assertEquals(null, tiling.get("step_from_shading"));
        assertTrue(r.report().stream().anyMatch(l -> l.contains("the tiles are taken as square")), r.report().toString());
    }

    // An uncropped mosaic's tiles overlap by one number of pixels on both axes, or one share of tiles that are not
    // square (the layout's geometry, no published source): 412 x 276 at steps 100 x 88 leaves 12 and 12; 10 % of
    // 200 x 150 px tiles, 3 x 3, leaves 20 and 15 (560 x 420 at steps 180 x 135). A trimmed mosaic read as whole
    // tiles, cut anywhere, seldom keeps either: 343 x 353 at 110 x 116 leaves 13 and 5 (as crop-tune e-lines-s7402),
    // 372 x 380 at 87 x 126 leaves 24 and 2 (crop-tune2 e-lines-s30402).
    @Test
    void uncroppedAxesShareOneOverlap() {
        assertTrue(SeamDetector.sameOverlap(412, 100, 276, 88));
        assertTrue(SeamDetector.sameOverlap(560, 180, 420, 135));
        assertTrue(!SeamDetector.sameOverlap(343, 110, 353, 116));
        assertTrue(!SeamDetector.sameOverlap(372, 87, 380, 126));
    }

    // An uncropped snake is whole steps plus one overlap wide (the geometry of the layout, no published source): the
    // shift its rows' phases show (11 px here, each phase a pixel off) gives way to the width past whole steps (412 =
    // 4 x 100 + 12) within a pixel, not further, and not on a trimmed reading, whose width says nothing of it.
    @Test
    void uncroppedSnakeOverlapFromItsWidth() {
        assertEquals(12, SeamDetector.snakeOverlap(new int[] {0, 11, 0}, 100, 412, true));
        assertEquals(11, SeamDetector.snakeOverlap(new int[] {0, 11, 0}, 100, 412, false));
        assertEquals(9, SeamDetector.snakeOverlap(new int[] {0, 9, 0}, 100, 412, true));
        assertEquals(-1, SeamDetector.snakeOverlap(new int[] {0, 0, 0}, 100, 412, true));
    }

    // The bundled demo (3x4 grid, 4-pixel seams, 60 defective pixels), and its specimen recorded without seams:
    // the noise-free truth with the demo's background (20 photons), offset (100 ADU) and Poisson-Gaussian noise
    // added here. (The sign test assumes noise: on the noise-free truth itself smooth haze steps the same way in
    // every row, which no camera image does.)
    @Test
    void demoTilesSeamsAndTruthWithout() {
        Path dir = Path.of(System.getProperty("stackwright.project.dir", "."), "test-images");
        Volume img = TiffFiles.read(dir.resolve("demo-tiles.tif"), "demo");
        SeamDetector.Found f = SeamDetector.detect(img, 8, 4);
        System.out.println("demo: columns " + f.columns() + " rows " + f.rows());
        assertArrayEquals(new TileLayout(3, 4, 128, 128, 0, 0, false).mask(4), f.mask(512, 384));
        Volume truth = TiffFiles.read(dir.resolve("demo-tiles-truth.tif"), "demo");
        Well19937c rng = new Well19937c(5);
        float[] t = truth.data();
        for (int i = 0; i < t.length; i++) {
            double mu = Math.max(0, t[i]) + 20;
            t[i] = (float) (100 + mu + Math.sqrt(mu + 4) * rng.nextGaussian());
        }
        SeamDetector.Found none = SeamDetector.detect(truth, 8, 4);
        assertTrue(none.columns().isEmpty() && none.rows().isEmpty(), "found " + none);
    }

    // No seams on invented images without any, 2D and a small stack.
    @Test
    void findsNothingWithoutSeams() {
        for (int d : new int[] {1, 4}) {
            SeamDetector.Found none = SeamDetector.detect(field(300, 220, d, 10 + d), 8, 4);
            assertTrue(none.columns().isEmpty() && none.rows().isEmpty(), "depth " + d + ": found " + none);
        }
    }

    // Tile gains planted by simulate.Damage (1 +- 0.12, drawn in order from SplittableRandom(seed)) are recovered
    // from the bands beside the seams, relative to their geometric mean. The bound is ours, not published: a
    // first guess of 2 % was not met; measured on this busy field of blobs the largest error is 3.1 % with 4-px
    // strips (2.6 % to 13 % for strips of 2 to 16 px: the specimen differs across the seam), so 4 % is asserted.
    @Test
    void levellingRecoversTileGains() {
        Volume img = field(512, 384, 1, 7);
        long seed = 8;
        Damage.seams(img, 3, 4, 4, 0.55, 0.12, 100, seed);
        SplittableRandom rnd = new SplittableRandom(seed);
        double[] truth = new double[12];
        double logMean = 0;
        for (int i = 0; i < 12; i++) {
            truth[i] = 1 + 0.12 * (2 * rnd.nextDouble() - 1);
            logMean += Math.log(truth[i]) / 12;
        }
        java.util.List<int[]> cols = java.util.List.of(new int[] {126, 130}, new int[] {254, 258}, new int[] {382, 386});
        java.util.List<int[]> rows = java.util.List.of(new int[] {126, 130}, new int[] {254, 258});
        TileLevelling.Gains g = TileLevelling.estimate(img, cols, rows, 4, 100);
        for (int i = 0; i < 12; i++) {
            double expected = truth[i] / Math.exp(logMean);
            assertEquals(expected, g.gains()[i], 0.04 * expected, "tile " + i);
        }
        Volume levelled = TileLevelling.apply(img, cols, rows, g, 100);
        assertEquals(img.get(0, 0, 0) - 100, (levelled.get(0, 0, 0) - 100) * g.gains()[0], 1e-3);
    }
}
