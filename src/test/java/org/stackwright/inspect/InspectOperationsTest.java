package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import javax.imageio.ImageIO;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.process.ImageProcessor;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;
import org.stackwright.registry.Operations;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Specimen;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** The residuals and compare operations through the command line, and the plots and summary picture headless. */
class InspectOperationsTest {

    static final VoxelSize VOXEL = new VoxelSize(0.08, 0.08, 0.2);

    @TempDir
    Path dir;

    static String[] run(String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int rc = Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        return new String[] {Integer.toString(rc), out.toString(StandardCharsets.UTF_8),
            err.toString(StandardCharsets.UTF_8)};
    }

    /** Writes a small camera acquisition (offset 100, read noise 2) of a known object, its object and PSF. */
    void writeScene() {
        Volume truth = Specimen.draw(48, 40, 16, VOXEL, Specimen.Contents.cellField(), 5);
        Volume psf = GaussianPsf.sampled(0.11, 0.45, VOXEL, 9, 9, 11);
        try (Workers w = new Workers(2)) {
            Volume mean = ForwardBlur.blur(truth, psf, w);
            float[] m = mean.data();
            for (int i = 0; i < m.length; i++) {
                m[i] = Math.max(0, m[i]) + 10;
            }
            Volume data = new Camera(1, 100, 2, 65535).record(mean, 3);
            TiffFiles.write(data, dir.resolve("data.tif"), true);
        }
        TiffFiles.write(truth, dir.resolve("est.tif"), true);
        TiffFiles.write(psf, dir.resolve("psf.tif"), true);
    }

    @Test
    void operationsAreRegistered() {
        assertTrue(Operations.byName("residuals").isPresent());
        assertTrue(Operations.byName("compare").isPresent());
    }

    @Test
    void residualsFromTheCommandLine() throws IOException {
        writeScene();
        String[] r = run("residuals", "--input", dir.resolve("data.tif").toString(), "--estimate",
                dir.resolve("est.tif").toString(), "--psf", dir.resolve("psf.tif").toString(), "--offset", "100",
                "--background", "10", "--likelihood", "poisson-gaussian", "--gain", "1", "--read-noise", "2", "--output",
                dir.resolve("res.tif").toString(), "--summary", dir.resolve("summary.png").toString(), "--record",
                dir.resolve("r.json").toString(), "--threads", "2");
        assertEquals("0", r[0], r[2]);
        assertTrue(r[1].contains("chi^2 per voxel"), r[1]);
        assertTrue(r[1].contains("verdict: fits"), r[1]);
        String json = Files.readString(dir.resolve("r.json"));
        assertTrue(json.contains("\"chi2_per_pixel\""), json);
        assertTrue(json.contains("\"verdict\": \"fits\""), json);
        assertTrue(json.contains("\"verdict_text\""), json);
        Volume res = TiffFiles.read(dir.resolve("res.tif"), "output");
        assertEquals("48x40x16", res.shape());
        assertTrue(res.voxel().sameAs(VOXEL));
        java.awt.image.BufferedImage png = ImageIO.read(dir.resolve("summary.png").toFile());
        assertTrue(png.getWidth() > 800 && png.getHeight() > 500, png.getWidth() + "x" + png.getHeight());
        // the estimate is untouched
        assertEquals(TiffFiles.read(dir.resolve("est.tif"), "estimate").sum(), Specimen.draw(48, 40, 16, VOXEL,
                Specimen.Contents.cellField(), 5).sum(), 1e-3);
    }

    @Test
    void residualsRefuseBadSettingsNamingThem() {
        writeScene();
        String[] r = run("residuals", "--input", dir.resolve("data.tif").toString(), "--estimate",
                dir.resolve("est.tif").toString(), "--psf", dir.resolve("psf.tif").toString(), "--likelihood", "gaussian",
                "--output", dir.resolve("res.tif").toString());
        assertEquals("2", r[0]);
        assertTrue(r[2].contains("read-noise"), r[2]);
        r = run("residuals", "--input", dir.resolve("data.tif").toString(), "--estimate",
                dir.resolve("psf.tif").toString(), "--psf", dir.resolve("psf.tif").toString(), "--output",
                dir.resolve("res.tif").toString());
        assertEquals("2", r[0]);
        assertTrue(r[2].contains("estimate"), r[2]);
        assertTrue(!Files.exists(dir.resolve("res.tif")));
    }

    @Test
    void compareFromTheCommandLine() {
        Path ref = dir.resolve("ref.tif");
        Path img = dir.resolve("img.tif");
        Volume a = Specimen.draw(40, 36, 1, VOXEL, Specimen.Contents.cellField(), 8);
        TiffFiles.write(a, ref, true);
        TiffFiles.write(a, img, true);
        String[] r = run("compare", "--reference", ref.toString(), "--input", img.toString(), "--data-range", "500");
        assertEquals("0", r[0], r[2]);
        assertTrue(r[1].contains("SSIM: 1.000000"), r[1]);
        assertTrue(r[1].contains("data range: 500"), r[1]);
        assertTrue(r[1].contains("Pearson correlation: 1.000000"), r[1]);
    }

    @Test
    void summaryOfATwoDimensionalImage() {
        Volume truth = Specimen.draw(60, 50, 1, VOXEL, Specimen.Contents.cellField(), 4);
        Volume psf = GaussianPsf.sampled(0.11, 0.45, VOXEL, 9, 9, 1);
        try (Workers w = new Workers(1)) {
            Volume mean = ForwardBlur.blur(truth, psf, w);
            for (int i = 0; i < mean.size(); i++) {
                mean.data()[i] = Math.max(0, mean.data()[i]) + 5;
            }
            Volume data = Camera.photonCounting().record(mean, 6);
            ResidualReport r = ResidualReport.analyse(data, truth, psf, new ResidualModel(0, 5,
                    new org.stackwright.model.PoissonNoise()), w);
            ImagePlus sum = SummaryPicture.render("flat", data, truth, r);
            assertEquals(ImagePlus.COLOR_RGB, sum.getType());
            assertTrue(sum.getProcessor().getStatistics().stdDev > 0);
            assertEquals(1, r.maps().chi2PerSlice().length);
        }
    }

    @Test
    void plotsRenderHeadless() {
        // ij.gui.Plot draws into an ImageProcessor without a display (java.awt.headless=true in the tests)
        ResidualHistogram h = ResidualHistogram.of(new float[] {-1, 0, 0.5f, 1, 2});
        List<ImageProcessor> images = List.of(InspectPlots.histogram(h).getProcessor(),
                InspectPlots.chi2PerSlice(new double[] {1.0, 1.1, 0.9}).getProcessor(),
                InspectPlots.convergence(List.of(100.0, 40.0, 12.0, 5.0, 4.5), "negative log-likelihood").getProcessor(),
                InspectPlots.convergence(List.of(3, 2, 2), "objective").getProcessor());
        for (ImageProcessor ip : images) {
            assertTrue(ip.getWidth() >= InspectPlots.WIDTH && ip.getHeight() >= InspectPlots.HEIGHT);
            assertTrue(ip.getStatistics().stdDev > 0, "plot image is blank");
        }
        Plot p = InspectPlots.convergence(List.of(1.0), "objective");
        ImagePlus imp = p.getImagePlus();
        assertEquals(1, imp.getStackSize());
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> InspectPlots.convergence(List.of(), "objective"));
        assertTrue(e.getMessage().contains("history"));
    }
}
