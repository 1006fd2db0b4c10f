package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;
import org.stackwright.fft.FftEngines;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.testing.VolumeAssert;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * A deconvolution on each FFT engine through the command line: repeat runs give bit-identical files per engine
 * (estimated plans are fixed), the two engines agree within 1e-5 of the largest value (the bound), and the run
 * record names the engine and how it planned.
 *
 * <p>The engines' transforms differ in the last bits (about 1e-7), and iterations carry that forward: plain
 * Richardson-Lucy grew from 3.5e-7 after one iteration to 8.9e-6 after 50 on this stack. Accelerated RL grows
 * faster (the extrapolation multiplies each step by up to 1.95): 1.5e-6 after 5 iterations, 0.5 to 1.0e-5 after 10;
 * and after about 14 its safeguard (a voxel whose extrapolation would turn negative keeps its RL value) is a yes/no
 * decision that the last bits can flip in near-zero voxels, which the multiplicative update then keeps: 20
 * iterations differed by up to 4.6e-4 of the maximum in such voxels (both results equally valid RL iterates). So the
 * accelerated case runs 5 iterations here. Richardson-Lucy with total variation behaves alike (3.8e-6 after 5
 * iterations, 5e-5 after 10); primal-dual total variation stayed at 2.4e-7 after 20 and the Wiener filter is 1.4e-6.
 * README (FFT engine) states the same.
 */
class FftEngineDeconvolutionTest {

    @TempDir
    Path dir;

    private Volume run(Path in, Path psf, String fft, String name, String[] method) throws Exception {
        Path out = dir.resolve(name + ".tif");
        Path rec = dir.resolve(name + ".json");
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(new String[] {"deconvolve", "--input", in.toString(), "--psf", psf.toString(), "--output",
            out.toString(), "--method", method[0], "--acceleration", method[1], "--iterations", method[2], "--stop",
            "fixed", "--offset", "100",
            "--read-noise", "2", "--background", "10", "--fft", fft, "--record", rec.toString(), "--threads", "2"},
            new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
            new PrintStream(err, true, StandardCharsets.UTF_8));
        assertEquals(Main.OK, code, err.toString(StandardCharsets.UTF_8));
        String json = Files.readString(rec);
        String engine = fft.equals("auto") ? FftEngines.standard().name() : fft;
        assertTrue(json.contains("\"fft_engine\": \"" + engine + "\""), json);
        assertTrue(json.contains("\"fft_planning\": \"" + (engine.equals("java") ? "fixed" : "estimate") + "\""), json);
        return TiffFiles.read(out, name);
    }

    @Test
    void enginesAgreeAndRepeatBitForBit() throws Exception {
        boolean hasNative;
        try {
            hasNative = FftEngines.choose("native").engine() != null;
        } catch (IllegalArgumentException e) {
            hasNative = false;
        }
        assumeTrue(hasNative, "the native engine does not load here");
        Simulation.Outcome sim = TestSpecimens.cells(40, 36, 12, 1, 10, new Camera(1, 100, 2, 65535), 17);
        Path in = dir.resolve("in.tif");
        Path psf = dir.resolve("psf.tif");
        TiffFiles.write(sim.data(), in, true);
        TiffFiles.write(TestSpecimens.psf(), psf, true);
        String[][] methods = {{"richardson-lucy", "off", "30"}, {"richardson-lucy", "on", "5"},
            {"richardson-lucy-tv", "on", "5"}, {"total-variation", "on", "20"}, {"wiener", "on", "1"}};
        for (String[] method : methods) {
            String what = String.join(" ", method);
            Volume j1 = run(in, psf, "java", "java-1-" + method[0] + method[1], method);
            Volume n1 = run(in, psf, "native", "native-1-" + method[0] + method[1], method);
            if (method == methods[0]) {
                Volume j2 = run(in, psf, "java", "java-2", method);
                Volume n2 = run(in, psf, "native", "native-2", method);
                assertArrayEquals(j1.data(), j2.data(), what + ": java engine, repeat run");
                assertArrayEquals(n1.data(), n2.data(), what + ": native engine, repeat run");
            }
            VolumeAssert.assertClose(j1, n1, 1e-5, what + ": native against java");
        }
    }
}
