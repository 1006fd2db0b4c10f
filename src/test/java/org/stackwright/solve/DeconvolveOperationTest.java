package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** The {@code deconvolve} command end to end, the run record, and the messages for bad input. */
class DeconvolveOperationTest {

    @TempDir
    Path dir;

    private int cli(ByteArrayOutputStream err, String... args) {
        return Main.run(args, new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
    }

    private Path[] files() {
        Simulation.Outcome sim = TestSpecimens.cells(32, 30, 10, 1, 10, new Camera(1, 100, 2, 65535), 51);
        Path in = dir.resolve("in.tif");
        Path psf = dir.resolve("psf.tif");
        TiffFiles.write(sim.data(), in, true);
        TiffFiles.write(TestSpecimens.psf(), psf, true);
        return new Path[] {in, psf};
    }

    @Test
    void everyMethodRunsFromTheCommandLineAndWritesARecord() throws Exception {
        Path[] f = files();
        for (String method : DeconvolutionSettings.METHODS) {
            Path out = dir.resolve(method + ".tif");
            Path rec = dir.resolve(method + ".json");
            ByteArrayOutputStream err = new ByteArrayOutputStream();
            int code = cli(err, "deconvolve", "--input", f[0].toString(), "--psf", f[1].toString(), "--output",
                    out.toString(), "--method", method, "--iterations", "5", "--stop", "fixed", "--offset", "100",
                    "--read-noise", "2", "--background", "10", "--record", rec.toString(), "--threads", "2");
            assertEquals(Main.OK, code, method + ": " + err);
            Volume v = TiffFiles.read(out, "out");
            assertEquals(32, v.width());
            assertEquals(10, v.depth());
            String json = Files.readString(rec);
            for (String key : List.of("\"method\"", "\"iterations\"", "\"stop_reason\"", "\"seconds\"", "\"history\"",
                    "\"peak_memory_estimate_bytes\"", "\"psf\"", "\"voxel_um\"")) {
                assertTrue(json.contains(key), method + " record lacks " + key);
            }
            assertTrue(json.contains("\"method\": \"" + method + "\""), json);
        }
    }

    /** With only the offset given, the output says which values the run found itself and how. */
    @Test
    void theDefaultsSayWhatTheyFound() {
        Path[] f = files();
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(new String[] {"deconvolve", "--input", f[0].toString(), "--psf", f[1].toString(), "--output",
            dir.resolve("defaults.tif").toString(), "--offset", "100", "--threads", "2"},
                new PrintStream(out, true, StandardCharsets.UTF_8), new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(Main.OK, code, err.toString());
        String text = out.toString(StandardCharsets.UTF_8);
        assertTrue(text.contains("values used: gain ") && text.contains("ADU/e- (image)")
                && text.contains("offset 100.0 ADU (given)") && text.contains("(estimated: background auto)"), text);
        assertTrue(text.contains("stopped by auto: "), text);
    }

    /**
     * {@code --replicas 4 --spread-output sd.tif} writes the spread map with the data's size and calibration, and
     * the record says how many replicas and the median spreads; without replicas a spread output is refused.
     */
    @Test
    void replicasWriteASpreadMapWithTheDataCalibration() throws Exception {
        Path[] f = files();
        Path sd = dir.resolve("sd.tif");
        Path rec = dir.resolve("sd.json");
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = cli(err, "deconvolve", "--input", f[0].toString(), "--psf", f[1].toString(), "--output",
                dir.resolve("est.tif").toString(), "--iterations", "3", "--offset", "100", "--read-noise", "2",
                "--replicas", "4", "--spread-output", sd.toString(), "--record", rec.toString());
        assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
        Volume in = TiffFiles.read(f[0], "in");
        Volume spread = TiffFiles.read(sd, "sd");
        assertTrue(spread.sameShape(in), spread.shape());
        assertEquals(in.voxel(), spread.voxel());
        assertTrue(spread.max() > 0, "spread is not all zero");
        String json = Files.readString(rec);
        for (String key : List.of("\"replicas\": 4", "\"spread_median\"", "\"spread_relative_median\"")) {
            assertTrue(json.contains(key), "record lacks " + key + ": " + json);
        }
        ByteArrayOutputStream err2 = new ByteArrayOutputStream();
        int refused = cli(err2, "deconvolve", "--input", f[0].toString(), "--psf", f[1].toString(), "--output",
                dir.resolve("est2.tif").toString(), "--spread-output", dir.resolve("sd2.tif").toString());
        assertEquals(Main.BAD_INPUT, refused);
        assertTrue(err2.toString(StandardCharsets.UTF_8).contains("replicas"), err2.toString(StandardCharsets.UTF_8));
    }

    @Test
    void badSettingsAreRefusedWithTheirName() {
        Path[] f = files();
        String[][] cases = {
            {"--method", "blind", "method"},
            {"--stop", "never", "stop"},
            {"--background", "dark", "background"},
            {"--iterations", "0", "iterations"},
            {"--boundary", "mirror", "boundary"},
            {"--replicas", "1", "replicas"},
            {"--replicas", "101", "replicas"},
        };
        for (String[] c : cases) {
            ByteArrayOutputStream err = new ByteArrayOutputStream();
            int code = cli(err, "deconvolve", "--input", f[0].toString(), "--psf", f[1].toString(), "--output",
                    dir.resolve("x.tif").toString(), c[0], c[1]);
            assertEquals(Main.BAD_INPUT, code, String.join(" ", c));
            assertTrue(err.toString(StandardCharsets.UTF_8).contains(c[2]), err.toString(StandardCharsets.UTF_8));
        }
    }

    /**
     * The PSF goes through the shared {@code psf.PsfChecks} (refusals are rows of {@code cli.DeconvolveBadInputTest});
     * here: a PSF at a finer voxel size is resampled to the image's, keeps its peak on the centre voxel, and the
     * change is named in the run record.
     */
    @Test
    void psfAtAnotherVoxelSizeIsResampledAndRecorded() {
        VoxelSize v = new VoxelSize(0.1, 0.1, 0.25);
        Volume data = Volume.zeros(24, 24, 12, v);
        java.util.Arrays.fill(data.data(), 5f);
        data.set(12, 12, 6, 200f);
        Volume fine = org.stackwright.psf.GaussianPsf.sampled(0.2, 0.5, new VoxelSize(0.05, 0.05, 0.125), 21, 21, 17);
        org.stackwright.op.RunContext ctx = org.stackwright.op.RunContext.quiet(1);
        Deconvolution.Outcome o = Deconvolution.run(data, fine, "fine.tif", null,
                DeconvolutionSettings.richardsonLucy(new Stopping(StopRule.FIXED, 2, 1e-3), false), ctx,
                IterationListener.NONE);
        @SuppressWarnings("unchecked")
        java.util.Map<String, Object> psf = (java.util.Map<String, Object>) o.record().get("psf");
        assertEquals("11x11x9", psf.get("shape_used"));
        List<?> changes = (List<?>) psf.get("changes");
        assertTrue(changes.size() == 1 && changes.get(0).toString().contains("resampled"), changes.toString());
        assertTrue(ctx.warnings().get(0).contains("resampled"), ctx.warnings().toString());
    }

    /**
     * With the optics given, an undersampled stack gets the Nyquist warning on stderr and in the run record. Test
     * stack: 0.1 um pixels, 0.25 um steps; NA 1.4 at 400 nm in oil (1.518) allows at most 400 / (4 x 1.4) = 71.4 nm
     * pixels (common practice: the sampling theorem at the widefield OTF cut-off 2 NA / lambda).
     */
    @Test
    void undersamplingIsWarnedAndRecorded() throws Exception {
        Path[] f = files();
        Path rec = dir.resolve("optics.json");
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = cli(err, "deconvolve", "--input", f[0].toString(), "--psf", f[1].toString(), "--output",
                dir.resolve("optics.tif").toString(), "--iterations", "2", "--stop", "fixed", "--offset", "100",
                "--na", "1.4", "--wavelength", "400", "--immersion-index", "1.518", "--record", rec.toString());
        assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
        String warning = "the pixel size 0.1 um is larger than the Nyquist limit 0.07143 um for NA 1.4 at 400 nm";
        assertTrue(err.toString(StandardCharsets.UTF_8).contains(warning), err.toString(StandardCharsets.UTF_8));
        assertTrue(Files.readString(rec).contains(warning), Files.readString(rec));
    }
}
