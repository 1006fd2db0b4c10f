package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The {@code demo} command on the bundled invented stack: it writes its files and checks its own result with the
 * run's own residuals. The demo deconvolves with the PSF and the camera model the stack was simulated with, so the
 * residuals must be noise over the whole image, border band included (the extended-grid estimate holds the light
 * from beyond the edges): chi^2 per voxel near 1 in both (a correct model gives an expected value of 1 per voxel;
 * the band of 0.9 to 1.1 is common practice for a few hundred thousand voxels with a fitted estimate) and the
 * verdict "fits".
 */
class DemoTest {

    @TempDir
    Path dir;

    @Test
    void demoWritesItsFilesAndItsResultFitsTheData() {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(new String[] {"demo", "--output-dir", dir.toString()},
                new PrintStream(out, true, StandardCharsets.UTF_8), new PrintStream(err, true, StandardCharsets.UTF_8));
        String text = out.toString(StandardCharsets.UTF_8);
        assertEquals(Main.OK, code, text + err.toString(StandardCharsets.UTF_8));
        for (String f : new String[] {"demo-cells-deconvolved.tif", "demo-cells-run.json", "demo-side-by-side.png",
            "demo-convergence.png", "demo-residuals.png"}) {
            assertTrue(Files.isRegularFile(dir.resolve(f)), f + " missing; output:\n" + text);
        }
        Matcher m = Pattern.compile("chi\\^2 per pixel ([0-9.]+) over the whole image .*, border band ([0-9.]+);"
                + " verdict: (\\S+)").matcher(text);
        assertTrue(m.find(), text);
        double chi2 = Double.parseDouble(m.group(1));
        double band = Double.parseDouble(m.group(2));
        assertTrue(chi2 > 0.9 && chi2 < 1.1, "chi^2 per voxel " + chi2);
        assertTrue(band > 0.9 && band < 1.1, "chi^2 per voxel in the border band " + band);
        assertEquals("fits", m.group(3), text);
    }
}
