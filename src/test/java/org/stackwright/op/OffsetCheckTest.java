package org.stackwright.op;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The camera offset against the data ({@link InputChecks#checkOffset}) on dark camera frames drawn here (Gaussian
 * read noise around a dark level, java.util.Random, not the project's simulator): the right offset is never
 * refused, however many pixels the noise puts below it; an offset a few noise standard deviations above the dark
 * level is refused whether the read noise is given or not.
 */
class OffsetCheckTest {

    private static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.3);

    /** A 64x64x4 dark frame: dark level plus Gaussian noise of standard deviation sigma, optionally rounded. */
    private static Volume dark(long seed, double level, double sigma, boolean integer) {
        Random r = new Random(seed);
        float[] px = new float[64 * 64 * 4];
        for (int i = 0; i < px.length; i++) {
            double v = level + sigma * r.nextGaussian();
            px[i] = (float) (integer ? Math.rint(v) : v);
        }
        return new Volume(64, 64, 4, px, VOXEL);
    }

    @Test
    void thePixelNoiseOfADarkFrameIsItsReadNoise() {
        for (double sigma : new double[] {1.5, 4, 30}) {
            double measured = InputChecks.pixelNoise(dark(3, 500, sigma, false));
            // the median of |difference| has a relative standard error of about 1 / sqrt(n) for n = 16128 differences
            assertEquals(sigma, measured, 0.03 * sigma, "sigma " + sigma);
        }
    }

    @Test
    void theRightOffsetIsNeverRefusedOnADarkFrame() {
        // half the pixels lie below the dark level: with a refusal at the offset itself this was a coin flip
        for (long seed = 1; seed <= 20; seed++) {
            for (double readNoiseGiven : new double[] {0, 2}) {
                RunContext ctx = RunContext.quiet(1);
                InputChecks.checkOffset("input", dark(seed, 100, 2, seed % 2 == 0), 100, readNoiseGiven, ctx);
                if (readNoiseGiven == 0) {
                    assertTrue(ctx.warnings().stream().anyMatch(w -> w.contains("give the read noise")),
                            "seed " + seed + ": " + ctx.warnings());
                } else {
                    assertTrue(ctx.warnings().isEmpty(), "seed " + seed + ": " + ctx.warnings());
                }
            }
        }
    }

    @Test
    void anOffsetAFewNoiseDeviationsTooHighIsRefused() {
        for (double above : new double[] {3, 10, 50}) {
            for (double readNoiseGiven : new double[] {0, 2}) {
                IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> InputChecks
                        .checkOffset("input", dark(7, 100, 2, true), 100 + 2 * above, readNoiseGiven,
                                RunContext.quiet(1)));
                assertTrue(e.getMessage().startsWith("offset = ") && e.getMessage().contains("is above most of the data"),
                        e.getMessage());
            }
        }
        // half a noise deviation too high: a warning only
        RunContext ctx = RunContext.quiet(1);
        InputChecks.checkOffset("input", dark(7, 100, 2, false), 101, 0, ctx);
        assertTrue(ctx.warnings().stream().anyMatch(w -> w.contains("lie below the offset 101 ADU")), ctx.warnings()
                .toString());
    }
}
