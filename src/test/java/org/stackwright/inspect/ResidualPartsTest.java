package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;

import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;
import org.stackwright.fft.Convolution;
import org.stackwright.model.GaussianNoise;
import org.stackwright.model.PoissonNoise;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Specimen;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** The parts of the residual view on small cases: boundary of the blur, histogram, regions, slice trend, errors. */
class ResidualPartsTest {

    static final VoxelSize VOXEL = new VoxelSize(0.08, 0.08, 0.2);

    static Volume constant(int nx, int ny, int nz, float value) {
        float[] d = new float[nx * ny * nz];
        Arrays.fill(d, value);
        return new Volume(nx, ny, nz, d, VOXEL);
    }

    @Test
    void mirrorBoundaryKeepsAConstantObjectConstant() {
        // a uniform object blurred by a unit-sum PSF stays uniform everywhere (the PSF integrates to 1); the
        // mirror-padded blur must reproduce this up to the border, where a zero-boundary blur falls off
        Volume psf = GaussianPsf.sampled(0.12, 0.4, VOXEL, 11, 11, 9);
        Volume x = constant(40, 33, 12, 100f);
        try (Workers w = new Workers(2)) {
            Volume hx = ForwardBlur.blur(x, psf, w);
            for (float v : hx.data()) {
                assertEquals(100, v, 1e-3);
            }
            Volume zero = Convolution.convolve(x, psf, w);
            assertTrue(zero.get(0, 0, 0) < 30, "zero boundary corner " + zero.get(0, 0, 0));
        }
    }

    @Test
    void blurEqualsZeroBoundaryConvolutionAwayFromTheBorder() {
        Volume psf = GaussianPsf.sampled(0.12, 0.4, VOXEL, 11, 11, 9);
        Volume x = Specimen.draw(40, 36, 20, VOXEL, Specimen.Contents.cellField(), 3);
        try (Workers w = new Workers(2)) {
            Volume a = ForwardBlur.blur(x, psf, w);
            Volume b = Convolution.convolve(x, psf, w);
            // inside, further than the PSF half-width from every face, no padding value is reached
            for (int z = 4; z < 16; z++) {
                for (int y = 5; y < 31; y++) {
                    for (int xx = 5; xx < 35; xx++) {
                        assertEquals(b.get(xx, y, z), a.get(xx, y, z), 1e-3 * (1 + Math.abs(b.get(xx, y, z))));
                    }
                }
            }
        }
    }

    @Test
    void gaussianResidualHistogramMatchesStandardNormal() {
        // Pearson's chi-square goodness-of-fit test of the histogram against N(0, 1), bins with >= 5 expected;
        // reject at p = 0.001 (Pearson 1900; any statistics text). Data: y = mu + N(0, 3^2), seeded.
        int n = 200 * 200;
        float[] y = new float[n];
        Well19937c rng = new Well19937c(3);
        for (int i = 0; i < n; i++) {
            y[i] = (float) (50 + 3 * rng.nextGaussian());
        }
        Volume data = new Volume(200, 200, 1, y, VOXEL);
        Volume est = constant(200, 200, 1, 0f);
        Volume psf = constant(1, 1, 1, 1f);
        try (Workers w = new Workers(1)) {
            ResidualReport r = ResidualReport.analyse(data, est, psf, new ResidualModel(0, 50, new GaussianNoise(3)), w);
            ResidualHistogram h = r.histogram();
            double stat = 0;
            int bins = 0;
            for (int i = 0; i < h.counts().length; i++) {
                if (h.expected()[i] >= 5) {
                    double dlt = h.counts()[i] - h.expected()[i];
                    stat += dlt * dlt / h.expected()[i];
                    bins++;
                }
            }
            double limit = new ChiSquaredDistribution(bins - 1).inverseCumulativeProbability(0.999);
            assertTrue(stat < limit, "chi-square " + stat + " >= " + limit + " with " + (bins - 1) + " dof");
            assertEquals(Verdict.FITS, r.verdict().code(), r.verdict().text());
        }
    }

    @Test
    void hotPixelColumnIsListedWithItsPosition() {
        int nx = 48;
        int ny = 40;
        int nz = 10;
        Volume mean = constant(nx, ny, nz, 30f);
        Volume data = Camera.photonCounting().record(mean, 5);
        for (int z = 0; z < nz; z++) {
            data.set(17, 23, z, 400f);
        }
        try (Workers w = new Workers(1)) {
            ResidualReport r = ResidualReport.analyse(data, constant(nx, ny, nz, 0f), constant(1, 1, 1, 1f),
                    new ResidualModel(0, 30, new PoissonNoise()), w);
            assertEquals(1, r.regions().listedCount());
            ResidualRegions.Region g = r.regions().listed().get(0);
            // the column, perhaps with a neighbouring noise voxel beyond 4 sigma joined to it
            assertTrue(g.voxels() >= nz && g.voxels() <= nz + 2, "voxels " + g.voxels());
            assertEquals(17, g.x(), 0.3);
            assertEquals(23, g.y(), 0.3);
            assertTrue(g.peak() > 60);
            assertEquals("isolated-regions", r.verdict().code(), r.verdict().text());
        }
    }

    @Test
    void lowCountNoiseMakesNoRegionsButAHotPixelStillShows() {
        // Poisson mean 0.1: a count of 2 gives a Pearson residual of 6, so |r| > 4 alone would list thousands of
        // noise voxels; the deviance residual keeps them out (McCullagh & Nelder 1989, sec. 2.4.2)
        int nx = 200;
        int ny = 200;
        int nz = 10;
        Volume data = Camera.photonCounting().record(constant(nx, ny, nz, 0.1f), 8);
        data.set(50, 60, 4, 60f);
        try (Workers w = new Workers(1)) {
            ResidualReport r = ResidualReport.analyse(data, constant(nx, ny, nz, 0f), constant(1, 1, 1, 1f),
                    new ResidualModel(0, 0.1, new PoissonNoise()), w);
            assertEquals(1, r.regions().listedCount(), r.regions().listed().toString());
            ResidualRegions.Region g = r.regions().listed().get(0);
            assertEquals(50, g.x(), 0);
            assertEquals(60, g.y(), 0);
            assertEquals(4, g.z(), 0);
            // elementary Poisson statistics: chi^2 per voxel about 1 at any mean (4e5 voxels, sd about 0.01 at
            // mu = 0.1 where the variance of r^2 is 2 + 1/mu; the hot voxel adds 0.09)
            assertEquals(1.09, r.maps().chi2PerVoxel(), 0.05);
        }
    }

    @Test
    void bleachingIsNamedAsASliceTrend() {
        // the specimen fades by 40 % from the first to the last slice; the estimate is the time-averaged object
        VoxelSize v = VOXEL;
        Volume truth = Specimen.draw(64, 64, 40, v, Specimen.Contents.cellField(), 9);
        Volume psf = GaussianPsf.sampled(0.11, 0.45, v, 11, 11, 15);
        try (Workers w = new Workers(2)) {
            Volume blurred = ForwardBlur.blur(truth, psf, w);
            float[] b = blurred.data();
            int plane = 64 * 64;
            for (int i = 0; i < b.length; i++) {
                int z = i / plane;
                b[i] = (float) (Math.max(0, b[i]) * (1 - 0.4 * z / 39.0) + 20);
            }
            Volume data = Camera.photonCounting().record(blurred, 13);
            Volume est = truth.copy();
            for (int i = 0; i < est.size(); i++) {
                est.data()[i] *= 0.8f;
            }
            ResidualReport r = ResidualReport.analyse(data, est, psf, new ResidualModel(0, 20, new PoissonNoise()), w);
            assertNotNull(r.meanTrend());
            assertTrue(r.verdict().causes().stream().anyMatch(c -> c.code().equals("slice-trend")), r.verdict().text());
            // relative to the estimate (the mean over z) the signal runs from 1/0.8 = 1.25 to 0.6/0.8 = 0.75
            assertEquals(-0.5, r.fit().fading(), 0.05);
            assertEquals("slice-trend", r.verdict().code(), r.verdict().text());
        }
    }

    @Test
    void lateralDriftIsNamedAsASliceTrend() {
        // the specimen moves sideways during the acquisition, one voxel over the whole stack; the estimate is the
        // object at its start position, so the misfit grows from slice to slice
        Volume truth = Specimen.draw(64, 64, 40, VOXEL, Specimen.Contents.cellField(), 9);
        Volume psf = GaussianPsf.sampled(0.11, 0.45, VOXEL, 11, 11, 15);
        try (Workers w = new Workers(2)) {
            Volume blurred = ForwardBlur.blur(truth, psf, w);
            Volume moved = blurred.copy();
            for (int z = 0; z < 40; z++) {
                double s = 1.5 * z / 39.0;
                for (int y = 0; y < 64; y++) {
                    for (int x = 0; x < 64; x++) {
                        double sx = Math.max(0, Math.min(63, x - s));
                        int x0 = (int) Math.floor(sx);
                        int x1 = Math.min(63, x0 + 1);
                        double f = sx - x0;
                        moved.set(x, y, z, (float) (Math.max(0, (1 - f) * blurred.get(x0, y, z)
                                + f * blurred.get(x1, y, z)) + 20));
                    }
                }
            }
            Volume data = Camera.photonCounting().record(moved, 17);
            ResidualReport r = ResidualReport.analyse(data, truth, psf, new ResidualModel(0, 20, new PoissonNoise()), w);
            assertEquals("slice-trend", r.verdict().code(), r.verdict().text());
            assertTrue(r.chi2Trend().last() > r.chi2Trend().first());
        }
    }

    @Test
    void wrongGainIsNamedAsAWrongNoiseVariance() {
        // photon counts (gain 1) checked with gain 0.5 or 2: the model variance g mu is half or twice the true mu,
        // so chi^2 per voxel is about 2 or 0.5 (E[(y - mu)^2] = mu for Poisson counts)
        Volume data = Camera.photonCounting().record(constant(200, 200, 1, 50f), 12);
        Volume est = constant(200, 200, 1, 0f);
        Volume psf = constant(1, 1, 1, 1f);
        try (Workers w = new Workers(1)) {
            ResidualReport low = ResidualReport.analyse(data, est, psf,
                    new ResidualModel(0, 50, ResidualModel.noiseModel("poisson", 0.5, 0)), w);
            assertEquals(2, low.maps().chi2PerVoxel(), 0.05);
            assertEquals("noise-understated", low.verdict().code(), low.verdict().text());
            ResidualReport high = ResidualReport.analyse(data, est, psf,
                    new ResidualModel(0, 50, ResidualModel.noiseModel("poisson", 2, 0)), w);
            assertEquals(0.5, high.maps().chi2PerVoxel(), 0.02);
            assertEquals("noise-overstated-or-overfit", high.verdict().code(), high.verdict().text());
        }
    }

    @Test
    void sameResultForOneAndTwoThreads() {
        Volume truth = Specimen.draw(40, 36, 12, VOXEL, Specimen.Contents.cellField(), 21);
        Volume psf = GaussianPsf.sampled(0.11, 0.45, VOXEL, 9, 9, 11);
        Volume data = Camera.photonCounting().record(constant(40, 36, 12, 25f), 2);
        ResidualModel m = new ResidualModel(0, 20, new PoissonNoise());
        ResidualReport a;
        ResidualReport b;
        try (Workers w1 = new Workers(1); Workers w2 = new Workers(2)) {
            a = ResidualReport.analyse(data, truth, psf, m, w1);
            b = ResidualReport.analyse(data, truth, psf, m, w2);
        }
        org.junit.jupiter.api.Assertions.assertArrayEquals(a.maps().normalised().data(), b.maps().normalised().data());
        assertEquals(a.maps().chi2PerVoxel(), b.maps().chi2PerVoxel(), 0);
        org.junit.jupiter.api.Assertions.assertArrayEquals(a.spectrum().power(), b.spectrum().power(), 0);
        assertEquals(a.verdict().text(), b.verdict().text());
    }

    @Test
    void badInputNamesTheSetting() {
        Volume a = constant(10, 10, 1, 1f);
        Volume b = constant(11, 10, 1, 1f);
        try (Workers w = new Workers(1)) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> ResidualMaps.compute(a, b,
                    constant(1, 1, 1, 1f), new ResidualModel(0, 0, new PoissonNoise()), w));
            assertTrue(e.getMessage().contains("estimate"), e.getMessage());
            e = assertThrows(IllegalArgumentException.class, () -> ResidualMaps.compute(a, a, constant(2, 1, 1, 1f),
                    new ResidualModel(0, 0, new PoissonNoise()), w));
            assertTrue(e.getMessage().contains("psf"), e.getMessage());
        }
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> ResidualModel.noiseModel("gaussian", 1, 0));
        assertTrue(e.getMessage().contains("read-noise"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> ResidualModel.noiseModel("poisson", 1, 2));
        assertTrue(e.getMessage().contains("read-noise"), e.getMessage());
    }
}
