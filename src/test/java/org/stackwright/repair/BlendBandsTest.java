package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.Locale;

import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;

/**
 * Blend bands found from the noise ({@link BlendBands}) on invented mosaics of {@link InventedMosaic}, whose tiles are
 * separate noisy exposures blended afterwards. The physics checked: the variance of a weighted mean of independent
 * noises, w^2 s1^2 + (1 - w)^2 s2^2 (Bevington &amp; Robinson, "Data Reduction and Error Analysis for the Physical
 * Sciences", 3rd ed. 2003, ch. 3, propagation of errors; cited from memory). Goals of the issue (ours, no published
 * benchmark): every band within 2 px, the tile step exact, no band on mosaics without blending or without tiles.
 */
class BlendBandsTest {

    static final InventedMosaic.Layout BLEND_3X3 = new InventedMosaic.Layout(3, 3, 140, 140, 20, false, true, 0,
            0.25, 0.15, 300);
    static final InventedMosaic.Layout BLEND_SNAKE = new InventedMosaic.Layout(3, 4, 100, 90, 12, true, true, 0, 0.25,
            0.15, 300);
    /** row-by-row order, tiles higher than wide, another overlap: a layout of the sweep only */
    static final InventedMosaic.Layout BLEND_ROWS = new InventedMosaic.Layout(4, 3, 110, 130, 16, false, true, 0, 0.25,
            0.15, 300);

    /**
     * On a flat specimen the noise ratio in the middle of a band is that of the mean of two exposures, 0.5, and at a
     * quarter of the band 0.25^2 + 0.75^2 = 0.625 (Bevington &amp; Robinson 2003, ch. 3, from memory); the profile is
     * averaged over the bands of both axes and three tile borders each.
     */
    @Test
    void ratioInTheBandIsThatOfAWeightedMeanOfTwoExposures() {
        InventedMosaic.Layout l = new InventedMosaic.Layout(4, 4, 140, 140, 20, false, true, 0, 0.25, 0.15, 300);
        InventedMosaic m = InventedMosaic.make(l, InventedMosaic.Defects.NONE, true, 7);
        NoiseRatioProfile p = NoiseRatioProfile.of(m.image);
        double[] mid = new double[2];
        double[] quarter = new double[2];
        for (int k = 1; k < 4; k++) {
            int s = k * 120;
            for (double[] prof : new double[][] {p.columns, p.rows}) {
                // pixels 9 and 10 straddle the middle (w = 0.475, 0.525: 0.501); 4 and 15 (w = 0.225, 0.775: 0.651)
                mid[0] += 0.5 * (prof[s + 9] + prof[s + 10]);
                quarter[0] += 0.5 * (prof[s + 4] + prof[s + 15]);
                mid[1]++;
                quarter[1]++;
            }
        }
        double atMid = mid[0] / mid[1];
        double atQuarter = quarter[0] / quarter[1];
        System.out.printf(Locale.ROOT, "flat blended mosaic: noise ratio %.3f mid-band (0.501 expected), %.3f at a "
                + "quarter (0.651 expected)%n", atMid, atQuarter);
        // 12 lines of about 540 pixels each: the ratio's standard error is about 0.06 / sqrt(12) = 0.02
        assertEquals(0.501, atMid, 0.06);
        assertEquals(0.651, atQuarter, 0.06);
    }

    /**
     * The blended mosaic of MosaicSeamTest (seed 45) and a second draw: bands within 2 px, step exact (over 30 fresh
     * draws the step is exact on both axes in 19 and 1 px off in 11, see the sweep and README).
     */
    @Test
    void blendedMosaicBandsWithin2PxAndStepExact() {
        String miss = check(BLEND_3X3, 45, true);
        assertNull(miss, "seed 45: " + miss);
        miss = check(BLEND_3X3, 46, true);
        assertNull(miss, "seed 46: " + miss);
    }

    /**
     * Another overlap, tile size and snake order, and row-by-row order with tiles higher than wide: bands within 2 px,
     * step exact (over 30 fresh draws each in 27, see README).
     */
    @Test
    void snakeAndRowBlendBandsWithin2PxAndStepExact() {
        String miss = check(BLEND_SNAKE, 48, true);
        assertNull(miss, miss);
        miss = check(BLEND_ROWS, 49, true);
        assertNull(miss, "row-by-row, 110x130: " + miss);
    }

    /** Mosaics without blending (every layout of MosaicSeamTest but the blended ones) and an untiled flat field. */
    @Test
    void noBlendBandWithoutBlending() {
        MosaicSeamTest.cases().filter(c -> !c.layout().blend()).forEach(c -> {
            InventedMosaic m = InventedMosaic.make(c.layout(), c.defects(), false, c.seed());
            BlendBands.Found f = BlendBands.find(m.image);
            assertTrue(f.x() == null && f.y() == null, c.name() + ": " + f);
        });
        InventedMosaic.Layout one = new InventedMosaic.Layout(1, 1, 400, 300, 0, false, false, 0, 0, 0, 300);
        BlendBands.Found f = BlendBands.find(InventedMosaic.make(one, InventedMosaic.Defects.NONE, true, 3).image);
        assertTrue(f.x() == null && f.y() == null, "flat field without tiles: " + f);
    }

    /**
     * Draws of specimen, gains and noise: how often the blended mosaics' bands are all found within 2 px with the
     * step exact, and how often a mosaic without blending shows a band. A measurement for README, off by default
     * ({@code -Dstackwright.blendsweep=N}, N seeds from {@code -Dstackwright.blendsweep.from=S}, 200 by default;
     * about two seconds each).
     */
    @Test
    void sweepOverSeeds() {
        int seeds = Integer.getInteger("stackwright.blendsweep", 0);
        Assumptions.assumeTrue(seeds > 0, "sweep off; -Dstackwright.blendsweep=N to run it");
        long from = Long.getLong("stackwright.blendsweep.from", 200);
        InventedMosaic.Layout[] layouts = {BLEND_3X3, BLEND_SNAKE, BLEND_ROWS};
        int[] right = new int[layouts.length];
        int[] within = new int[layouts.length];
        int falseBands = 0;
        for (long seed = from; seed < from + seeds; seed++) {
            for (int i = 0; i < layouts.length; i++) {
                String exact = check(layouts[i], seed, true);
                String loose = check(layouts[i], seed, false);
                right[i] += exact == null ? 1 : 0;
                within[i] += loose == null ? 1 : 0;
                System.out.printf(Locale.ROOT, "seed %d %s: %s%n", seed, layouts[i], exact == null ? "right" : exact);
            }
            for (InventedMosaic.Layout l : new InventedMosaic.Layout[] {
                new InventedMosaic.Layout(3, 4, 128, 128, 16, true, false, 0, 0.25, 0.15, 300),
                new InventedMosaic.Layout(3, 4, 120, 100, 0, false, false, 0, 0.25, 0.15, 300),
                new InventedMosaic.Layout(1, 1, 500, 400, 0, false, false, 0, 0.25, 0, 300)}) {
                BlendBands.Found f = BlendBands.find(InventedMosaic.make(l, InventedMosaic.Defects.NONE, false, seed)
                        .image);
                falseBands += (f.x() != null ? 1 : 0) + (f.y() != null ? 1 : 0);
            }
        }
        for (int i = 0; i < layouts.length; i++) {
            System.out.printf(Locale.ROOT, "blend sweep, seeds %d-%d, %s: %d right (bands within 2 px, step exact), %d "
                    + "bands within 2 px and step within 1 px%n", from, from + seeds - 1, layouts[i], right[i],
                    within[i]);
        }
        System.out.printf(Locale.ROOT, "axes with a false band on 3 layouts without blending: %d of %d%n", falseBands,
                6 * seeds);
        // goals of the issue, ours: no false band; the measured counts go to README
        assertEquals(0, falseBands, "false blend bands");
    }

    /**
     * @param exact the step must be exact (else within 1 px)
     * @return null when both axes' bands are found within 2 px, else what is wrong
     */
    static String check(InventedMosaic.Layout l, long seed, boolean exact) {
        InventedMosaic m = InventedMosaic.make(l, InventedMosaic.Defects.NONE, false, seed);
        BlendBands.Found f = BlendBands.find(m.image);
        String x = axis("x", f.x(), m.columnSeams[0], l.overlap(), l.tileW() - l.overlap(), exact);
        String y = axis("y", f.y(), m.rowSeams, l.overlap(), l.tileH() - l.overlap(), exact);
        return x == null ? y : y == null ? x : x + "; " + y;
    }

    private static String axis(String name, BlendBands.Axis a, int[] truth, int overlap, int step, boolean exact) {
        if (a == null) {
            return name + ": no bands";
        }
        if (Math.abs(a.step() - step) > (exact ? 0 : 1)) {
            return name + ": step " + a.step() + " (true " + step + ")";
        }
        if (a.starts().length != truth.length) {
            return name + ": bands at " + Arrays.toString(a.starts()) + " (true " + Arrays.toString(truth) + ")";
        }
        for (int i = 0; i < truth.length; i++) {
            int err = Math.max(Math.abs(a.starts()[i] - truth[i]), Math.abs(a.starts()[i] + a.width() - truth[i]
                    - overlap));
            if (err > 2) {
                return name + ": band " + a.starts()[i] + ".." + (a.starts()[i] + a.width() - 1) + " (true "
                        + truth[i] + ".." + (truth[i] + overlap - 1) + ")";
            }
        }
        return null;
    }
}
