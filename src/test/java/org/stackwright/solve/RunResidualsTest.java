package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.inspect.ResidualReport;
import org.stackwright.inspect.Verdict;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.PsfChecks;
import org.stackwright.testing.CommandLine;
import org.stackwright.testing.IndependentAcquisition;
import org.stackwright.testing.IndependentAcquisition.Layout;
import org.stackwright.testing.IndependentAcquisition.Optics;
import org.stackwright.testing.IndependentAcquisition.Plan;
import org.stackwright.testing.IndependentAcquisition.Sensor;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * The deconvolution's own residuals ({@code deconvolve --residuals}) on data from the independent generator: a
 * specimen that fills the stack and runs past every face, recorded by a camera (gain 2.5, offset 90, read noise 4).
 */
class RunResidualsTest {

    static IndependentAcquisition.Acquisition scene;

    @TempDir
    Path dir;

    @BeforeAll
    static void acquire() {
        scene = IndependentAcquisition.acquire(new Plan(48, 48, 24, Layout.FILLING, 1000, 20,
                new Optics(1.3, 2.2, 6, 8, 2), Sensor.camera(), 5));
    }

    static DeconvolutionSettings settings(String method, Stopping stop) {
        Sensor s = scene.plan().sensor();
        return new DeconvolutionSettings(method, stop, s.offset(), scene.backgroundAdu(), s.gain(), s.readNoise(),
                Double.NaN, "extended", true, "poisson");
    }

    /**
     * With the exact PSF and camera, run until the data fit reaches its expected value (the discrepancy principle:
     * Bertero et al., Inverse Problems 26:105004, 2010), the run's own residual is white noise of unit variance
     * everywhere, the border band included, because the extended-grid estimate holds the light from beyond the
     * faces: verdict fits, mean within 0.05 of 0, standard deviation within 0.05 of 1 (elementary: a normalised
     * residual of a correct model has mean 0 and variance 1).
     */
    @Test
    void convergedRunExplainsItsDataEverywhereBandIncluded() {
        RunContext ctx = new RunContext(2, null, null, null);
        DeconvolutionSettings s = settings("richardson-lucy", new Stopping(StopRule.NOISE, 300, 1e-3));
        Deconvolution.Outcome run = RunResiduals.deconvolve(scene.data(), scene.psf(), "psf", null, s, ctx,
                IterationListener.NONE);
        ResidualReport r = RunResiduals.analyse(scene.data(), scene.psf(), null, s, run, ctx);
        assertEquals(Verdict.FITS, r.verdict().code(), r.verdict().text());
        float[] v = r.maps().normalised().data();
        assertEquals(scene.data().size(), v.length);
        double mean = 0;
        for (float x : v) {
            mean += x / (double) v.length;
        }
        double var = 0;
        for (float x : v) {
            var += (x - mean) * (x - mean) / v.length;
        }
        assertEquals(0, mean, 0.05, "mean residual");
        assertEquals(1, Math.sqrt(var), 0.05, "residual standard deviation");
        assertTrue(Double.isFinite(r.chi2Band()), "the band is reported");
        assertEquals(1, r.chi2Band(), 0.1, "band chi^2");
        assertTrue(!r.region().bandExcluded() && r.region().boundary().equals("extended-grid"));
    }

    /**
     * The residual is the camera's: (y - offset - gain H x - background) / sqrt(gain (gain H x + background) +
     * read noise^2) in ADU equals, in the problem's own units, (y_e - m) / sqrt(m) with y_e = (y - offset) / gain + s,
     * m = H x + b and s = (read noise / gain)^2 (the shifted-Poisson form of Snyder, Hammoud &amp; White, JOSA A
     * 10(5), 1993). Computed here from the problem directly, on its extended grid.
     */
    @Test
    void residualInAduEqualsTheShiftedPoissonResidualOfTheProblem() {
        RunContext ctx = new RunContext(2, null, null, null);
        DeconvolutionSettings s = settings("richardson-lucy", Stopping.fixed(8));
        Deconvolution.Outcome run = RunResiduals.deconvolve(scene.data(), scene.psf(), "psf", null, s, ctx,
                IterationListener.NONE);
        ResidualReport r = RunResiduals.analyse(scene.data(), scene.psf(), null, s, run, ctx);
        Sensor sensor = scene.plan().sensor();
        Camera camera = Camera.of(sensor.gain(), sensor.offset(), sensor.readNoise());
        try (Workers w = new Workers(2)) {
            Volume p = PsfChecks.prepare("psf", scene.psf(), scene.data(), ctx);
            DeconvolutionProblem problem = new DeconvolutionProblem(scene.data(), p, null,
                    DeconvolutionProblem.Boundary.EXTENDED, camera, scene.backgroundAdu(), w);
            Solution sol = new RichardsonLucy(Stopping.fixed(8), true).solve(problem, ctx, IterationListener.NONE);
            float[] hx = new float[problem.gridLength()];
            problem.blur().apply(sol.estimate(), hx);
            float[] y = scene.data().data();
            float[] res = r.maps().normalised().data();
            int nx = problem.gridWidth();
            int ny = problem.gridHeight();
            double shift = camera.readNoiseShift();
            for (int z = 0; z < 24; z++) {
                for (int yy = 0; yy < 48; yy++) {
                    for (int x = 0; x < 48; x++) {
                        int i = (z * 48 + yy) * 48 + x;
                        double m = hx[(z * ny + yy) * nx + x] + problem.background();
                        double ye = (y[i] - camera.offset()) / camera.gain() + shift;
                        double expected = (ye - m) / Math.sqrt(m);
                        assertEquals(expected, res[i], 2e-3 * (1 + Math.abs(expected)), "voxel " + i);
                    }
                }
            }
        }
    }


    /** Every method gives its own residuals through the command line: stack, picture and record entry. */
    @Test
    void everyMethodGivesItsOwnResiduals() throws Exception {
        TiffFiles.write(scene.data(), dir.resolve("data.tif"), true);
        TiffFiles.write(scene.psf(), dir.resolve("psf.tif"), true);
        // a masked pixel: no residual, left out
        byte[] mask = new byte[48 * 48 * 24];
        mask[5000] = (byte) 255;
        TiffFiles.write(new Volume(48, 48, 24, maskFloats(mask), scene.data().voxel()), dir.resolve("mask.tif"), true);
        Sensor s = scene.plan().sensor();
        for (String[] m : new String[][] {{"richardson-lucy", "on", "poisson"}, {"richardson-lucy", "off", "poisson"},
            {"richardson-lucy-tv", "on", "poisson"}, {"total-variation", "on", "poisson"},
            {"total-variation", "on", "gaussian"}, {"wiener", "on", "poisson"}}) {
            String tag = m[0] + "-" + m[1] + "-" + m[2];
            String[] r = CommandLine.run("deconvolve", "--input", dir.resolve("data.tif").toString(), "--psf",
                    dir.resolve("psf.tif").toString(), "--method", m[0], "--acceleration", m[1], "--likelihood", m[2],
                    "--iterations", "5", "--offset", Double.toString(s.offset()), "--gain", Double.toString(s.gain()),
                    "--read-noise", Double.toString(s.readNoise()), "--background", "auto", "--mask",
                    dir.resolve("mask.tif").toString(), "--output", dir.resolve(tag + ".tif").toString(),
                    "--residuals", dir.resolve(tag + "-res.tif").toString(), "--residuals-summary",
                    dir.resolve(tag + "-res.png").toString(), "--record", dir.resolve(tag + ".json").toString(),
                    "--threads", "2");
            assertEquals("0", r[0], tag + ": " + r[2]);
            assertTrue(r[1].contains("residuals of the run's own prediction: chi^2 per pixel"), tag + ": " + r[1]);
            Volume res = TiffFiles.read(dir.resolve(tag + "-res.tif"), "residuals");
            assertEquals("48x48x24", res.shape());
            assertEquals(0f, res.data()[5000], tag + ": masked pixel");
            assertEquals(0, res.countNonFinite(), tag);
            assertTrue(Files.size(dir.resolve(tag + "-res.png")) > 10_000, tag);
            String json = Files.readString(dir.resolve(tag + ".json"));
            assertTrue(json.matches("(?s).*\"residuals\": \\{\\s*\"chi2_per_pixel\": [0-9.]+,\\s*\"verdict\": \"[a-z-]+\","
                    + "\\s*\"verdict_text\": \".*"), tag + ": " + json);
        }
    }

    private static float[] maskFloats(byte[] m) {
        float[] f = new float[m.length];
        for (int i = 0; i < m.length; i++) {
            f[i] = m[i] & 0xff;
        }
        return f;
    }

    @Test
    void gaussianLikelihoodNeedsTheReadNoiseBeforeAnyWork() {
        DeconvolutionSettings s = new DeconvolutionSettings("total-variation", Stopping.fixed(3), 0, 0, 1, 0,
                Double.NaN, "extended", true, "gaussian");
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> RunResiduals.deconvolve(scene.data(), scene.psf(), "psf", null, s,
                        new RunContext(1, null, null, null), IterationListener.NONE));
        assertTrue(e.getMessage().contains("read-noise"), e.getMessage());
    }
}
