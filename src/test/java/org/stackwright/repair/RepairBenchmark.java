package org.stackwright.repair;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Locale;
import java.util.SplittableRandom;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Speed of harmonic (and biharmonic) inpainting; not a test. Run (after {@code mvn -q -o test-compile}):
 * <pre>
 * java -Xmx8g -cp target/classes:target/test-classes:$(mvn -q -o dependency:build-classpath -Dmdep.outputFile=/dev/stdout) \
 *      org.stackwright.repair.RepairBenchmark [threads]
 * </pre>
 * Cases: 2048 x 2048 with 1 % scattered defective pixels (goal <= 0.5 s) and with 5-px seams of a 4 x 4 grid
 * (goal <= 1 s); 64 x 512 x 512 with seams of a 4 x 4 grid, per slice and as one volume; a 256 x 256 hole in
 * 2048 x 2048 (and 128 x 128 in 512 x 512), harmonic and biharmonic, by the automatic solver choice (multigrid for
 * such holes) and, once, by conjugate gradients with the diagonal preconditioner. Times are the best of 5
 * runs after 2 warm-up runs (the diagonal-CG hole fills: one run). The floor for any fill is one pass over the image (the copy of the trusted pixels),
 * printed as "copy". When /usr/bin/python3 with scikit-image exists, skimage.restoration.inpaint_biharmonic is
 * timed on the same 2D cases (tools/reference/bench_biharmonic.py) and compared with our biharmonic fill.
 */
public final class RepairBenchmark {

    private RepairBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int threads = args.length > 0 ? Integer.parseInt(args[0]) : Runtime.getRuntime().availableProcessors();
        System.out.printf(Locale.ROOT, "Repair benchmark: %d threads, Java %s, %s %s, %d cores%n", threads,
                System.getProperty("java.version"), System.getProperty("os.name"), System.getProperty("os.arch"),
                Runtime.getRuntime().availableProcessors());
        Volume img2d = smooth(2048, 2048, 1, 1);
        Volume scattered = scatteredMask(2048, 2048, 0.01, 2);
        Volume seams2d = planeMask(new TileLayout(4, 4, 512, 512, 0, 0, false).mask(5), 2048, 2048);
        Volume img3d = smooth(512, 512, 64, 3);
        Volume seams3d = planeMask(new TileLayout(4, 4, 128, 128, 0, 0, false).mask(5), 512, 512);
        try (Workers w = new Workers(threads)) {
            double copy = time(() -> img2d.data().clone());
            System.out.printf(Locale.ROOT, "copy of a 2048x2048 image (floor): %.4f s%n", copy);
            double[] hs = run("2048x2048, 1% scattered, harmonic", img2d, scattered, Inpainting.Method.HARMONIC,
                    Inpainting.Mode.SLICES, w);
            double[] hm = run("2048x2048, 5-px seams 4x4, harmonic", img2d, seams2d, Inpainting.Method.HARMONIC,
                    Inpainting.Mode.SLICES, w);
            double[] bs = run("2048x2048, 1% scattered, biharmonic", img2d, scattered, Inpainting.Method.BIHARMONIC,
                    Inpainting.Mode.SLICES, w);
            double[] bm = run("2048x2048, 5-px seams 4x4, biharmonic", img2d, seams2d, Inpainting.Method.BIHARMONIC,
                    Inpainting.Mode.SLICES, w);
            Volume hole2048 = holeMask(2048, 2048, 256);
            Volume img512 = smooth(512, 512, 1, 4);
            Volume hole512 = holeMask(512, 512, 128);
            for (Inpainting.Method m : new Inpainting.Method[] {Inpainting.Method.HARMONIC, Inpainting.Method.BIHARMONIC}) {
                double mg = run("2048x2048, 256x256 hole, " + m.word() + ", multigrid (auto)", img2d, hole2048, m,
                        Inpainting.Mode.SLICES, w)[0];
                double cg = once("2048x2048, 256x256 hole, " + m.word() + ", diagonal CG", img2d, hole2048, m, w);
                System.out.printf(Locale.ROOT, "  diagonal CG / multigrid: %.1fx%n", cg / mg);
                double mg5 = run("512x512, 128x128 hole, " + m.word() + ", multigrid (auto)", img512, hole512, m,
                        Inpainting.Mode.SLICES, w)[0];
                double cg5 = once("512x512, 128x128 hole, " + m.word() + ", diagonal CG", img512, hole512, m, w);
                System.out.printf(Locale.ROOT, "  diagonal CG / multigrid: %.1fx%n", cg5 / mg5);
            }
            run("64x512x512, 5-px seams 4x4, harmonic per slice", img3d, seams3d, Inpainting.Method.HARMONIC,
                    Inpainting.Mode.SLICES, w);
            run("64x512x512, 5-px seams 4x4, harmonic volume (z step 3x)", img3d, seams3d, Inpainting.Method.HARMONIC,
                    Inpainting.Mode.VOLUME, w);
            Path py = Path.of("/usr/bin/python3");
            Path script = Path.of("tools/reference/bench_biharmonic.py");
            if (Files.isExecutable(py) && Files.exists(script)) {
                skimage(py, script, img2d, scattered, "1% scattered", hs[0], bs[0]);
                skimage(py, script, img2d, seams2d, "5-px seams 4x4", hm[0], bm[0]);
            } else {
                System.out.println("skimage comparison skipped: /usr/bin/python3 or " + script + " not found");
            }
        }
    }

    /** @return best seconds and iterations */
    static double[] run(String what, Volume img, Volume mask, Inpainting.Method m, Inpainting.Mode mode, Workers w) {
        Inpainting.Settings s = Inpainting.Settings.of(m, mode);
        Inpainting.Outcome[] last = new Inpainting.Outcome[1];
        double best = time(() -> last[0] = Inpainting.run(img, mask, s, w));
        System.out.printf(Locale.ROOT, "%-60s %8.3f s  (%d pixels filled, %d iterations, converged %s)%n", what, best,
                last[0].filledCount(), last[0].iterations(), last[0].converged());
        return new double[] {best, last[0].iterations()};
    }

    /** One timed run with the diagonal preconditioner; @return seconds */
    static double once(String what, Volume img, Volume mask, Inpainting.Method m, Workers w) {
        Inpainting.Settings d = Inpainting.Settings.of(m, Inpainting.Mode.SLICES);
        Inpainting.Settings s = new Inpainting.Settings(m, Inpainting.Mode.SLICES, d.tolerance(), d.maxIterations(),
                Inpainting.Solver.CONJUGATE_GRADIENT);
        long t0 = System.nanoTime();
        Inpainting.Outcome o = Inpainting.run(img, mask, s, w);
        double t = (System.nanoTime() - t0) * 1e-9;
        System.out.printf(Locale.ROOT, "%-60s %8.3f s  (%d pixels filled, %d iterations, converged %s; one run)%n",
                what, t, o.filledCount(), o.iterations(), o.converged());
        return t;
    }

    /** A centred square hole of side s. */
    static Volume holeMask(int w, int h, int s) {
        float[] m = new float[w * h];
        for (int y = (h - s) / 2; y < (h + s) / 2; y++) {
            for (int x = (w - s) / 2; x < (w + s) / 2; x++) {
                m[y * w + x] = 255;
            }
        }
        return new Volume(w, h, 1, m, VoxelSize.UNIT);
    }

    static double time(Runnable r) {
        for (int i = 0; i < 2; i++) {
            r.run();
        }
        double best = Double.POSITIVE_INFINITY;
        for (int i = 0; i < 5; i++) {
            long t0 = System.nanoTime();
            r.run();
            best = Math.min(best, (System.nanoTime() - t0) * 1e-9);
        }
        return best;
    }

    static void skimage(Path py, Path script, Volume img, Volume mask, String what, double oursHarmonic,
            double oursBiharmonic) throws IOException, InterruptedException {
        Path dir = Files.createTempDirectory("repair-bench");
        try {
            Path im = dir.resolve("image.raw");
            Path mk = dir.resolve("mask.raw");
            ByteBuffer b = ByteBuffer.allocate(img.size() * 4).order(ByteOrder.LITTLE_ENDIAN);
            b.asFloatBuffer().put(img.data(), 0, img.width() * img.height());
            Files.write(im, Arrays.copyOf(b.array(), img.width() * img.height() * 4));
            byte[] m = new byte[img.width() * img.height()];
            for (int i = 0; i < m.length; i++) {
                m[i] = (byte) (mask.data()[i] != 0 ? 1 : 0);
            }
            Files.write(mk, m);
            Process p = new ProcessBuilder(py.toString(), script.toString(), im.toString(), mk.toString(),
                    Integer.toString(img.width()), Integer.toString(img.height()), "2").redirectErrorStream(true).start();
            String out = new String(p.getInputStream().readAllBytes()).trim();
            if (p.waitFor() != 0) {
                System.out.println("skimage run failed: " + out);
                return;
            }
            double t = Double.parseDouble(out.substring(out.lastIndexOf('\n') + 1).trim());
            System.out.printf(Locale.ROOT, "skimage inpaint_biharmonic, %-22s %8.3f s: %.1fx our biharmonic, %.1fx our harmonic%n",
                    what, t, t / oursBiharmonic, t / oursHarmonic);
        } finally {
            try (var s = Files.list(dir)) {
                for (Path f : (Iterable<Path>) s::iterator) {
                    Files.deleteIfExists(f);
                }
            }
            Files.deleteIfExists(dir);
        }
    }

    /** A smooth invented image with a little noise (seeded). */
    static Volume smooth(int w, int h, int d, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] v = new float[w * h * d];
        for (int z = 0, i = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++, i++) {
                    v[i] = (float) (200 + 80 * Math.sin(x * 0.013 + z * 0.1) * Math.cos(y * 0.017) + 5 * r.nextDouble());
                }
            }
        }
        return new Volume(w, h, d, v, new VoxelSize(0.1, 0.1, 0.3));
    }

    static Volume scatteredMask(int w, int h, double fraction, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] m = new float[w * h];
        for (int i = 0; i < m.length; i++) {
            m[i] = r.nextDouble() < fraction ? 255 : 0;
        }
        return new Volume(w, h, 1, m, VoxelSize.UNIT);
    }

    static Volume planeMask(byte[] mask, int w, int h) {
        float[] m = new float[w * h];
        for (int i = 0; i < m.length; i++) {
            m[i] = mask[i] != 0 ? 255 : 0;
        }
        return new Volume(w, h, 1, m, VoxelSize.UNIT);
    }
}
