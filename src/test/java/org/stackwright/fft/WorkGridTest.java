package org.stackwright.fft;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;
import org.stackwright.parallel.Workers;

/**
 * The work grid of each engine ({@link RealTransform#work()}): passes over ranges that cut rows and the native
 * engine's blocks keep every voxel in place, filtering in the work grid gives exactly what {@link RealTransform#filter}
 * gives (the same arithmetic, so the same floats), and a one-off filter through the same transform is reported by the
 * generation count. Sizes: a row longer than the native engine's block (16384 floats) and awkward small ones.
 */
class WorkGridTest {

    private static List<FftEngine> engines() {
        List<FftEngine> e = new ArrayList<>(List.of(FftEngines.java()));
        FftEngine n = FftEnginesTest.nativeOrNull();
        if (n != null) {
            e.add(n);
        }
        return e;
    }

    @Test
    void passesKeepEveryVoxelWhereverTheRangesCut() {
        int[][] sizes = {{7, 5, 3}, {1, 4, 6}, {16400, 2, 1}, {30, 1, 1}};
        for (FftEngine engine : engines()) {
            for (int[] s : sizes) {
                try (Workers w = new Workers(3)) {
                    RealTransform t = engine.transform(s[0], s[1], s[2], w);
                    WorkGrid g = t.work();
                    int n = g.length();
                    float[] in = random(n, 1);
                    // uneven ranges, some cutting rows, in parallel
                    w.forRange(n, (from, to) -> g.load(in, from, to));
                    float[] out = new float[n];
                    w.forRange(7, (a, b) -> {
                        for (int k = a; k < b; k++) {
                            g.store(out, (int) ((long) n * k / 7), (int) ((long) n * (k + 1) / 7));
                        }
                    });
                    assertArrayEquals(in, out, engine.name() + " " + s[0] + "x" + s[1] + "x" + s[2]);
                    // an update pass sees each voxel once, with its own index
                    w.forRange(n, (from, to) -> g.update(from, to, (a, at, index, count) -> {
                        for (int j = 0; j < count; j++) {
                            a[at + j] += index + j;
                        }
                    }));
                    for (int i = 0; i < n; i += Math.max(1, n / 97)) {
                        assertEquals(in[i] + (float) i, g.get(i), 0f, engine.name() + " voxel " + i);
                    }
                }
            }
        }
    }

    @Test
    void filteringInTheWorkGridEqualsFilterAndOneOffUseIsCounted() {
        int nx = 12;
        int ny = 9;
        int nz = 5;
        for (FftEngine engine : engines()) {
            try (Workers w = new Workers(2)) {
                RealTransform t = engine.transform(nx, ny, nz, w);
                float[] kernel = t.newSpectrum();
                t.forward(random(t.realLength(), 2), kernel);
                float[] in = random(t.realLength(), 3);
                float[] expected = new float[t.realLength()];
                t.filter(in, expected, kernel, SpectrumProduct.CONJUGATE);

                WorkGrid g = t.work();
                g.load(in, 0, g.length());
                long before = g.generation();
                t.filterWork(kernel, SpectrumProduct.CONJUGATE);
                assertEquals(before, g.generation(), "filtering in the work grid keeps it");
                float[] got = new float[t.realLength()];
                g.store(got, 0, g.length());
                assertArrayEquals(expected, got, engine.name() + ": work grid against filter");

                t.filter(in, new float[t.realLength()], kernel, SpectrumProduct.MULTIPLY);
                assertNotEquals(before, g.generation(), engine.name() + ": a one-off filter used the work space");
            }
        }
    }

    private static float[] random(int n, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] a = new float[n];
        for (int i = 0; i < n; i++) {
            a[i] = (float) r.nextDouble();
        }
        return a;
    }
}
