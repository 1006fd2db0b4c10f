package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.fft.Convolution;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Bead diameter correction: the image of a solid bead is the PSF convolved with the ball (definition); removing
 * the ball by Richardson-Lucy (Richardson 1972, Lucy 1974) must bring the bead image closer to the PSF.
 */
class BeadSizeCorrectionTest extends TwoWorkers {

    @Test
    void aLargeBeadImageMovesBackTowardsThePsf() {
        VoxelSize voxel = new VoxelSize(0.04, 0.04, 0.1);
        Volume psf = new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD).compute(
                PsfSettings.matched(1.3, 520, 1.518, voxel, 31, 31, 21), workers);
        Volume ball = BeadSizeCorrection.ball(psf, 0.2);
        assertEquals(1.0, ball.sum(), 1e-6);
        Volume bead = Convolution.convolve(psf, ball, workers);
        double s = bead.sum();
        for (int i = 0; i < bead.size(); i++) {
            bead.data()[i] /= (float) s;
        }
        Volume corrected = BeadSizeCorrection.correct(bead, 0.2, workers);
        double before = ConfocalPsfTest.normalisedL2(psf, bead);
        double after = ConfocalPsfTest.normalisedL2(psf, corrected);
        assertTrue(after < 0.5 * before, "difference to the PSF before " + before + ", after " + after);
        assertTrue(Fwhm.measure(corrected).xUm() < Fwhm.measure(bead).xUm(), "the correction narrows the image");
        assertTrue(BeadSizeCorrection.matters(0.2, psf));
        assertTrue(!BeadSizeCorrection.matters(0.01, psf));
    }
}
