package org.stackwright.inspect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The residual view on the command line as a first user meets it: its help names a PNG for the summary, the
 * verdict alone needs no output file, and the old key {@code --noise} still works with a note naming
 * {@code --likelihood} (given together with it, it is refused).
 */
class CommandLineResidualsTest {

    @TempDir
    Path dir;

    private String[] scene() {
        InspectOperationsTest t = new InspectOperationsTest();
        t.dir = dir;
        t.writeScene();
        return new String[] {"residuals", "--input", dir.resolve("data.tif").toString(), "--estimate",
            dir.resolve("est.tif").toString(), "--psf", dir.resolve("psf.tif").toString(), "--offset", "100",
            "--background", "10", "--read-noise", "2", "--threads", "2"};
    }

    private static String[] plus(String[] a, String... more) {
        String[] out = java.util.Arrays.copyOf(a, a.length + more.length);
        System.arraycopy(more, 0, out, a.length, more.length);
        return out;
    }

    @Test
    void helpNamesAPngForTheSummary() {
        String[] r = InspectOperationsTest.run("residuals", "--help");
        assertEquals("0", r[0]);
        assertTrue(r[1].contains("--summary=FILE.png"), r[1]);
        assertTrue(r[1].contains("--output=FILE.tif"), r[1]);
        assertFalse(r[1].contains("--noise"), "old keys are not advertised: " + r[1]);
    }

    @Test
    void verdictWithoutAnyOutputFileAndTheOldNoiseKey() {
        String[] args = scene();
        String[] r = InspectOperationsTest.run(plus(args, "--noise", "poisson-gaussian"));
        assertEquals("0", r[0], r[2]);
        assertTrue(r[1].contains("verdict: fits"), r[1]);
        assertTrue(r[2].contains("note: '--noise' is the old name of '--likelihood'"), r[2]);
        try (var files = Files.list(dir)) {
            assertEquals(3, files.count(), "nothing written but the scene itself");
        } catch (java.io.IOException e) {
            throw new AssertionError(e);
        }
        String[] both = InspectOperationsTest.run(plus(args, "--noise", "poisson", "--likelihood", "poisson"));
        assertEquals("2", both[0], both[2]);
        assertTrue(both[2].contains("give only --likelihood"), both[2]);
    }
}
