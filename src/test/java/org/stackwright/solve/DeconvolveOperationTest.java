package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;
import org.stackwright.simulate.Camera;
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

    @Test
    void badSettingsAreRefusedWithTheirName() {
        Path[] f = files();
        String[][] cases = {
            {"--method", "blind", "method"},
            {"--stop", "never", "stop"},
            {"--background", "dark", "background"},
            {"--iterations", "0", "iterations"},
            {"--boundary", "mirror", "boundary"},
        };
        for (String[] c : cases) {
            ByteArrayOutputStream err = new ByteArrayOutputStream();
            int code = cli(err, "deconvolve", "--input", f[0].toString(), "--psf", f[1].toString(), "--output",
                    dir.resolve("x.tif").toString(), c[0], c[1]);
            assertEquals(Main.BAD_INPUT, code, String.join(" ", c));
            assertTrue(err.toString(StandardCharsets.UTF_8).contains(c[2]), err.toString(StandardCharsets.UTF_8));
        }
    }

    @Test
    void psfIsCheckedPaddedResampledAndNormalised() {
        VoxelSize v = new VoxelSize(0.1, 0.1, 0.25);
        Volume nan = Volume.zeros(5, 5, 3, v);
        nan.set(2, 2, 1, Float.NaN);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> PsfCheck.prepare(nan, v, 5, m -> { }));
        assertTrue(e.getMessage().startsWith("psf"), e.getMessage());
        Volume zero = Volume.zeros(5, 5, 3, v);
        assertThrows(IllegalArgumentException.class, () -> PsfCheck.prepare(zero, v, 5, m -> { }));
        List<String> notes = new ArrayList<>();
        Volume even = Volume.zeros(4, 5, 3, v);
        even.set(2, 2, 1, 3f);
        even.set(0, 0, 0, -0.01f);
        Volume p = PsfCheck.prepare(even, v, 5, notes::add);
        assertEquals(5, p.width());
        assertEquals(1.0, p.sum(), 1e-6);
        assertEquals(p.max(), p.get(2, 2, 1));
        assertEquals(2, notes.size(), notes.toString());
        notes.clear();
        Volume fine = org.stackwright.psf.GaussianPsf.sampled(0.2, 0.5, new VoxelSize(0.05, 0.05, 0.125), 21, 21, 17);
        Volume r = PsfCheck.prepare(fine, v, 5, notes::add);
        assertTrue(r.voxel().sameAs(v));
        assertEquals(11, r.width());
        assertEquals(9, r.depth());
        assertEquals(r.max(), r.get(5, 5, 4));
        assertTrue(notes.get(0).contains("resampled"), notes.toString());
    }

    @Test
    void tooLittleMemoryIsRefusedWithNeedAndAvailable() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> MemoryCheck.require(Long.MAX_VALUE / 2, "the image 2000x2000x500"));
        assertTrue(e.getMessage().contains("2000x2000x500") && e.getMessage().contains("needs about")
                && e.getMessage().contains("free"), e.getMessage());
    }
}
