package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The scalar widefield (Born & Wolf) model against the Airy pattern and the paraxial axial intensity.
 * Source of all expected values: Born & Wolf, Principles of Optics, 7th ed., 1999: sec. 8.5.2 (Airy pattern
 * I(v) = [2 J1(v)/v]^2, first zero v = 3.8317 -> r = 0.6098 lambda/NA; FWHM 0.5145 lambda/NA computed from the
 * same formula) and sec. 8.8 (on-axis paraxial I(u) = [sin(u/4)/(u/4)]^2, u = 2 pi NA^2 z / (n lambda): first
 * zero z = 2 n lambda/NA^2, FWHM 1.7718 n lambda/NA^2 computed from it). The values were recomputed with SciPy
 * by tools/reference/airy_values.py.
 */
class WidefieldPsfTest extends TwoWorkers {

    private static final DiffractionPsf MODEL = new DiffractionPsf(DiffractionPsf.Kind.WIDEFIELD);

    @ParameterizedTest(name = "NA {0}, n {1}, {2} nm")
    @CsvSource({"1.4, 1.518, 520", "0.5, 1.0, 600", "1.2, 1.333, 450"})
    void inFocusProfileIsTheAiryPattern(double na, double n, double lambda) {
        double unit = lambda * 1e-3 / na;
        double pixel = unit / 40;
        PsfSettings s = PsfSettings.matched(na, lambda, n, new VoxelSize(pixel, pixel, 0.1), 61, 61, 1);
        double[] radial = MODEL.radialProfile(s, 0, workers);
        double dr = MODEL.radialSpacing(s);
        // Born & Wolf sec. 8.5.2: first dark ring at 0.6098 lambda/NA (within 2 %)
        double ring = ReferenceValues.get("airy_first_zero");
        assertEquals(ring, Profiles.firstMinimum(radial) * dr / unit, 0.02 * ring, "first dark ring / (lambda/NA)");
        // lateral FWHM 0.5145 lambda/NA (within 3 %), from the radial profile ...
        double fwhm = ReferenceValues.get("airy_fwhm");
        assertEquals(fwhm, 2 * Profiles.halfMaximumFromStart(radial) * dr / unit, 0.03 * fwhm, "FWHM / (lambda/NA)");
        // ... and from the sampled, pixel-integrated volume
        Volume v = MODEL.compute(s, workers);
        assertEquals(fwhm, 2 * Profiles.halfMaximumFromStart(Profiles.fromCentreX(v)) * pixel / unit, 0.03 * fwhm,
                "FWHM of the volume / (lambda/NA)");
    }

    @ParameterizedTest(name = "NA {0}, n {1}")
    @CsvSource({"0.3, 1.0", "0.3, 1.518"})
    void axialProfileAtLowNaFollowsTheParaxialFormula(double na, double n) {
        double lambda = 520;
        double unit = n * lambda * 1e-3 / (na * na);
        PsfSettings s = PsfSettings.matched(na, lambda, n, new VoxelSize(0.1, 0.1, 0.1), 1, 1, 1);
        int count = 4000;
        double dz = 1.5 * unit / count * 2;
        double[] z = new double[count];
        for (int i = 0; i < count; i++) {
            z[i] = i * dz;
        }
        double[] axial = MODEL.axialIntensity(s, z, workers);
        // Born & Wolf sec. 8.8: first axial zero at 2 n lambda / NA^2 (within 3 %)
        double zero = ReferenceValues.get("axial_first_zero");
        assertEquals(zero, Profiles.firstMinimum(axial) * dz / unit, 0.03 * zero, "first axial zero / (n lambda/NA^2)");
        // axial FWHM 1.7718 n lambda / NA^2 (within 5 %)
        double fwhm = ReferenceValues.get("axial_fwhm");
        assertEquals(fwhm, 2 * Profiles.halfMaximumFromStart(axial) * dz / unit, 0.05 * fwhm, "axial FWHM / (n lambda/NA^2)");
    }
}
