package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.util.SplittableRandom;
import java.util.function.IntPredicate;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** Exactness of harmonic and biharmonic fills on polynomials, trusted pixels, awkward masks, TV edges. */
class InpaintingTest {

    static final VoxelSize UNIT = VoxelSize.UNIT;

    static Volume mask(int w, int h, int d, IntPredicate hole) {
        float[] m = new float[w * h * d];
        for (int i = 0; i < m.length; i++) {
            m[i] = hole.test(i) ? 255 : 0;
        }
        return new Volume(w, h, d, m, UNIT);
    }

    /** Holes of several shapes, all at least 2 pixels from the border: rectangle, disk, line, L, scattered. */
    static boolean interiorHole(int x, int y, int w, int h) {
        boolean rect = x >= 5 && x < 17 && y >= 4 && y < 11;
        boolean disk = (x - 40) * (x - 40) + (y - 30) * (y - 30) <= 49;
        boolean line = y == 22 && x >= 3 && x < 30;
        boolean ell = (x >= 8 && x < 11 && y >= 30 && y < 45) || (y >= 42 && y < 45 && x >= 8 && x < 25);
        boolean scattered = (x * 7 + y * 13) % 37 == 0 && x >= 2 && y >= 2 && x < w - 2 && y < h - 2;
        return rect || disk || line || ell || scattered;
    }

    static double maxErrorOnMask(float[] expected, float[] actual, Volume mask) {
        double scale = 0;
        double err = 0;
        for (int i = 0; i < expected.length; i++) {
            scale = Math.max(scale, Math.abs(expected[i]));
            if (mask.data()[i % mask.size()] != 0) {
                err = Math.max(err, Math.abs(expected[i] - actual[i]));
            }
        }
        return err / scale;
    }

    // Harmonic functions reproduce linear functions: the 5-point (7-point) Laplacian of a linear function is zero
    // (property of harmonic functions; see REFERENCES.md, "Inpainting"). Check: relative error <= 1e-4.
    @Test
    void harmonicReproducesLinearRampInAnyHole() {
        int w = 57;
        int h = 53;
        float[] f = new float[w * h];
        for (int y = 0, i = 0; y < h; y++) {
            for (int x = 0; x < w; x++, i++) {
                f[i] = (float) (100 + 3.5 * x - 2.25 * y);
            }
        }
        Volume m = mask(w, h, 1, i -> interiorHole(i % w, i / w, w, h));
        try (Workers workers = new Workers(2)) {
            Inpainting.Outcome o = Inpainting.run(new Volume(w, h, 1, f, UNIT), m,
                    Inpainting.Settings.of(Inpainting.Method.HARMONIC, Inpainting.Mode.SLICES), workers);
            assertTrue(o.converged());
            double err = maxErrorOnMask(f, o.filled().data(), m);
            assertTrue(err <= 1e-4, "relative error " + err);
        }
    }

    // 3D with anisotropic voxels: a linear function is harmonic for any axis weights, so the 7-point weighted
    // Laplacian reproduces it too (same source). Tolerance 1e-4 relative.
    @Test
    void harmonicVolumeReproducesLinearRampWithAnisotropy() {
        int w = 24;
        int h = 20;
        int d = 12;
        float[] f = new float[w * h * d];
        for (int z = 0, i = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++, i++) {
                    f[i] = (float) (50 + 1.5 * x + 0.5 * y - 4 * z);
                }
            }
        }
        Volume m = mask(w, h, d, i -> {
            int x = i % w;
            int y = (i / w) % h;
            int z = i / (w * h);
            return (x >= 6 && x < 14 && y >= 5 && y < 12 && z >= 3 && z < 9) || (z == 10 && y >= 2 && y < 18 && x >= 2 && x < w - 2);
        });
        try (Workers workers = new Workers(2)) {
            Inpainting.Outcome o = Inpainting.run(new Volume(w, h, d, f, new VoxelSize(0.1, 0.1, 0.35)), m,
                    Inpainting.Settings.of(Inpainting.Method.HARMONIC, Inpainting.Mode.VOLUME), workers);
            double err = maxErrorOnMask(f, o.filled().data(), m);
            assertTrue(err <= 1e-4, "relative error " + err);
        }
    }

    static double cubic(double x, double y) {
        double u = x / 20;
        double v = y / 20;
        return 2 + u * u * u - 2 * u * u * v + 0.5 * u * v * v + 0.75 * v * v * v - u * v + 0.3 * u;
    }

    // Biharmonic fills reproduce cubics: the 5-point Laplacian is exact on cubics (it gives their linear Laplacian)
    // and the Laplacian of a linear function is zero, so the 13-point bi-Laplacian vanishes (Damelin & Hoang 2018;
    // REFERENCES.md). Tolerance 1e-4 relative.
    @Test
    void biharmonicReproducesCubicInAnyHole() {
        int w = 57;
        int h = 53;
        float[] f = new float[w * h];
        for (int y = 0, i = 0; y < h; y++) {
            for (int x = 0; x < w; x++, i++) {
                f[i] = (float) cubic(x, y);
            }
        }
        Volume m = mask(w, h, 1, i -> interiorHole(i % w, i / w, w, h));
        try (Workers workers = new Workers(2)) {
            Inpainting.Outcome o = Inpainting.run(new Volume(w, h, 1, f, UNIT), m,
                    Inpainting.Settings.of(Inpainting.Method.BIHARMONIC, Inpainting.Mode.SLICES), workers);
            assertTrue(o.converged());
            double err = maxErrorOnMask(f, o.filled().data(), m);
            assertTrue(err <= 1e-4, "relative error " + err);
        }
    }

    // Same in 3D with anisotropic voxels: the weighted 7-point Laplacian is exact on cubics (same argument).
    @Test
    void biharmonicVolumeReproducesCubicWithAnisotropy() {
        int w = 22;
        int h = 20;
        int d = 14;
        float[] f = new float[w * h * d];
        for (int z = 0, i = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++, i++) {
                    double t = z / 10.0;
                    f[i] = (float) (cubic(x, y) + 0.4 * t * t * t - 0.3 * t * (x / 20.0) * (y / 20.0));
                }
            }
        }
        Volume m = mask(w, h, d, i -> {
            int x = i % w;
            int y = (i / w) % h;
            int z = i / (w * h);
            return x >= 6 && x < 13 && y >= 5 && y < 14 && z >= 4 && z < 9;
        });
        try (Workers workers = new Workers(2)) {
            Inpainting.Outcome o = Inpainting.run(new Volume(w, h, d, f, new VoxelSize(0.1, 0.1, 0.3)), m,
                    Inpainting.Settings.of(Inpainting.Method.BIHARMONIC, Inpainting.Mode.VOLUME), workers);
            double err = maxErrorOnMask(f, o.filled().data(), m);
            assertTrue(err <= 1e-4, "relative error " + err);
        }
    }

    static Volume randomImage(int w, int h, int d, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] f = new float[w * h * d];
        for (int i = 0; i < f.length; i++) {
            f[i] = (float) (100 + 50 * Math.sin(i * 0.01) + 10 * r.nextDouble());
        }
        return new Volume(w, h, d, f, new VoxelSize(0.1, 0.1, 0.3));
    }

    // Trusted pixels are returned bit-identical, for every method and mode, with masks touching the border and
    // holes of every size (one pixel, a band, a block that covers most of a slice).
    @ParameterizedTest
    @EnumSource(Inpainting.Method.class)
    void trustedPixelsAreBitIdentical(Inpainting.Method method) {
        int w = 37;
        int h = 29;
        int d = 5;
        Volume img = randomImage(w, h, d, 3);
        float[] before = img.data().clone();
        Volume m = mask(w, h, d, i -> {
            int x = i % w;
            int y = (i / w) % h;
            int z = i / (w * h);
            return x == 0 || y == h - 1 || (x >= 10 && x < 13) || (i % 17 == 0)
                    || (z == 2 && x >= 14 && y >= 1 && y < 27);
        });
        for (Inpainting.Mode mode : Inpainting.Mode.values()) {
            try (Workers workers = new Workers(2)) {
                Inpainting.Outcome o = Inpainting.run(img, m, Inpainting.Settings.of(method, mode), workers);
                assertArrayEquals(before, img.data(), "input modified");
                float[] out = o.filled().data();
                for (int i = 0; i < out.length; i++) {
                    boolean masked = m.data()[i] != 0;
                    assertEquals(masked ? (byte) 255 : 0, o.filledMask()[i], "filled mask at " + i);
                    if (!masked && Float.floatToRawIntBits(out[i]) != Float.floatToRawIntBits(before[i])) {
                        fail(method + " " + mode + ": trusted pixel " + i + " changed from " + before[i] + " to " + out[i]);
                    }
                    if (masked && !Float.isFinite(out[i])) {
                        fail(method + " " + mode + ": filled pixel " + i + " is " + out[i]);
                    }
                }
            }
        }
    }

    // A mask that covers everything leaves nothing to fill from: refused, naming the mask.
    @Test
    void refusesMaskCoveringEverything() {
        Volume img = randomImage(8, 6, 1, 1);
        Volume m = mask(8, 6, 1, i -> true);
        try (Workers workers = new Workers(1)) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> Inpainting.run(img, m,
                    Inpainting.Settings.of(Inpainting.Method.HARMONIC, Inpainting.Mode.SLICES), workers));
            assertTrue(e.getMessage().startsWith("mask covers every pixel"), e.getMessage());
            Volume stack = randomImage(8, 6, 3, 1);
            Volume m3 = mask(8, 6, 3, i -> i / 48 == 1);
            e = assertThrows(IllegalArgumentException.class, () -> Inpainting.run(stack, m3,
                    Inpainting.Settings.of(Inpainting.Method.MEDIAN, Inpainting.Mode.SLICES), workers));
            assertTrue(e.getMessage().contains("mask covers every pixel of slice 2"), e.getMessage());
            // in volume mode that slice is filled from its neighbours
            Inpainting.Outcome o = Inpainting.run(stack, m3,
                    Inpainting.Settings.of(Inpainting.Method.HARMONIC, Inpainting.Mode.VOLUME), workers);
            assertEquals(48, o.filledCount());
            e = assertThrows(IllegalArgumentException.class, () -> Inpainting.run(stack, mask(7, 6, 1, i -> false),
                    Inpainting.Settings.of(Inpainting.Method.MEDIAN, Inpainting.Mode.SLICES), workers));
            assertTrue(e.getMessage().startsWith("mask is 7x6x1"), e.getMessage());
        }
    }

    // A huge hole (all but 3 pixels): the harmonic fill obeys the maximum principle (values between the known
    // minimum and maximum; property of harmonic functions) and converges.
    @Test
    void hugeHoleStaysWithinKnownRange() {
        int w = 48;
        int h = 40;
        float[] f = new float[w * h];
        f[0] = 10;
        f[w * h - 1] = 30;
        f[20 * w + 24] = 17;
        Volume m = mask(w, h, 1, i -> i != 0 && i != w * h - 1 && i != 20 * w + 24);
        for (Inpainting.Method method : Inpainting.Method.values()) {
            try (Workers workers = new Workers(2)) {
                Inpainting.Outcome o = Inpainting.run(new Volume(w, h, 1, f, UNIT), m,
                        Inpainting.Settings.of(method, Inpainting.Mode.SLICES), workers);
                if (method == Inpainting.Method.HARMONIC) {
                    assertTrue(o.converged());
                    for (float v : o.filled().data()) {
                        assertTrue(v >= 10 - 1e-3 && v <= 30 + 1e-3, "value " + v);
                    }
                }
                for (float v : o.filled().data()) {
                    assertTrue(Float.isFinite(v), method + " gave " + v);
                }
            }
        }
    }

    /** 10-90 % width of a 0-to-1 step along row y, in pixels (linear interpolation between samples). */
    static double edgeWidth(float[] f, int w, int y) {
        double x10 = Double.NaN;
        double x90 = Double.NaN;
        for (int x = 0; x < w - 1; x++) {
            double a = f[y * w + x];
            double b = f[y * w + x + 1];
            if (Double.isNaN(x10) && a < 0.1 && b >= 0.1) {
                x10 = x + (0.1 - a) / (b - a);
            }
            if (Double.isNaN(x90) && a < 0.9 && b >= 0.9) {
                x90 = x + (0.9 - a) / (b - a);
            }
        }
        return x90 - x10;
    }

    // TV inpainting continues a straight edge through a hole as an edge; harmonic fills smear it (Chan & Shen
    // 2002, "Mathematical models for local nontexture inpaintings", sec. on TV inpainting and edges).
    @Test
    void totalVariationKeepsEdgeSharperThanHarmonic() {
        int w = 64;
        int h = 64;
        float[] f = new float[w * h];
        for (int i = 0; i < f.length; i++) {
            f[i] = i % w >= 32 ? 1 : 0;
        }
        Volume m = mask(w, h, 1, i -> Math.abs(i % w - 32) <= 8 && Math.abs(i / w - 32) <= 8);
        try (Workers workers = new Workers(1)) {
            Volume img = new Volume(w, h, 1, f, UNIT);
            float[] harm = Inpainting.run(img, m, Inpainting.Settings.of(Inpainting.Method.HARMONIC,
                    Inpainting.Mode.SLICES), workers).filled().data();
            float[] tv = Inpainting.run(img, m, Inpainting.Settings.of(Inpainting.Method.TOTAL_VARIATION,
                    Inpainting.Mode.SLICES), workers).filled().data();
            double wh = edgeWidth(harm, w, 32);
            double wt = edgeWidth(tv, w, 32);
            System.out.printf("edge width (10-90 %%) at the hole centre: harmonic %.2f px, total variation %.2f px%n", wh, wt);
            assertTrue(wt <= 1.5, "TV edge width " + wt);
            assertTrue(wh >= 3 * wt, "harmonic " + wh + " vs TV " + wt);
        }
    }

    // Results do not depend on the thread count (deterministic block sums in Workers).
    @Test
    void sameResultForAnyThreadCount() {
        Volume img = randomImage(61, 47, 3, 9);
        Volume m = mask(61, 47, 3, i -> i % 13 == 0 || (i % 61 >= 20 && i % 61 < 25));
        for (Inpainting.Mode mode : Inpainting.Mode.values()) {
            float[] one;
            float[] two;
            try (Workers w1 = new Workers(1); Workers w2 = new Workers(2)) {
                one = Inpainting.run(img, m, Inpainting.Settings.of(Inpainting.Method.BIHARMONIC, mode), w1).filled().data();
                two = Inpainting.run(img, m, Inpainting.Settings.of(Inpainting.Method.BIHARMONIC, mode), w2).filled().data();
            }
            assertArrayEquals(one, two, mode.toString());
        }
    }

    // A NaN among the trusted pixels cannot serve as boundary value: it is filled too and listed in the filled mask.
    @Test
    void nonFiniteTrustedPixelsAreFilledAndReported() {
        Volume img = randomImage(20, 16, 1, 4);
        img.data()[5 * 20 + 7] = Float.NaN;
        Volume m = mask(20, 16, 1, i -> i == 3 * 20 + 3);
        try (Workers workers = new Workers(1)) {
            Inpainting.Outcome o = Inpainting.run(img, m, Inpainting.Settings.of(Inpainting.Method.HARMONIC,
                    Inpainting.Mode.SLICES), workers);
            assertEquals(2, o.filledCount());
            assertEquals((byte) 255, o.filledMask()[5 * 20 + 7]);
            assertTrue(Float.isFinite(o.filled().data()[5 * 20 + 7]));
            assertTrue(o.notes().get(0).contains("NaN"), o.notes().toString());
        }
    }
}
