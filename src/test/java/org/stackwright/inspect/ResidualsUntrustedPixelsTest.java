package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.model.PoissonGaussianNoise;
import org.stackwright.op.InputChecks;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Specimen;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * NaN data pixels in {@code residuals} are untrusted: they get the prediction, so by the definition of the
 * normalised residual r = (y - mu) / sd their residual is 0 (up to float rounding of y), and every other voxel's
 * residual is exactly what it is without them (the prediction does not depend on the data).
 */
class ResidualsUntrustedPixelsTest {

    @Test
    void untrustedPixelsCarryNoResidualAndLeaveTheOthersAlone() {
        VoxelSize voxel = new VoxelSize(0.08, 0.08, 0.2);
        Volume truth = Specimen.draw(24, 20, 7, voxel, Specimen.Contents.cellField(), 3);
        Volume psf = GaussianPsf.sampled(0.11, 0.45, voxel, 7, 7, 5);
        ResidualModel model = new ResidualModel(100, 10, new PoissonGaussianNoise(1, 2));
        try (Workers w = new Workers(1)) {
            Volume mean = ForwardBlur.blur(truth, psf, w);
            float[] m = mean.data();
            for (int i = 0; i < m.length; i++) {
                m[i] = Math.max(0, m[i]) + 10;
            }
            Volume data = new Camera(1, 100, 2, 65535).record(mean, 5);
            Volume damaged = data.copy();
            int[] bad = {0, 517, 1999};
            for (int i : bad) {
                damaged.data()[i] = i == 517 ? Float.POSITIVE_INFINITY : Float.NaN;
            }
            InputChecks.Scan scan = InputChecks.scan(damaged);
            assertEquals(bad.length, scan.nonFinite());
            Volume unit = ResidualMaps.normalise(psf);
            Volume filled = ResidualsOperation.predictionWhereUntrusted(damaged, truth, unit, model,
                    scan.nonFiniteMask(), w, org.stackwright.fft.FftEngines.standard());
            ResidualMaps withFill = ResidualMaps.compute(filled, truth, unit, model, w);
            ResidualMaps whole = ResidualMaps.compute(data, truth, unit, model, w);
            float[] a = withFill.normalised().data();
            float[] b = whole.normalised().data();
            for (int i = 0; i < a.length; i++) {
                if (scan.nonFiniteMask()[i] != 0) {
                    assertTrue(Math.abs(a[i]) < 1e-4, "residual at untrusted voxel " + i + ": " + a[i]);
                } else {
                    assertEquals(Float.floatToRawIntBits(b[i]), Float.floatToRawIntBits(a[i]), "voxel " + i);
                }
            }
            assertTrue(data.countNonFinite() == 0 && damaged.countNonFinite() == bad.length, "inputs not modified");
        }
    }
}
