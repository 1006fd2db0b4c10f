package org.stackwright.simulate;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.SplittableRandom;

import ij.ImagePlus;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.cli.Main;
import org.stackwright.fft.Convolution;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Determinism: repeat runs are bit-identical, and so are runs with 1, 2, 3 or 4 threads (the documented
 * tolerance across thread counts is zero: {@link Workers} splits reductions into a fixed number of blocks and the
 * FFT works line by line, so no sum depends on the thread count). Bits are compared, not values, so NaN and -0
 * count too.
 */
class DeterminismTest {

    private static int[] bits(float[] a) {
        int[] b = new int[a.length];
        for (int i = 0; i < a.length; i++) {
            b[i] = Float.floatToRawIntBits(a[i]);
        }
        return b;
    }

    private static Result simulate(int threads) {
        SimulateOperation op = new SimulateOperation();
        Map<String, String> raw = new LinkedHashMap<>();
        raw.put("size", "45x38x11");
        raw.put("defects", "5");
        raw.put("grid", "2x2");
        raw.put("seed", "17");
        return op.run(Values.parse(op.name(), op.params(), raw), RunContext.quiet(threads));
    }

    private static float[] pixels(Result r, String key) {
        ImagePlus imp = r.images().get(key);
        return ImagePlusAdapter.toVolume(imp).data();
    }

    @Test
    void simulateIsBitIdenticalForRepeatsAndThreadCounts() {
        Result ref = simulate(1);
        for (int threads : new int[] {1, 2, 3, 4}) {
            Result r = simulate(threads);
            for (String key : new String[] {"output", "truth", "psf-output", "mask-output"}) {
                assertArrayEquals(bits(pixels(ref, key)), bits(pixels(r, key)), key + " with " + threads + " threads");
            }
        }
    }

    @Test
    void convolutionIsBitIdenticalAcrossThreadCounts() {
        SplittableRandom r = new SplittableRandom(3);
        float[] img = new float[37 * 29 * 11];
        for (int i = 0; i < img.length; i++) {
            img[i] = (float) r.nextDouble();
        }
        float[] ker = new float[7 * 5 * 3];
        for (int i = 0; i < ker.length; i++) {
            ker[i] = (float) r.nextDouble();
        }
        Volume image = new Volume(37, 29, 11, img, VoxelSize.UNIT);
        Volume kernel = new Volume(7, 5, 3, ker, VoxelSize.UNIT);
        for (Convolution.Boundary b : Convolution.Boundary.values()) {
            for (boolean correlate : new boolean[] {false, true}) {
                int[] ref;
                try (Workers w = new Workers(1)) {
                    ref = bits(Convolution.apply(image, kernel, b, correlate, w).data());
                }
                for (int threads : new int[] {2, 3, 4}) {
                    try (Workers w = new Workers(threads)) {
                        assertArrayEquals(ref, bits(Convolution.apply(image, kernel, b, correlate, w).data()),
                                b + (correlate ? " correlation" : " convolution") + " with " + threads + " threads");
                    }
                }
            }
        }
    }

    @Test
    void workersSumIsBitIdenticalAcrossThreadCounts() {
        SplittableRandom r = new SplittableRandom(5);
        double[] x = new double[100_003];
        for (int i = 0; i < x.length; i++) {
            x[i] = r.nextDouble() * Math.pow(10, r.nextInt(-8, 9));
        }
        double ref;
        try (Workers w = new Workers(1)) {
            ref = w.sum(x.length, (a, b) -> partial(x, a, b));
        }
        for (int threads = 2; threads <= 5; threads++) {
            try (Workers w = new Workers(threads)) {
                assertEquals(Double.doubleToRawLongBits(ref), Double.doubleToRawLongBits(w.sum(x.length, (a, b) -> partial(x, a, b))),
                        threads + " threads");
            }
        }
    }

    private static double partial(double[] x, int from, int to) {
        double s = 0;
        for (int i = from; i < to; i++) {
            s += x[i];
        }
        return s;
    }

    @Test
    void repeatCommandLineRunsWriteIdenticalFiles(@TempDir Path dir) throws IOException {
        PrintStream quiet = new PrintStream(new ByteArrayOutputStream());
        for (String run : new String[] {"a", "b"}) {
            String threads = run.equals("a") ? "1" : "2";
            assertEquals(Main.OK, Main.run(new String[] {"simulate", "--size", "24x20x5", "--seed", "9", "--threads", threads,
                    "--output", dir.resolve(run + ".tif").toString(), "--truth", dir.resolve(run + "-truth.tif").toString()},
                    quiet, quiet));
        }
        assertArrayEquals(Files.readAllBytes(dir.resolve("a.tif")), Files.readAllBytes(dir.resolve("b.tif")), "camera image file");
        assertArrayEquals(Files.readAllBytes(dir.resolve("a-truth.tif")), Files.readAllBytes(dir.resolve("b-truth.tif")), "truth file");
        assertTrue(Files.size(dir.resolve("a.tif")) > 24 * 20 * 5 * 4, "a complete 32-bit stack");
    }
}
