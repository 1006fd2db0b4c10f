package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.stackwright.model.Camera;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * FWHM of invented Gaussian beads with known sigma: FWHM = 2 sqrt(2 ln 2) sigma = 2.3548 sigma (property of the
 * normal density; any statistics text), within 2 %.
 */
class BeadWidthsTest {

    static final VoxelSize VOXEL = new VoxelSize(0.08, 0.08, 0.2);
    static final double SIGMA_XY = 0.13; // um
    static final double SIGMA_Z = 0.45; // um
    static final double[][] CENTRES = {{20.3, 22.7, 15.2}, {52.6, 18.1, 13.8}, {35.5, 47.9, 16.45}};

    static Volume beads(int depth, double amplitude, double background) {
        Volume v = Volume.zeros(72, 64, depth, VOXEL);
        for (int z = 0; z < depth; z++) {
            for (int y = 0; y < 64; y++) {
                for (int x = 0; x < 72; x++) {
                    double s = background;
                    for (double[] c : CENTRES) {
                        double dx = (x - c[0]) * VOXEL.x() / SIGMA_XY;
                        double dy = (y - c[1]) * VOXEL.y() / SIGMA_XY;
                        double dz = depth == 1 ? 0 : (z - c[2]) * VOXEL.z() / SIGMA_Z;
                        s += amplitude * Math.exp(-0.5 * (dx * dx + dy * dy + dz * dz));
                    }
                    v.set(x, y, z, (float) s);
                }
            }
        }
        return v;
    }

    static void check(List<BeadWidths.Bead> found, boolean withZ) {
        assertEquals(CENTRES.length, found.size());
        double fxy = BeadWidths.FWHM_PER_SIGMA * SIGMA_XY;
        double fz = BeadWidths.FWHM_PER_SIGMA * SIGMA_Z;
        assertEquals(2.3548, BeadWidths.FWHM_PER_SIGMA, 1e-4);
        for (BeadWidths.Bead b : found) {
            assertEquals(fxy, b.fwhmX(), 0.02 * fxy, b.toString());
            assertEquals(fxy, b.fwhmY(), 0.02 * fxy, b.toString());
            if (withZ) {
                assertEquals(fz, b.fwhmZ(), 0.02 * fz, b.toString());
            } else {
                assertTrue(Double.isNaN(b.fwhmZ()));
            }
        }
    }

    @Test
    void noiseFreeGaussianBeads() {
        List<BeadWidths.Bead> found = new BeadWidths(8, 8, 0.3).measure(beads(32, 1000, 10));
        check(found, true);
    }

    @Test
    void noisyGaussianBeads() {
        // With Poisson noise (peak about 3000 photons) one 1D profile of 17 samples has a statistical error of a
        // few percent (our estimate, not a published bound): each bead within 5 %, the median over beads within 2 %.
        Volume mean = beads(32, 3000, 10);
        List<BeadWidths.Bead> found = new BeadWidths(8, 8, 0.3).measure(Camera.photonCounting().record(mean, 4));
        assertEquals(CENTRES.length, found.size());
        double fxy = BeadWidths.FWHM_PER_SIGMA * SIGMA_XY;
        double fz = BeadWidths.FWHM_PER_SIGMA * SIGMA_Z;
        for (BeadWidths.Bead b : found) {
            assertEquals(fxy, b.fwhmX(), 0.05 * fxy, b.toString());
            assertEquals(fxy, b.fwhmY(), 0.05 * fxy, b.toString());
            assertEquals(fz, b.fwhmZ(), 0.05 * fz, b.toString());
        }
        double[] all = found.stream().flatMapToDouble(b -> java.util.stream.DoubleStream.of(b.fwhmX(), b.fwhmY()))
                .toArray();
        assertEquals(fxy, BeadWidths.median(all), 0.02 * fxy);
        assertEquals(fz, BeadWidths.median(found.stream().mapToDouble(BeadWidths.Bead::fwhmZ).toArray()), 0.02 * fz);
    }

    @Test
    void flatImageBeads() {
        check(new BeadWidths(8, 8, 0.3).measure(beads(1, 1000, 10)), false);
    }

    @Test
    void badSettingsAreRefused() {
        assertThrows(IllegalArgumentException.class, () -> new BeadWidths(2, 8, 0.3));
        assertThrows(IllegalArgumentException.class, () -> new BeadWidths(8, 8, 1.5));
    }
}
