package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.registry.Operations;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * Runs each macro of macros/ as a facility would, in real ImageJ on the bundled test-images, and checks what it
 * wrote: the files exist, carry the calibration of the data, and the result is closer to the known truth than
 * the data. A macro whose operations are not in this build is skipped with the names of the missing ones.
 */
class MacrosTest {

    @TempDir
    Path out;

    @BeforeAll
    static void start() throws Exception {
        ImageJHarness.start();
    }

    @AfterEach
    void close() {
        ImageJHarness.closeAll();
    }

    private static void assumeOperations(String... names) {
        List<String> missing = java.util.Arrays.stream(names).filter(n -> Operations.byName(n).isEmpty()).toList();
        Assumptions.assumeTrue(missing.isEmpty(), "macro needs operations not in this build yet: " + missing);
    }

    private static String run(String macro, String arg) throws Exception {
        String code = Files.readString(ImageJHarness.projectDir().resolve("macros").resolve(macro));
        return ImageJHarness.runMacro(code, arg);
    }

    private static Path images() {
        return ImageJHarness.projectDir().resolve("test-images");
    }

    @Test
    void batchDeconvolutionOfAFolder() throws Exception {
        assumeOperations("psf", "deconvolve");
        Path in = out.resolve("in");
        Files.createDirectories(in);
        Files.copy(images().resolve("demo-cells.tif"), in.resolve("demo-cells.tif"));
        Path results = out.resolve("results");
        String err = run("batch-deconvolve-folder.ijm", "images=[" + in + "] output=[" + results + "] iterations=15");
        assertNull(err, err);
        Path result = results.resolve("demo-cells-deconvolve.tif");
        checkDeconvolved(result);
        String json = Files.readString(results.resolve("demo-cells-run.json"));
        for (String key : List.of("\"method\"", "\"iterations\"", "\"stop_reason\"", "\"seconds\"", "\"history\"")) {
            assertTrue(json.contains(key), key + " missing from the run record");
        }
        assertTrue(Files.readString(results.resolve("runs.csv")).contains("deconvolve"));
    }

    @Test
    void psfFromBeadsThenDeconvolution() throws Exception {
        assumeOperations("psf-from-beads", "measure-psf", "deconvolve");
        String err = run("psf-from-beads-then-deconvolve.ijm", "images=[" + images() + "] output=[" + out + "]");
        assertNull(err, err);
        ImagePlus psf = TiffFiles.open(out.resolve("demo-beads-psf.tif"), "psf");
        assertEquals(1, psf.getWidth() % 2, "PSF sizes are odd");
        assertEquals(1, psf.getNSlices() % 2, "PSF sizes are odd");
        assertEquals(0.08, psf.getCalibration().pixelWidth, 1e-9, "bead stack calibration");
        assertEquals(0.2, psf.getCalibration().pixelDepth, 1e-9);
        assertTrue(Files.exists(out.resolve("psf-width.csv")));
        checkDeconvolved(out.resolve("demo-cells-deconvolve.tif"));
    }

    @Test
    void repairOfATiledAcquisition() throws Exception {
        assumeOperations("seam-mask", "find-defects", "inpaint");
        String err = run("repair-tiled-acquisition.ijm", "images=[" + images() + "] output=[" + out + "]");
        assertNull(err, err);
        ImagePlus data = TiffFiles.open(images().resolve("demo-tiles.tif"), "data");
        ImagePlus repaired = TiffFiles.open(out.resolve("demo-tiles-inpaint.tif"), "repaired");
        ImagePlus mask = TiffFiles.open(out.resolve("demo-tiles-repair-mask.tif"), "mask");
        assertEquals(0.1, repaired.getCalibration().pixelWidth, 1e-9, "calibration carried");
        Volume d = ImagePlusAdapter.toVolume(data);
        Volume r = ImagePlusAdapter.toVolume(repaired);
        Volume m = ImagePlusAdapter.toVolume(mask);
        Volume truth = TiffFiles.read(images().resolve("demo-tiles-truth.tif"), "truth");
        for (int i = 0; i < d.size(); i++) {
            if (m.data()[i] == 0) {
                assertEquals(d.data()[i], r.data()[i], "trusted pixel " + i + " changed");
            }
        }
        Volume damage = TiffFiles.read(images().resolve("demo-tiles-damage.tif"), "damage");
        int planted = 0;
        int found = 0;
        for (int i = 0; i < d.size(); i++) {
            if (damage.data()[i] != 0) {
                planted++;
                found += m.data()[i] != 0 ? 1 : 0;
            }
        }
        assertTrue(found >= 0.95 * planted, "repair mask covers " + found + " of " + planted + " damaged pixels");
        double before = Fit.pearson(d.data(), truth.data());
        double after = Fit.pearson(r.data(), truth.data());
        assertTrue(after > before, "correlation with the truth: data " + before + ", repaired " + after);
    }

    /**
     * The deconvolved demo stack: calibration of the data, and closer to the invented truth than the data, both
     * measured as NRMSE after the best gain and offset (the data are in camera units with an offset).
     */
    private static void checkDeconvolved(Path result) {
        ImagePlus imp = TiffFiles.open(result, "result");
        assertEquals(0.08, imp.getCalibration().pixelWidth, 1e-9);
        assertEquals(0.2, imp.getCalibration().pixelDepth, 1e-9);
        Volume est = ImagePlusAdapter.toVolume(imp);
        Volume data = TiffFiles.read(images().resolve("demo-cells.tif"), "data");
        Volume truth = TiffFiles.read(images().resolve("demo-cells-truth.tif"), "truth");
        double before = Fit.nrmseAfterLinearFit(data.data(), truth.data());
        double after = Fit.nrmseAfterLinearFit(est.data(), truth.data());
        assertTrue(after < before, "NRMSE to the truth: data " + before + ", deconvolved " + after);
    }
}
