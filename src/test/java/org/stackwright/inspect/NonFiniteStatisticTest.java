package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

import org.junit.jupiter.api.Test;
import org.stackwright.model.PoissonNoise;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A NaN or infinite statistic is never a fit: an estimate with one voxel of 3e38 (its blur overflows float) once
 * gave chi^2 NaN and the verdict "fits". Below the operation's input checks (which refuse such an estimate), the
 * verdict itself must say that nothing can be judged.
 */
class NonFiniteStatisticTest {

    @Test
    void anOverflowingEstimateIsNotAFit() {
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.3);
        Volume psf = GaussianPsf.sampled(0.12, 0.4, voxel, 7, 7, 5);
        float[] e = new float[24 * 24 * 8];
        java.util.Arrays.fill(e, 20f);
        Volume estimate = new Volume(24, 24, 8, e, voxel);
        Volume data = estimate.copy();
        estimate.data()[24 * 24 * 4 + 24 * 12 + 12] = 3e38f;
        try (Workers w = new Workers(1)) {
            ResidualReport r = ResidualReport.analyse(data, estimate, psf, new ResidualModel(0, 0, new PoissonNoise()), w);
            assertFalse(Double.isFinite(r.maps().chi2PerVoxel()), "the blur of 3e38 overflows");
            assertEquals(Verdict.NOT_COMPUTED, r.verdict().code(), r.verdict().text());
            assertFalse(r.verdict().fits());
        }
    }
}
