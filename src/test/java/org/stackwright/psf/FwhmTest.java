package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * FWHM measurement. On a sampled Gaussian the fit must return 2 sqrt(2 ln 2) sigma (the voxel integral adds
 * pixel^2 / 12 to the variance); on the Airy pattern the Gaussian fitted to the main lobe must give the Airy
 * FWHM 0.5145 lambda/NA (Born & Wolf sec. 8.5.2, value recomputed by tools/reference/psf_optics_values.py)
 * within 3 %.
 */
class FwhmTest extends TwoWorkers {

    @ParameterizedTest(name = "sigma {0} um, {1} um voxels")
    @CsvSource({"0.2, 0.05", "0.15, 0.1", "0.4, 0.1"})
    void gaussianWidthIsRecovered(double sigma, double pixel) {
        Volume g = GaussianPsf.sampled(sigma, 2 * sigma, new VoxelSize(pixel, pixel, pixel), 41, 41, 41);
        double expected = Fwhm.FWHM_PER_SIGMA * Math.sqrt(sigma * sigma + pixel * pixel / 12);
        Fwhm.Widths w = Fwhm.measure(g);
        assertEquals(expected, w.xUm(), 0.01 * expected, "x");
        assertEquals(expected, w.yUm(), 0.01 * expected, "y");
        double expectedZ = Fwhm.FWHM_PER_SIGMA * Math.sqrt(4 * sigma * sigma + pixel * pixel / 12);
        assertEquals(expectedZ, w.zUm(), 0.01 * expectedZ, "z");
    }

    @ParameterizedTest(name = "NA {0}")
    @CsvSource({"1.4, 1.518", "0.8, 1.0"})
    void airyMainLobeGivesTheAiryWidth(double na, double n) {
        double unit = 0.52 / na;
        double pixel = unit / 12;
        Volume v = new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD).compute(
                PsfSettings.matched(na, 520, n, new VoxelSize(pixel, pixel, 0.1), 41, 41, 1), workers);
        double fwhm = ReferenceValues.get("airy_fwhm");
        assertEquals(fwhm, Fwhm.measure(v).xUm() / unit, 0.03 * fwhm);
    }
}
