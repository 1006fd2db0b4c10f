package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** What {@link PsfChecks#prepare} returns for usable PSFs (its refusals are rows of the bad-input table). */
class PsfChecksTest {

    private static final Volume IMAGE = Volume.zeros(64, 64, 32, new VoxelSize(0.1, 0.1, 0.25));

    @Test
    void normalisesToUnitSumWithoutTouchingTheInput() {
        Volume psf = GaussianPsf.sampled(0.15, 0.4, IMAGE.voxel(), 9, 9, 7);
        float[] before = psf.data().clone();
        for (int i = 0; i < psf.size(); i++) {
            psf.data()[i] *= 7;
        }
        float[] scaled = psf.data().clone();
        RunContext ctx = RunContext.quiet(1);
        Volume p = PsfChecks.prepare("psf", psf, IMAGE, ctx);
        assertEquals(1.0, p.sum(), 1e-5);
        assertArrayEquals(scaled, psf.data(), "the PSF given was modified");
        assertEquals(psf.argMax(), p.argMax());
        assertTrue(ctx.warnings().isEmpty(), ctx.warnings().toString());
        assertEquals(before.length, p.size());
    }

    /**
     * A Gaussian PSF sampled at twice the image's pixel size is resampled to it: sizes stay odd, the peak stays on
     * the centre voxel, and the lateral variance is the Gaussian's sigma^2 plus h^2/6, the variance that linear
     * interpolation between samples h apart adds (a triangle kernel of half-width h has variance h^2/6).
     */
    @Test
    void anotherVoxelSizeIsResampledKeepingTheCentreAndTheWidth() {
        double sigma = 0.3;
        double h = 0.2;
        Volume coarse = GaussianPsf.sampled(sigma, 0.5, new VoxelSize(h, h, 0.25), 15, 15, 9);
        RunContext ctx = RunContext.quiet(1);
        Volume p = PsfChecks.prepare("psf", coarse, IMAGE, ctx);
        assertEquals(1, ctx.warnings().size(), ctx.warnings().toString());
        assertTrue(p.width() % 2 == 1 && p.height() % 2 == 1 && p.depth() % 2 == 1, p.shape());
        assertEquals(p.index(p.width() / 2, p.height() / 2, p.depth() / 2), p.argMax(), "peak off centre");
        double m2 = 0;
        double sum = 0;
        for (int z = 0; z < p.depth(); z++) {
            for (int y = 0; y < p.height(); y++) {
                for (int x = 0; x < p.width(); x++) {
                    double dx = (x - p.width() / 2) * p.voxel().x();
                    m2 += p.get(x, y, z) * dx * dx;
                    sum += p.get(x, y, z);
                }
            }
        }
        double expected = sigma * sigma + h * h / 6;
        assertEquals(expected, m2 / sum, 0.05 * expected, "lateral variance after resampling");
    }
}
