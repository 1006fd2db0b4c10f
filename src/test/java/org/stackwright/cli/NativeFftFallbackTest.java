package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.fft.FftEngines;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.solve.TestSpecimens;
import org.stackwright.volume.TiffFiles;

/**
 * A machine where the native FFT library does not load: JavaCPP is told it runs on a platform it has no natives
 * for (its own system property, read once when its loader starts; every test class has its own JVM), so the real
 * loader fails. Then {@code --fft auto} deconvolves on the Java engine and says why in one line (output and run
 * record), and {@code --fft native} is refused naming the key, exit 2.
 */
class NativeFftFallbackTest {

    @TempDir
    Path dir;

    @BeforeAll
    static void noNativesHere() {
        System.setProperty("org.bytedeco.javacpp.platform", "nowhere-x86_64");
    }

    private int cli(ByteArrayOutputStream out, ByteArrayOutputStream err, String... args) {
        return Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8), new PrintStream(err, true, StandardCharsets.UTF_8));
    }

    @Test
    void autoFallsBackToJavaWithOneLineAndNativeIsRefused() throws Exception {
        assumeTrue(System.getProperty("stackwright.fft", "auto").equals("auto"), "auto is pinned to an engine here");
        FftEngines.Choice c = FftEngines.choose("auto");
        assertSame(FftEngines.java(), c.engine());
        assertTrue(c.note().startsWith("FFT engine: java (the native FFTW engine did not load: "), c.note());

        Simulation.Outcome sim = TestSpecimens.cells(24, 20, 10, 1, 10, new Camera(1, 100, 2, 65535), 3);
        Path in = dir.resolve("in.tif");
        Path psf = dir.resolve("psf.tif");
        TiffFiles.write(sim.data(), in, true);
        TiffFiles.write(TestSpecimens.psf(), psf, true);
        Path rec = dir.resolve("run.json");
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = cli(out, err, "deconvolve", "--input", in.toString(), "--psf", psf.toString(), "--output",
                dir.resolve("out.tif").toString(), "--iterations", "3", "--offset", "100", "--record", rec.toString());
        assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
        String printed = out.toString(StandardCharsets.UTF_8);
        assertEquals(1, printed.lines().filter(l -> l.startsWith("FFT engine: java (the native FFTW engine did not load")).count(), printed);
        String json = Files.readString(rec);
        assertTrue(json.contains("\"fft_engine\": \"java\""), json);
        assertTrue(json.contains("\"fft_note\": \"FFT engine: java"), json);

        ByteArrayOutputStream err2 = new ByteArrayOutputStream();
        int refused = cli(new ByteArrayOutputStream(), err2, "deconvolve", "--input", in.toString(), "--psf",
                psf.toString(), "--output", dir.resolve("out2.tif").toString(), "--fft", "native");
        assertEquals(Main.BAD_INPUT, refused);
        assertTrue(err2.toString(StandardCharsets.UTF_8).contains("fft = native is not available here:"), err2.toString(StandardCharsets.UTF_8));
        assertTrue(!Files.exists(dir.resolve("out2.tif")), "nothing written when refused");
    }
}
