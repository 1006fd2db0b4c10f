package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;

import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * ImageJ on a server, as README shows it: {@code java -Dplugins.dir=... -jar ij.jar -batch macros/NAME.ijm} in
 * its own process, under the virtual display the tests run in, from a folder laid out like the source tree. A run
 * must end by itself: a bundled macro without arguments finds the demo images through its relative path and
 * writes into demo-output/ of the working folder; an error (a misspelt key, an existing record without
 * overwrite, ImageJ's own macro error after a Stackwright command) ends the process with the message on stderr
 * and a non-zero exit code instead of a window that waits for a click. When Debian's imagej package (ImageJ
 * 1.53t, /usr/share/java/ij.jar) is installed, the error case runs on it too.
 */
class BatchModeTest {

    private static final long TIMEOUT_SECONDS = 240;
    private static final Path DEBIAN_IJ = Paths.get("/usr/share/java/ij.jar");

    @TempDir
    Path dir;

    private Path project;
    private Path plugins;

    @BeforeEach
    void layOut() throws IOException {
        ImageJHarness.assumeDisplay();
        plugins = ImageJHarness.pluginsFolder();
        project = Files.createDirectories(dir.resolve("project"));
        Path src = ImageJHarness.projectDir();
        Files.createDirectories(project.resolve("macros"));
        Files.createDirectories(project.resolve("test-images"));
        for (String m : List.of("batch-deconvolve-folder.ijm", "repair-tiled-acquisition.ijm")) {
            Files.copy(src.resolve("macros").resolve(m), project.resolve("macros").resolve(m));
        }
        for (String t : List.of("demo-cells.tif", "demo-beads.tif", "demo-tiles.tif")) {
            Files.copy(src.resolve("test-images").resolve(t), project.resolve("test-images").resolve(t));
        }
    }

    /** The result of one ImageJ process. */
    record Run(int code, String out, String err) {
        @Override
        public String toString() {
            return "exit " + code + "\nstdout:\n" + out + "\nstderr:\n" + err;
        }
    }

    /**
     * Runs {@code ij.ImageJ -batch macro [argument]} in the project folder.
     *
     * @param ijJar an ImageJ jar put first on the class path, or null for the one the tests use
     */
    private Run imagej(Path ijJar, String macro, String argument) throws Exception {
        List<String> cmd = new ArrayList<>(List.of(Paths.get(System.getProperty("java.home"), "bin", "java").toString(),
                "-Xmx1g", "-Djava.awt.headless=false", "-Duser.home=" + dir.resolve("home"),
                "-Dplugins.dir=" + plugins, "-cp",
                (ijJar == null ? "" : ijJar + java.io.File.pathSeparator) + System.getProperty("java.class.path"),
                "ij.ImageJ", "-batch", macro));
        if (argument != null) {
            cmd.add(argument);
        }
        Path out = dir.resolve("stdout.txt");
        Path err = dir.resolve("stderr.txt");
        Process p = new ProcessBuilder(cmd).directory(project.toFile()).redirectOutput(out.toFile())
                .redirectError(err.toFile()).start();
        if (!p.waitFor(TIMEOUT_SECONDS, TimeUnit.SECONDS)) {
            p.destroyForcibly().waitFor();
            throw new AssertionError("ImageJ -batch " + macro + " did not end within " + TIMEOUT_SECONDS
                    + " s (a window waiting for a click?)\nstdout:\n" + Files.readString(out) + "\nstderr:\n"
                    + Files.readString(err));
        }
        return new Run(p.exitValue(), Files.readString(out), Files.readString(err));
    }

    private Path macro(String name, String code) throws IOException {
        Path m = project.resolve(name);
        Files.writeString(m, code);
        return m;
    }

    @Test
    void bundledMacroRunsFromItsRelativePathWithoutArguments() throws Exception {
        Run r = imagej(null, "macros/batch-deconvolve-folder.ijm", null);
        assertEquals(0, r.code(), r.toString());
        Path out = project.resolve("demo-output").resolve("batch-deconvolve");
        assertTrue(Files.isRegularFile(out.resolve("demo-cells-deconvolve.tif")), r.toString());
        assertTrue(Files.isRegularFile(out.resolve("demo-cells-run.json")), r.toString());
        String skipped = Files.readString(out.resolve("skipped.txt"));
        assertTrue(skipped.contains("demo-beads.tif: a bead stack"), skipped);
        assertFalse(Files.exists(out.resolve("demo-beads-deconvolve.tif")), "the bead stack is not a specimen");
        try (var listing = Files.list(project.resolve("test-images"))) {
            assertTrue(listing.allMatch(Files::isRegularFile), "nothing written into the source tree's test-images/");
        }
    }

    @Test
    void repairMacroRunsFromItsRelativePathWithoutArguments() throws Exception {
        Run r = imagej(null, "macros/repair-tiled-acquisition.ijm", null);
        assertEquals(0, r.code(), r.toString());
        Path out = project.resolve("demo-output").resolve("repair-tiles");
        assertTrue(Files.isRegularFile(out.resolve("demo-tiles-inpaint.tif")), r.toString());
        assertTrue(Files.isRegularFile(out.resolve("demo-tiles-repair-mask.tif")), r.toString());
    }

    @Test
    void misspeltKeyEndsTheRunWithExitCode2() throws Exception {
        macro("typo.ijm", "run(\"Simulate Specimen...\", \"size=16x16x3 sedd=3\");\nprint(\"not reached\");\n");
        Run r = imagej(null, "typo.ijm", null);
        assertEquals(Unattended.BAD_INPUT, r.code(), r.toString());
        assertTrue(r.err().contains("unknown macro key 'sedd'"), r.toString());
        assertFalse(r.out().contains("not reached"), r.toString());
    }

    @Test
    void existingRecordWithoutOverwriteEndsTheRunWithExitCode2() throws Exception {
        Path record = Files.writeString(project.resolve("psf-run.json"), "{}");
        macro("record.ijm", "run(\"Model PSF...\", \"model=gaussian na=1 wavelength=520 immersion-index=1.33 "
                + "pixel=0.1 step=0.2 size=5x5x5 record=[" + record + "]\");\n");
        Run r = imagej(null, "record.ijm", null);
        assertEquals(Unattended.BAD_INPUT, r.code(), r.toString());
        assertTrue(r.err().contains("record") && r.err().contains("exists") && r.err().contains("overwrite"),
                r.toString());
        assertEquals("{}", Files.readString(record), "the existing record is untouched");
    }

    @Test
    void imageJsOwnMacroErrorAfterAStackwrightCommandEndsTheRun() throws Exception {
        macro("later.ijm", "run(\"Simulate Specimen...\", \"size=16x16x3\");\nx = noSuchFunction(3);\n");
        Run r = imagej(null, "later.ijm", null);
        assertEquals(Unattended.FAILED, r.code(), r.toString());
        assertTrue(r.err().contains("Macro Error") && r.err().contains("noSuchFunction"), r.toString());
    }

    /** ImageJ 1.53t from Debian's imagej package: the same unattended error, when that package is installed. */
    @Test
    void misspeltKeyEndsTheRunOnDebiansImageJ() throws Exception {
        Assumptions.assumeTrue(Files.isRegularFile(DEBIAN_IJ), "Debian's imagej package is not installed");
        macro("typo.ijm", "print(getVersion());\nrun(\"Model PSF...\", \"model=gaussian na=1 wavelength=520 "
                + "immersion-index=1.33 pixel=0.1 step=0.2 size=5x5x5\");\nprint(\"made \" + getTitle());\n"
                + "run(\"Simulate Specimen...\", \"size=16x16x3 sedd=3\");\n");
        Run r = imagej(DEBIAN_IJ, "typo.ijm", null);
        assertTrue(r.out().contains("1.53"), "ran on Debian's ImageJ: " + r);
        assertTrue(r.out().contains("made psf-gaussian-NA1-520nm"), "a command works there: " + r);
        assertEquals(Unattended.BAD_INPUT, r.code(), r.toString());
        assertTrue(r.err().contains("unknown macro key 'sedd'"), r.toString());
    }
}
