package org.stackwright.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

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

/** The psf, psf-from-beads and measure-psf operations through the command line, with the keys of the issue. */
class PsfOperationsTest {

    @TempDir
    Path dir;

    private String[] run(String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        return new String[] {Integer.toString(code), out.toString(StandardCharsets.UTF_8),
            err.toString(StandardCharsets.UTF_8)};
    }

    @Test
    void modelsMeasuresAndRecordsAPsf() throws Exception {
        Path psf = dir.resolve("psf.tif");
        Path record = dir.resolve("psf.json");
        String[] r = run("psf", "--model", "gibson-lanni", "--na", "1.3", "--wavelength", "520", "--immersion-index",
                "1.518", "--sample-index", "1.33", "--depth", "10", "--pixel", "0.065", "--step", "0.16", "--size",
                "33x33x31", "--output", psf.toString(), "--record", record.toString(), "--threads", "2");
        assertEquals("0", r[0], r[2]);
        Volume v = TiffFiles.read(psf, "psf");
        assertEquals("33x33x31", v.shape());
        assertEquals(0.065, v.voxel().x(), 1e-6);
        assertEquals(1.0, v.sum(), 1e-4);
        assertTrue(r[1].contains("intensity maximum"), r[1]);
        String json = Files.readString(record);
        assertTrue(json.contains("\"focal_offset_um\""), json);
        assertTrue(json.contains("idealised"), json);

        String[] m = run("measure-psf", "--input", psf.toString());
        assertEquals("0", m[0], m[2]);
        assertTrue(m[1].startsWith("FWHM x 0.2"), m[1]);
    }

    @Test
    void aOnePlanePsfSaysItsAxialWidthIsNotMeasured() {
        // "FWHM z NaN um" was printed for --size 13x13x1
        String[] r = run("psf", "--model", "gaussian", "--na", "1.2", "--wavelength", "520", "--immersion-index",
                "1.33", "--pixel", "0.1", "--step", "0.3", "--size", "13x13x1", "--output",
                dir.resolve("plane.tif").toString());
        assertEquals("0", r[0], r[2]);
        assertTrue(r[1].contains("FWHM x 0.2252 um, y 0.2252 um, z not measured"), r[1]);
        assertTrue(!r[1].contains("NaN"), r[1]);
    }

    @Test
    void warnsWhenTheGridUndersamplesTheOptics() {
        String[] r = run("psf", "--model", "widefield", "--na", "1.4", "--wavelength", "520", "--immersion-index",
                "1.518", "--pixel", "0.15", "--step", "0.2", "--size", "15x15x9", "--output",
                dir.resolve("coarse.tif").toString());
        assertEquals("0", r[0], r[2]);
        assertTrue(r[2].contains("warning: the pixel size 0.15 um is larger than the Nyquist limit"), r[2]);
    }

    @Test
    void refusesImpossibleOpticsNamingTheOption() {
        String[] r = run("psf", "--model", "widefield", "--na", "1.6", "--wavelength", "520", "--immersion-index",
                "1.518", "--pixel", "0.1", "--step", "0.2", "--size", "15x15x9", "--output",
                dir.resolve("bad.tif").toString());
        assertEquals(Integer.toString(Main.BAD_INPUT), r[0]);
        assertTrue(r[2].contains("na = 1.6 must be smaller than immersion-index = 1.518"), r[2]);
        String[] even = run("psf", "--model", "confocal", "--na", "1.2", "--wavelength", "520", "--immersion-index",
                "1.33", "--pixel", "0.1", "--step", "0.2", "--size", "16x15x9", "--output",
                dir.resolve("even.tif").toString());
        assertEquals(Integer.toString(Main.BAD_INPUT), even[0]);
        assertTrue(even[2].contains("size = 16x15x9"), even[2]);
        assertTrue(Files.notExists(dir.resolve("bad.tif")) && Files.notExists(dir.resolve("even.tif")));
    }

    @Test
    void measuresAPsfFromSimulatedBeads() throws Exception {
        Path beads = dir.resolve("beads.tif");
        String[] s = run("simulate", "--specimen", "beads", "--beads", "12", "--size", "128x128x40", "--pixel", "0.08",
                "--step", "0.2", "--na", "1.2", "--wavelength", "520", "--immersion-index", "1.33", "--brightness",
                "50", "--output", beads.toString(), "--seed", "3");
        assertEquals("0", s[0], s[2]);
        Path out = dir.resolve("measured.tif");
        String[] r = run("psf-from-beads", "--input", beads.toString(), "--size", "15x15x15", "--output",
                out.toString(), "--na", "1.2", "--wavelength", "520", "--immersion-index", "1.33");
        assertEquals("0", r[0], r[2]);
        assertTrue(r[1].contains("used "), r[1]);
        Volume psf = TiffFiles.read(out, "psf");
        assertEquals("15x15x15", psf.shape());
        assertEquals(psf.max(), psf.get(7, 7, 7), 0f);
    }
}
