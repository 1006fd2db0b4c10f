package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.volume.Volume;

/**
 * The {@code demo} command as a user runs it: in a folder of their own, with nothing but the program (the demo
 * images come from inside it), twice. The demo deconvolves with the PSF and the camera model the stack was
 * simulated with, so the residuals must be noise: chi^2 per voxel in the interior near 1 (a correct model gives an
 * expected value of 1 per voxel; the band of 0.9 to 1.1 is common practice for a few hundred thousand voxels with
 * a fitted estimate) and the verdict "fits".
 */
class DemoTest {

    @TempDir
    Path dir;

    /** Runs the command line in its own JVM with the working folder given, on the test class path. */
    private static String[] runIn(Path cwd, String... args) throws Exception {
        List<String> cmd = new ArrayList<>(List.of(Paths.get(System.getProperty("java.home"), "bin", "java").toString(),
                "-Xmx1g", "-cp", System.getProperty("java.class.path"), Main.class.getName()));
        cmd.addAll(List.of(args));
        Path out = Files.createTempFile(cwd.getParent(), "demo-out", ".txt");
        Path err = Files.createTempFile(cwd.getParent(), "demo-err", ".txt");
        Process p = new ProcessBuilder(cmd).directory(cwd.toFile()).redirectOutput(out.toFile())
                .redirectError(err.toFile()).start();
        if (!p.waitFor(300, TimeUnit.SECONDS)) {
            p.destroyForcibly();
            throw new AssertionError("demo did not end within 300 s");
        }
        return new String[] {Integer.toString(p.exitValue()), Files.readString(out), Files.readString(err)};
    }

    @Test
    void demoRunsInAnyFolderAndRefusesToReplaceItsFilesWithoutOverwrite() throws Exception {
        Path cwd = Files.createDirectories(dir.resolve("somewhere"));
        String[] r = runIn(cwd, "demo");
        String text = r[1];
        assertEquals("0", r[0], text + r[2]);
        assertTrue(text.contains("demo images: the images inside stackwright.jar"), text);
        for (String f : DemoCommand.FILES) {
            assertTrue(Files.isRegularFile(cwd.resolve("demo-output").resolve(f)), f + " missing; output:\n" + text);
        }
        assertTrue(r[2].contains("[100%] done"), "progress reaches 100 %:\n" + r[2]);
        Matcher m = Pattern.compile("in the interior ([0-9.]+); verdict: (\\S+)").matcher(text);
        assertTrue(m.find(), text);
        double chi2 = Double.parseDouble(m.group(1));
        assertTrue(chi2 > 0.9 && chi2 < 1.1, "chi^2 per voxel " + chi2);
        assertEquals("fits", m.group(2), text);
        assertTrue(text.matches("(?s).*background: [0-9.]+ ADU above the offset \\(estimated.*"), text);

        Path result = cwd.resolve("demo-output").resolve(DemoCommand.FILES.get(0));
        byte[] before = Files.readAllBytes(result);
        String[] again = runIn(cwd, "demo");
        assertEquals(Integer.toString(Main.BAD_INPUT), again[0], again[1] + again[2]);
        assertTrue(again[2].contains("--overwrite"), again[2]);
        assertArrayEquals(before, Files.readAllBytes(result), "the refused run changed nothing");
    }

    /** The images in the jar are the ones in test-images/, and the truth drawn again is the committed file. */
    @Test
    void bundledImagesAreTheTestImages() {
        Path images = Paths.get(System.getProperty("stackwright.project.dir", ".")).resolve("test-images");
        DemoData.Images bundled = DemoData.bundled(2);
        DemoData.Images folder = DemoData.folder(images);
        for (Volume[] pair : new Volume[][] {{bundled.data(), folder.data()}, {bundled.psf(), folder.psf()},
            {bundled.truth(), folder.truth()}}) {
            assertEquals(pair[1].shape(), pair[0].shape());
            assertEquals(pair[1].voxel(), pair[0].voxel());
            assertArrayEquals(pair[1].data(), pair[0].data(), "bit for bit");
        }
        assertEquals(-1, mismatchWithTestImage(images), "demo-cells.tif in the jar is the file in test-images/");
    }

    private static long mismatchWithTestImage(Path images) {
        Path inJar = Paths.get(System.getProperty("stackwright.build.dir", "target"), "classes", "demo",
                "demo-cells.tif");
        try {
            return Files.mismatch(inJar, images.resolve("demo-cells.tif"));
        } catch (java.io.IOException e) {
            throw new AssertionError(e);
        }
    }
}
