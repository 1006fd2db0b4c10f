package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.stackwright.model.PoissonNoise;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Specimen;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The residual view on Poisson data simulated from a known mean (10^6 voxels): the correct model must fit, and
 * each planted mismatch (PSF too narrow or too wide, background off, saturation) must be found and named.
 */
class ResidualReportTest {

    static final VoxelSize VOXEL = new VoxelSize(0.08, 0.08, 0.2);
    static final double SIGMA_XY = GaussianPsf.sigmaLateral(520, 1.0);
    static final double SIGMA_Z = GaussianPsf.sigmaAxial(520, 1.0, 1.33);
    static final double BACKGROUND = 50;

    static Workers workers;
    static Volume truth;
    static Volume psf;
    static Volume expected;
    static Volume data;

    @BeforeAll
    static void simulate() {
        workers = new Workers(2);
        // 100 x 100 x 100 = 10^6 voxels
        Specimen.Contents c = Specimen.Contents.cellField();
        truth = Specimen.draw(100, 100, 100, VOXEL, new Specimen.Contents(20, 14, 8, 4 * c.beadPhotons(),
                4 * c.filamentPhotons(), 4 * c.vesiclePhotons(), c.hazePhotons()), 7);
        psf = psf(1.0);
        expected = plusBackground(ForwardBlur.blur(truth, psf, workers), BACKGROUND);
        data = Camera.photonCounting().record(expected, 11);
    }

    @AfterAll
    static void close() {
        workers.close();
    }

    static Volume psf(double widthFactor) {
        return GaussianPsf.sampled(SIGMA_XY * widthFactor, SIGMA_Z * widthFactor, VOXEL, 15, 15, 23);
    }

    static Volume plusBackground(Volume v, double b) {
        float[] d = v.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) Math.max(0, d[i] + b);
        }
        return v;
    }

    static ResidualReport analyse(Volume y, Volume p, double background) {
        return ResidualReport.analyse(y, truth, p, new ResidualModel(0, background, new PoissonNoise()), workers);
    }

    @Test
    void correctModelFits() {
        ResidualReport r = analyse(data, psf, BACKGROUND);
        // Elementary Poisson statistics: E[(y - mu)^2 / mu] = 1 and E[y - mu] = 0 for y ~ Poisson(mu); over 10^6
        // voxels chi^2 per voxel has standard deviation about sqrt(2e-6) = 0.0014, the mean residual 0.001.
        assertEquals(1_000_000, data.size());
        double chi2 = r.maps().chi2PerVoxel();
        assertTrue(chi2 >= 0.98 && chi2 <= 1.02, "chi^2 per voxel " + chi2);
        assertEquals(0, r.maps().meanNormalised(), 0.01);
        assertEquals(Verdict.FITS, r.verdict().code(), r.verdict().text());
        assertEquals(0, r.regions().listedCount());
        // the white residual has a flat spectrum at 1 (Parseval): low/high ratio within a few percent of 1
        assertEquals(1, r.spectrum().lowFrequencyRatio(), 0.05);
    }

    @Test
    void psfTooNarrowIsNamed() {
        ResidualReport r = analyse(data, psf(0.7), BACKGROUND);
        assertTrue(r.maps().chi2PerVoxel() > 1.2, "chi^2 " + r.maps().chi2PerVoxel());
        assertEquals("psf-too-narrow", r.verdict().code(), r.verdict().text());
        assertTrue(r.verdict().text().contains("PSF"));
    }

    @Test
    void psfTooWideIsNamed() {
        ResidualReport r = analyse(data, psf(1.3), BACKGROUND);
        assertTrue(r.maps().chi2PerVoxel() > 1.1, "chi^2 " + r.maps().chi2PerVoxel());
        assertEquals("psf-too-wide", r.verdict().code(), r.verdict().text());
    }

    @Test
    void backgroundTwentyPercentHighIsNamed() {
        ResidualReport r = analyse(data, psf, 1.2 * BACKGROUND);
        assertTrue(r.maps().chi2PerVoxel() > 1.2);
        assertEquals("background-too-high", r.verdict().code(), r.verdict().text());
        assertEquals(-0.2 * BACKGROUND, r.fit().offsetShift(), 0.5);
        assertTrue(r.verdict().text().contains("background"));
    }

    @Test
    void backgroundTwentyPercentLowIsNamed() {
        ResidualReport r = analyse(data, psf, 0.8 * BACKGROUND);
        assertTrue(r.maps().chi2PerVoxel() > 1.2);
        assertEquals("background-too-low", r.verdict().code(), r.verdict().text());
        assertEquals(0.2 * BACKGROUND, r.fit().offsetShift(), 0.5);
    }

    @Test
    void saturatedRegionIsListed() {
        // a camera whose full scale sits at 70 % of the brightest expected value clips the brightest objects
        int peak = expected.argMax();
        double full = 0.7 * expected.data()[peak];
        Volume clipped = new Camera(1, 0, 0, full).record(expected, 11);
        ResidualReport r = analyse(clipped, psf, BACKGROUND);
        assertTrue(r.regions().listedCount() >= 1);
        int px = peak % 100;
        int py = (peak / 100) % 100;
        int pz = peak / 10_000;
        boolean found = r.regions().listed().stream().anyMatch(g -> g.peak() < 0 && g.x0() <= px && px <= g.x1()
                && g.y0() <= py && py <= g.y1() && g.z0() <= pz && pz <= g.z1());
        assertTrue(found, "no region with negative residual covers the brightest voxel " + px + "," + py + "," + pz);
        assertTrue(r.verdict().causes().stream().anyMatch(c -> c.code().equals("isolated-regions")), r.verdict().text());
        assertFalse(r.verdict().fits());
    }
}
