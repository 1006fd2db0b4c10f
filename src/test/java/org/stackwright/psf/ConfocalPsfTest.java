package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Confocal and two-photon models. The product form of the confocal PSF (excitation x emission convolved with the
 * pinhole) is from Wilson & Sheppard, Theory and Practice of Scanning Optical Microscopy, 1984; with a vanishing
 * pinhole and equal wavelengths it is Airy^2 with FWHM 0.3693 lambda/NA (computed by
 * tools/reference/psf_optics_values.py from Born & Wolf sec. 8.5.2).
 */
class ConfocalPsfTest extends TwoWorkers {

    private static final DiffractionPsf CONFOCAL = new DiffractionPsf(DiffractionPsf.Kind.CONFOCAL);

    @Test
    void vanishingPinholeGivesTheSquaredAiryWidth() {
        double na = 1.4;
        double lambda = 520;
        double unit = lambda * 1e-3 / na;
        double pixel = unit / 40;
        PsfSettings s = PsfSettings.matched(na, lambda, 1.518, new VoxelSize(pixel, pixel, 0.1), 61, 61, 1)
                .withExcitation(lambda, 0);
        double fwhm = ReferenceValues.get("confocal_fwhm");
        double[] radial = CONFOCAL.radialProfile(s, 0, workers);
        // Airy^2 FWHM 0.3693 lambda/NA within 4 %
        assertEquals(fwhm, 2 * Profiles.halfMaximumFromStart(radial) * CONFOCAL.radialSpacing(s) / unit,
                0.04 * fwhm, "confocal FWHM / (lambda/NA), radial profile");
        Volume v = CONFOCAL.compute(s, workers);
        assertEquals(fwhm, 2 * Profiles.halfMaximumFromStart(Profiles.fromCentreX(v)) * pixel / unit, 0.04 * fwhm,
                "confocal FWHM / (lambda/NA), volume");
    }

    @Test
    void smallPinholeApproachesTheProductAndLargePinholeTheWidefieldExcitationPsf() {
        VoxelSize voxel = new VoxelSize(0.05, 0.05, 0.15);
        PsfSettings base = PsfSettings.matched(1.2, 560, 1.33, voxel, 41, 41, 15);
        Volume product = CONFOCAL.compute(base.withExcitation(488, 0), workers);
        // a small disc adds its variance a^2/2 to the emission PSF, so the difference to the product shrinks
        // like the square of the pinhole size (factor 4 per halving)
        double[] gaps = new double[3];
        double[] sizes = {0.4, 0.2, 0.1};
        for (int i = 0; i < 3; i++) {
            gaps[i] = normalisedL2(product, CONFOCAL.compute(base.withExcitation(488, sizes[i]), workers));
        }
        assertTrue(gaps[2] < 0.01, "0.1 AU vs product: " + gaps[2]);
        for (int i = 1; i < 3; i++) {
            double ratio = gaps[i - 1] / gaps[i];
            assertTrue(ratio > 3.5 && ratio < 4.5, "halving the pinhole divides the gap by " + ratio);
        }
        Volume widefieldExcitation = new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD).compute(
                PsfSettings.matched(1.2, 488, 1.33, voxel, 41, 41, 15), workers);
        double previous = Double.MAX_VALUE;
        double last = 0;
        for (double au : new double[] {0.5, 2, 8, 32}) {
            double d = normalisedL2(widefieldExcitation, CONFOCAL.compute(base.withExcitation(488, au), workers));
            assertTrue(d < previous, "distance to widefield must shrink as the pinhole opens: " + au + " AU gives " + d);
            previous = d;
            last = d;
        }
        assertTrue(last < 0.05, "32 AU vs widefield at the excitation wavelength: " + last);
    }

    @Test
    void twoPhotonIsTheSquaredExcitationPsf() {
        VoxelSize voxel = new VoxelSize(0.06, 0.06, 0.2);
        PsfSettings s = PsfSettings.matched(1.0, 520, 1.33, voxel, 31, 31, 15).withExcitation(900, 1);
        Volume twoPhoton = new DiffractionPsf(DiffractionPsf.Kind.TWO_PHOTON).compute(s, workers);
        double[] excitation = new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD).radialProfile(
                PsfSettings.matched(1.0, 900, 1.33, voxel, 31, 31, 15), 0, workers);
        double[] squared = new DiffractionPsf(DiffractionPsf.Kind.TWO_PHOTON).radialProfile(s, 0, workers);
        for (int i = 0; i < squared.length; i++) {
            assertEquals(excitation[i] * excitation[i], squared[i], 1e-9 * squared[0]);
        }
        // the emission wavelength plays no part
        PsfSettings otherEmission = PsfSettings.matched(1.0, 650, 1.33, voxel, 31, 31, 15).withExcitation(900, 1);
        assertEquals(twoPhoton, new DiffractionPsf(DiffractionPsf.Kind.TWO_PHOTON).compute(otherEmission, workers));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () ->
                new DiffractionPsf(DiffractionPsf.Kind.TWO_PHOTON).compute(s.withExcitation(0, 1), workers));
        assertTrue(e.getMessage().startsWith("excitation is required for model two-photon"), e.getMessage());
    }

    static double normalisedL2(Volume a, Volume b) {
        double d = 0;
        double n = 0;
        for (int i = 0; i < a.size(); i++) {
            double e = a.data()[i] - b.data()[i];
            d += e * e;
            n += (double) a.data()[i] * a.data()[i];
        }
        return Math.sqrt(d / n);
    }
}
