package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Font;

import ij.ImagePlus;
import ij.process.ImageProcessor;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.stackwright.model.PoissonGaussianNoise;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.testing.IndependentAcquisition;
import org.stackwright.testing.IndependentAcquisition.Layout;
import org.stackwright.testing.IndependentAcquisition.Optics;
import org.stackwright.testing.IndependentAcquisition.Plan;
import org.stackwright.testing.IndependentAcquisition.Sensor;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The border band and the trusted region: the band is sized by where the PSF holds its light, every panel of the
 * summary uses the trusted region, and a region too small to judge gives {@code too-little-interior}.
 */
class ResidualBordersTest {

    static Workers workers;

    @BeforeAll
    static void start() {
        workers = new Workers(2);
    }

    @AfterAll
    static void stop() {
        workers.close();
    }

    static ResidualModel model(IndependentAcquisition.Acquisition a) {
        Sensor s = a.plan().sensor();
        return new ResidualModel(s.offset(), a.backgroundAdu(), new PoissonGaussianNoise(s.gain(), s.readNoise()));
    }

    @Test
    void bandFollowsThePsfsLightNotItsArraySize() {
        // a Gaussian of sigma 1.5 voxels holds 99 % of its marginal within 2.576 sigma = 3.9 voxels (normal quantile:
        // any table), whatever the array it sits in
        VoxelSize v = new VoxelSize(0.1, 0.1, 0.1);
        int[] small = TrustedRegion.bandOf(GaussianPsf.sampled(0.15, 0.15, v, 15, 15, 15));
        int[] large = TrustedRegion.bandOf(GaussianPsf.sampled(0.15, 0.15, v, 41, 41, 41));
        assertArrayEquals(small, large);
        assertEquals(4, small[0]);
        assertEquals(4, small[2]);
        // a PSF whose out-of-focus light fades slowly (a Lorentzian per plane) needs almost its whole depth
        int[] wide = TrustedRegion.bandOf(IndependentAcquisition.psf(new Optics(1.2, 2, 5, 10, 1)));
        assertTrue(wide[2] >= 8, "axial band " + wide[2]);
        // a 2D PSF has no axial band
        assertEquals(0, TrustedRegion.bandOf(GaussianPsf.sampled(0.15, 0.15, v, 15, 15, 1))[2]);
    }

    @Test
    void thinStackUnderADeepPsfIsTooLittleToJudge() {
        // 16 planes, PSF 21 planes deep with slowly fading out-of-focus light: the band leaves no interior
        Optics deep = new Optics(1.3, 4, 6, 10, 1);
        IndependentAcquisition.Acquisition a = IndependentAcquisition.acquire(new Plan(40, 40, 16, Layout.INSIDE,
                1000, 10, deep, Sensor.camera(), 4));
        ResidualReport r = ResidualReport.analyse(a.data(), a.truthAdu(), a.psf(), model(a), workers);
        assertEquals(Verdict.TOO_LITTLE_INTERIOR, r.verdict().code(), r.verdict().text());
        assertTrue(r.region().tooSmall());
        assertTrue(r.verdict().text().contains("deconvolve --residuals"), r.verdict().text());
        // the summary still renders (the trusted box widened to one plane for the panels)
        ImagePlus page = SummaryPicture.render("thin", a.data(), a.truthAdu(), r);
        assertTrue(page.getWidth() > 800);
        // the specimen ends inside the field: zero is its exact continuation, and the whole stack is judged
        ResidualReport zero = ResidualReport.analyse(a.data(), a.truthAdu(), a.psf(), model(a), "zero", null, workers);
        assertEquals(Verdict.FITS, zero.verdict().code(), zero.verdict().text());
        assertFalse(zero.region().bandExcluded());
    }

    @Test
    void everyPanelUsesTheTrustedRegionAndTheBandIsShaded() {
        // mirror padding invents light in the band of a specimen ending inside a thin stack: with the default
        // boundary the band is left out, and the colour scale, taken from the trusted area, is not saturated
        Optics widefield = new Optics(1.3, 2.2, 7, 10, 1);
        IndependentAcquisition.Acquisition a = IndependentAcquisition.acquire(new Plan(64, 64, 24, Layout.INSIDE,
                3000, 20, widefield, Sensor.camera(), 2));
        ResidualReport r = ResidualReport.analyse(a.data(), a.truthAdu(), a.psf(), model(a), workers);
        assertEquals(Verdict.FITS, r.verdict().code(), r.verdict().text());
        assertTrue(r.chi2Band() > 2, "the band fits worse: " + r.chi2Band());
        int[] box = r.region().box();
        // histogram, chi^2 and spectrum count exactly the trusted voxels
        assertEquals((long) box[3] * box[4] * box[5], r.histogram().total());
        assertEquals(r.histogram().total(), r.trustedMaps().trusted());
        assertEquals(box[3], r.trustedMaps().normalised().width());
        Volume res = r.maps().normalised();
        Volume extreme = SummaryPicture.extremeProjection(res, box[2], box[5]);
        Volume sum = SummaryPicture.sumProjection(res, box[2], box[5]);
        double scale = SummaryPicture.scale(new Volume[] {extreme, sum}, box);
        assertTrue(scale <= 5, "colour scale " + scale);
        Volume all = SummaryPicture.extremeProjection(res);
        double saturatedBefore = saturated(all, 5, new int[] {0, 0, 0, 64, 64, 1});
        assertTrue(saturatedBefore > 0.05, "whole-stack maps saturate: " + saturatedBefore);
        assertTrue(saturated(extreme, scale, box) < 0.01, "trusted maps saturate");
        // band pixels are shaded grey in the residual panels: their colour is a blend, never pure white
        assertEquals(0xcccccc, SummaryPicture.shade(0xffffff));
    }

    private static double saturated(Volume map, double scale, int[] box) {
        int n = 0;
        int k = 0;
        for (int y = box[1]; y < box[1] + box[4]; y++) {
            for (int x = box[0]; x < box[0] + box[3]; x++) {
                n++;
                if (Math.abs(map.get(x, y, 0)) >= scale) {
                    k++;
                }
            }
        }
        return k / (double) n;
    }

    @Test
    void titleFitsItsWidthAtAnyFileNameLength() {
        IndependentAcquisition.Acquisition a = IndependentAcquisition.acquire(new Plan(40, 40, 16, Layout.CROSSING,
                500, 10, new Optics(1.2, 1.5, 5, 6, 2), Sensor.camera(), 8));
        ResidualReport r = ResidualReport.analyse(a.data(), a.truthAdu(), a.psf(), model(a), workers);
        String name = "a-stack-with-a-very-long-name-".repeat(12) + "end.tif";
        ImagePlus page = SummaryPicture.render(name, a.data(), a.truthAdu(), r);
        ImageProcessor ip = page.getProcessor();
        // nothing is drawn in the right margin of the heading rows (14 px margin; leave 2 px for antialiasing)
        for (int y = 0; y < 60; y++) {
            for (int x = page.getWidth() - 12; x < page.getWidth(); x++) {
                assertEquals(0xffffff, ip.getPixel(x, y) & 0xffffff, "ink at " + x + "," + y);
            }
        }
        Font title = new Font("SansSerif", Font.BOLD, 17);
        String shown = SummaryPicture.fit("Residual view: " + name, title, 500);
        assertTrue(SummaryPicture.textWidth(shown, title) <= 500, shown);
        assertTrue(shown.startsWith("Residual view: a-stack") && shown.endsWith("end.tif"), shown);
        assertTrue(shown.contains("\u2026"), shown);
    }

    @Test
    void boundaryWordsAreChecked() {
        IndependentAcquisition.Acquisition a = IndependentAcquisition.acquire(new Plan(20, 20, 8, Layout.CROSSING,
                100, 5, new Optics(1.2, 1.5, 3, 3, 2), Sensor.photonCounting(), 1));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> ResidualReport.analyse(
                a.data(), a.truthAdu(), a.psf(), model(a), "wrap", null, workers));
        assertTrue(e.getMessage().contains("boundary") && e.getMessage().contains("exclude"), e.getMessage());
    }
}
