package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Gaussian approximation: sigma_xy = 0.21 lambda/NA (Zhang, Zerubia & Olivo-Marin, "Gaussian approximations of
 * fluorescence microscope point-spread function models", Applied Optics 46(10):1819-1829, 2007), measured as the
 * second moment of the sampled volume (the voxel integral adds pixel^2/12, taken off).
 */
class GaussianPsfTest extends TwoWorkers {

    @ParameterizedTest(name = "NA {0}, {1} nm, pixel {2} um")
    @CsvSource({"1.4, 520, 0.02", "0.75, 600, 0.05", "0.3, 450, 0.1"})
    void lateralSigmaIsZhangsValue(double na, double lambda, double pixel) {
        PsfSettings s = PsfSettings.matched(na, lambda, 1.518, new VoxelSize(pixel, pixel, 0.2), 101, 101, 5);
        Volume v = new GaussianPsf().compute(s, workers);
        double m2 = 0;
        double total = 0;
        for (int z = 0; z < v.depth(); z++) {
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    double d = (x - v.width() / 2) * pixel;
                    m2 += v.get(x, y, z) * d * d;
                    total += v.get(x, y, z);
                }
            }
        }
        double sigma = Math.sqrt(m2 / total - pixel * pixel / 12);
        double expected = 0.21 * lambda * 1e-3 / na;
        assertEquals(expected, sigma, 0.02 * expected, "sigma_xy");
    }
}
