package org.stackwright.simulate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;

/**
 * {@code simulate} through the command line: the same seed gives byte-identical files (also with another thread
 * count), another seed gives other data.
 */
class SimulateDeterminismTest {

    @TempDir
    Path dir;

    private void simulate(Path folder, int seed, int threads) throws IOException {
        Files.createDirectories(folder);
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(new String[] {"simulate", "--size", "40x36x9", "--pixel", "0.1", "--step", "0.25",
            "--seed", String.valueOf(seed), "--threads", String.valueOf(threads), "--grid", "2x2", "--defects", "3",
            "--bits", "16", "--output", folder.resolve("data.tif").toString(),
            "--truth", folder.resolve("truth.tif").toString(), "--psf-output", folder.resolve("psf.tif").toString(),
            "--mask-output", folder.resolve("mask.tif").toString()},
                new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
    }

    @Test
    void sameSeedSameBytes() throws IOException {
        simulate(dir.resolve("a"), 7, 1);
        simulate(dir.resolve("b"), 7, 2);
        simulate(dir.resolve("c"), 8, 2);
        for (String f : new String[] {"data.tif", "truth.tif", "psf.tif", "mask.tif"}) {
            assertEquals(-1L, Files.mismatch(dir.resolve("a").resolve(f), dir.resolve("b").resolve(f)),
                    f + " differs between two runs with seed 7 (1 and 2 threads)");
        }
        // the seed matters: another seed gives another specimen and other noise (the PSF stays the same)
        assertNotEquals(-1L, Files.mismatch(dir.resolve("a/data.tif"), dir.resolve("c/data.tif")));
        assertNotEquals(-1L, Files.mismatch(dir.resolve("a/truth.tif"), dir.resolve("c/truth.tif")));
        assertEquals(-1L, Files.mismatch(dir.resolve("a/psf.tif"), dir.resolve("c/psf.tif")));
    }
}
