package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/** The three repair operations through the command line on the bundled demo, and their refusals. */
class RepairCommandLineTest {

    @TempDir
    Path dir;

    final ByteArrayOutputStream out = new ByteArrayOutputStream();
    final ByteArrayOutputStream err = new ByteArrayOutputStream();

    int run(String... args) {
        out.reset();
        err.reset();
        return Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8), new PrintStream(err, true, StandardCharsets.UTF_8));
    }

    static Path demo(String name) {
        return Path.of(System.getProperty("stackwright.project.dir", "."), "test-images", name);
    }

    @Test
    void findSeamsAndInpaintTheDemo() throws Exception {
        Path defects = dir.resolve("defects.tif");
        assertEquals(Main.OK, run("find-defects", "--input", demo("demo-tiles.tif").toString(), "--output",
                defects.toString(), "--record", dir.resolve("defects.json").toString()), err.toString());
        assertTrue(Files.readString(dir.resolve("defects.json")).contains("\"hot\""));
        Path seams = dir.resolve("seams.tif");
        assertEquals(Main.OK, run("seam-mask", "--grid", "3x4", "--tile", "128x128", "--overlap", "0", "--seam-width",
                "4", "--output", seams.toString()), err.toString());
        Path found = dir.resolve("found.tif");
        assertEquals(Main.OK, run("seam-mask", "--detect", "--input", demo("demo-tiles.tif").toString(), "--output",
                found.toString()), err.toString());
        assertArrayEquals(TiffFiles.read(seams, "t").data(), TiffFiles.read(found, "t").data());
        Volume damage = TiffFiles.read(demo("demo-tiles-damage.tif"), "t");
        for (String method : new String[] {"harmonic", "biharmonic", "total-variation", "median"}) {
            Path fixed = dir.resolve(method + ".tif");
            Path filled = dir.resolve(method + "-filled.tif");
            assertEquals(Main.OK, run("inpaint", "--input", demo("demo-tiles.tif").toString(), "--mask",
                    demo("demo-tiles-damage.tif").toString(), "--method", method, "--output", fixed.toString(),
                    "--filled-output", filled.toString(), "--threads", "2", "--iterations",
                    method.equals("total-variation") ? "300" : "20000"), err.toString());
            assertTrue(out.toString().contains("estimates"), out.toString());
            Volume in = TiffFiles.read(demo("demo-tiles.tif"), "t");
            Volume res = TiffFiles.read(fixed, "t");
            Volume fm = TiffFiles.read(filled, "t");
            for (int i = 0; i < in.size(); i++) {
                boolean masked = damage.data()[i] != 0;
                assertEquals(masked ? 255f : 0f, fm.data()[i], "filled mask at " + i);
                if (!masked && Float.floatToRawIntBits(in.data()[i]) != Float.floatToRawIntBits(res.data()[i])) {
                    fail(method + ": trusted pixel " + i + " changed");
                }
            }
        }
    }

    /**
     * A trimmed mosaic (made outside the project: {@code tools/reference/make_mosaics.py}, draw a-steps-trimmed-1, its
     * first tiles partial) is read as trimmed and the run says so, in words and in the record; the demo mosaic, whole
     * tiles from the first pixel, is not.
     */
    @Test
    void aTrimmedMosaicIsReportedAsRead() throws Exception {
        Path trimmed = Path.of(RepairCommandLineTest.class.getResource("/reference/mosaics/a-steps-trimmed-1.tif")
                .toURI());
        Path record = dir.resolve("trimmed.json");
        assertEquals(Main.OK, run("seam-mask", "--detect", "--input", trimmed.toString(), "--output",
                dir.resolve("trimmed-seams.tif").toString(), "--record", record.toString()), err.toString());
        assertTrue(Files.readString(record).replaceAll("\\s", "").contains("\"read_as_trimmed\":true"),
                Files.readString(record));
        assertTrue(out.toString().contains("read as a trimmed mosaic"), out.toString());
        // the truth of the draw (make_mosaics.py, truth.txt): first seams at x = 92, y = 82, steps 100 x 90
        assertTrue(Files.readString(record).replaceAll("\\s", "").contains("\"origin_x\":92,\"origin_y\":82"),
                Files.readString(record));
        Path whole = dir.resolve("whole.json");
        assertEquals(Main.OK, run("seam-mask", "--detect", "--input", demo("demo-tiles.tif").toString(), "--output",
                dir.resolve("whole-seams.tif").toString(), "--record", whole.toString()), err.toString());
        assertTrue(Files.readString(whole).replaceAll("\\s", "").contains("\"read_as_trimmed\":false"),
                Files.readString(whole));
        // the demo mosaic's tiles start at pixel 0 (3 x 4 tiles of 128 px over 512 x 384: test-images/README.md)
        assertTrue(Files.readString(whole).replaceAll("\\s", "").contains("\"origin_x\":0,\"origin_y\":0"),
                Files.readString(whole));
    }

    @Test
    void refusalsNameTheSetting() throws Exception {
        Path all = dir.resolve("all.tif");
        Volume ones = Volume.zeros(16, 12, 1, org.stackwright.volume.VoxelSize.UNIT);
        java.util.Arrays.fill(ones.data(), 255);
        TiffFiles.write(ones, all, false);
        Path img = dir.resolve("img.tif");
        TiffFiles.write(Volume.zeros(16, 12, 1, org.stackwright.volume.VoxelSize.UNIT), img, false);
        assertEquals(Main.BAD_INPUT, run("inpaint", "--input", img.toString(), "--mask", all.toString(),
                "--output", dir.resolve("o.tif").toString()));
        assertTrue(err.toString().contains("mask marks all 192 pixels as untrusted"), err.toString());
        assertEquals(Main.BAD_INPUT, run("inpaint", "--input", img.toString(), "--mask", all.toString(),
                "--method", "smear", "--output", dir.resolve("o.tif").toString()));
        assertTrue(err.toString().contains("method = 'smear'"), err.toString());
        assertEquals(Main.BAD_INPUT, run("seam-mask", "--grid", "3x4", "--tile", "128x128", "--overlap", "200",
                "--output", dir.resolve("s.tif").toString()));
        assertTrue(err.toString().contains("overlap"), err.toString());
        assertEquals(Main.BAD_INPUT, run("seam-mask", "--detect", "--output", dir.resolve("s.tif").toString()));
        assertTrue(err.toString().contains("input is required"), err.toString());
        assertEquals(Main.BAD_INPUT, run("find-defects", "--input", img.toString(), "--dark",
                demo("demo-tiles.tif").toString(), "--output", dir.resolve("d.tif").toString()));
        assertTrue(err.toString().contains("dark frames are 512x384"), err.toString());
    }
}
