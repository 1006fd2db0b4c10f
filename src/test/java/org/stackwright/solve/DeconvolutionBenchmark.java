package org.stackwright.solve;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;

import org.stackwright.fft.RealFft3D;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The deconvolution benchmark (not a test). Prints, in one run:
 * <ol>
 * <li>for 64x256x256 and 128x512x512 with a 31^3 PSF (extended boundary): one Richardson-Lucy iteration against
 * the 4 FFTs it needs at the padded size (ratio, goal &lt;= 1.15), and the reference library's RL per-iteration
 * time on the same data (ratio, goal ours &gt;= 3x faster), when /usr/bin/python3 has scikit-image;</li>
 * <li>live heap during a run against the float size of the padded volume (goal &lt;= 6x);</li>
 * <li>on the bundled demo stack (invented truth known): the reference library's best NRMSE over a range of
 * iteration counts, and the time ours (accelerated, noise stop) needs to reach that NRMSE (goal &gt;= 8x shorter).</li>
 * </ol>
 * Run from the repository root after {@code mvn -q -DskipTests package test-compile}:
 * {@code java -Xmx12g -cp target/stackwright.jar:target/test-classes org.stackwright.solve.DeconvolutionBenchmark [--small-only]}
 */
public final class DeconvolutionBenchmark {

    private static final String PYTHON = "/usr/bin/python3";
    private static final Path SCRIPT = Paths.get("tools", "benchmark", "skimage_rl.py");

    private DeconvolutionBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        boolean smallOnly = Arrays.asList(args).contains("--small-only");
        boolean demoOnly = Arrays.asList(args).contains("--demo-only");
        int threads = Runtime.getRuntime().availableProcessors();
        System.out.printf(Locale.ROOT, "machine: %s %s, %d cores, Java %s, max heap %.1f GiB, threads %d%n",
                System.getProperty("os.name"), System.getProperty("os.arch"), threads,
                System.getProperty("java.version"), Runtime.getRuntime().maxMemory() / 1073741824.0, threads);
        Path tmp = Files.createTempDirectory("stackwright-bench");
        boolean python = Files.isExecutable(Paths.get(PYTHON)) && Files.exists(SCRIPT);
        if (!demoOnly) {
            iterationCost(new int[] {256, 256, 64}, 31, threads, tmp, python, 3);
        }
        if (!smallOnly && !demoOnly) {
            iterationCost(new int[] {512, 512, 128}, 31, threads, tmp, python, 2);
        }
        timeToBest(threads, tmp, python);
    }

    private static void iterationCost(int[] size, int psfSize, int threads, Path tmp, boolean python, int reps)
            throws Exception {
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.2);
        Volume psf = GaussianPsf.sampled(0.2, 0.5, voxel, psfSize, psfSize, psfSize);
        Volume data = Volume.zeros(size[0], size[1], size[2], voxel);
        SplittableRandom r = new SplittableRandom(1);
        float[] d = data.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (50 + 100 * r.nextDouble());
        }
        String label = size[0] + "x" + size[1] + "x" + size[2];
        try (Workers w = new Workers(threads)) {
            int nx = org.stackwright.fft.Convolution.paddedSize(size[0], psfSize);
            int ny = org.stackwright.fft.Convolution.paddedSize(size[1], psfSize);
            int nz = org.stackwright.fft.Convolution.paddedSize(size[2], psfSize);
            long grid = (long) nx * ny * nz;
            double[] fft = fourFfts(nx, ny, nz, w, reps);
            double fourFft = fft[0];
            System.gc();
            System.gc();
            long[] base = {used()};
            long[] live = new long[1];
            long[] stamps = new long[reps + 2];
            DeconvolutionProblem p = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                    Camera.of(1, 0, 0), 10, w);
            long[] cpu = new long[reps + 2];
            stamps[0] = System.nanoTime();
            new RichardsonLucy(Stopping.fixed(reps + 1), false).solve(p, RunContext.quiet(threads), (k, max, obj, ch) -> {
                stamps[k] = System.nanoTime();
                cpu[k] = processCpu();
                if (k == 1) {
                    System.gc();
                    live[0] = used() - base[0];
                    stamps[k] = System.nanoTime();
                    cpu[k] = processCpu();
                }
            });
            double iter = Double.POSITIVE_INFINITY;
            for (int k = 2; k <= reps + 1; k++) {
                iter = Math.min(iter, (stamps[k] - stamps[k - 1]) * 1e-9);
            }
            double iterCpu = (cpu[reps + 1] - cpu[1]) * 1e-9 / reps;
            System.out.printf(Locale.ROOT, "%s, PSF %d^3, grid %dx%dx%d: RL iteration %.3f s wall / %.3f s CPU, 4 FFTs "
                    + "%.3f s wall / %.3f s CPU, ratio %.2f wall / %.2f CPU (goal <= 1.15); live heap during RL %.0f MiB "
                    + "= %.2f x the padded float volume (goal <= 6)%n", label, psfSize, nx, ny, nz, iter, iterCpu,
                    fourFft, fft[1], iter / fourFft, iterCpu / fft[1], live[0] / 1048576.0, live[0] / (4.0 * grid));
            p = null;
            System.gc();
            System.gc();
            base[0] = used();
            DeconvolutionProblem pa = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                    Camera.of(1, 0, 0), 10, w);
            new RichardsonLucy(Stopping.fixed(2), true).solve(pa, RunContext.quiet(threads), (k, max, obj, ch) -> {
                if (k == 2) {
                    System.gc();
                    live[0] = used() - base[0];
                }
            });
            pa = null;
            System.out.printf(Locale.ROOT, "%s: live heap during accelerated RL %.0f MiB = %.2f x the padded float volume%n",
                    label, live[0] / 1048576.0, live[0] / (4.0 * grid));
            System.gc();
            if (python) {
                Path img = tmp.resolve("bench-image.raw");
                Path ps = tmp.resolve("bench-psf.raw");
                writeRaw(data.data(), img);
                writeRaw(psf.data(), ps);
                List<String> out = runPython("periter", img, size, ps, psfSize, Integer.toString(reps));
                for (String line : out) {
                    if (line.startsWith("periter")) {
                        double theirs = Double.parseDouble(line.split(" ")[1]);
                        double theirsCpu = Double.parseDouble(line.split(" ")[2]);
                        System.out.printf(Locale.ROOT, "%s: reference library RL iteration %.3f s wall, %.3f s CPU (%s); "
                                + "ours %.3f s wall, %.3f s CPU (all threads): ours %.2fx faster in wall time (goal >= 3), "
                                + "%.2fx in CPU time%n", label, theirs, theirsCpu, out.get(0), iter, iterCpu, theirs / iter,
                                theirsCpu / iterCpu);
                    }
                }
                Files.deleteIfExists(img);
            }
        }
    }

    /**
     * @return the shortest wall time of forward + inverse + forward + inverse at the grid size, and the mean CPU
     *     time (all threads) of the same (arrays freed after)
     */
    private static double[] fourFfts(int nx, int ny, int nz, Workers w, int reps) {
        RealFft3D fft = new RealFft3D(nx, ny, nz, w);
        float[] a = new float[nx * ny * nz];
        float[] spec = fft.newSpectrum();
        for (int i = 0; i < a.length; i++) {
            a[i] = i % 7;
        }
        double best = Double.POSITIVE_INFINITY;
        long c0 = 0;
        for (int k = 0; k < reps + 1; k++) {
            if (k == 1) {
                c0 = processCpu();
            }
            long t0 = System.nanoTime();
            fft.forward(a, spec);
            fft.inverse(spec, a);
            fft.forward(a, spec);
            fft.inverse(spec, a);
            double t = (System.nanoTime() - t0) * 1e-9;
            if (k > 0) {
                best = Math.min(best, t);
            }
        }
        return new double[] {best, (processCpu() - c0) * 1e-9 / reps};
    }

    private static void timeToBest(int threads, Path tmp, boolean python) throws Exception {
        Path images = Paths.get("test-images");
        Volume data = TiffFiles.read(images.resolve("demo-cells.tif"), "demo");
        Volume truth = TiffFiles.read(images.resolve("demo-cells-truth.tif"), "demo");
        Volume psf = TiffFiles.read(images.resolve("demo-psf.tif"), "demo");
        double offset = 100;
        double background = 10;
        if (!python) {
            System.out.println("time to best NRMSE: skipped (no /usr/bin/python3 with scikit-image)");
            return;
        }
        // the reference library has no background or offset term: it gets the data minus offset and background,
        // clipped at 0 (what a user of it would do)
        float[] pre = data.data().clone();
        for (int i = 0; i < pre.length; i++) {
            pre[i] = (float) Math.max(0, pre[i] - offset - background);
        }
        Path img = tmp.resolve("demo-image.raw");
        Path ps = tmp.resolve("demo-psf.raw");
        Path tr = tmp.resolve("demo-truth.raw");
        writeRaw(pre, img);
        writeRaw(psf.data(), ps);
        writeRaw(truth.data(), tr);
        int[] size = {data.width(), data.height(), data.depth()};
        List<String> out = runPython("best", img, size, ps, new int[] {psf.width(), psf.height(), psf.depth()},
                tr.toString(), "2,4,6,8,10,15,20,30,40,60");
        double bestE = Double.POSITIVE_INFINITY;
        double bestT = 0;
        double bestCpu = 0;
        int bestK = 0;
        for (String line : out) {
            if (line.startsWith("run ")) {
                String[] f = line.split(" ");
                double e = Double.parseDouble(f[3]);
                if (e < bestE) {
                    bestE = e;
                    bestT = Double.parseDouble(f[2]);
                    bestCpu = Double.parseDouble(f[4]);
                    bestK = Integer.parseInt(f[1]);
                }
            }
        }
        System.out.printf(Locale.ROOT, "demo 128x128x32: reference library plain RL best NRMSE %.4f at %d iterations, "
                + "%.2f s wall, %.2f s CPU%n", bestE, bestK, bestT, bestCpu);
        DeconvolutionSettings s = new DeconvolutionSettings("richardson-lucy", new Stopping(StopRule.NOISE, 200, 1e-3),
                offset, background, 1, 2, Double.NaN, "extended", true, "poisson");
        // first pass: find the first iteration that reaches the target (NRMSE computed outside the timing)
        List<Double> nrmse = new ArrayList<>();
        Deconvolution.Outcome o = Deconvolution.run(data, psf, "demo-psf.tif", null, s, RunContext.quiet(threads),
                IterationListener.NONE);
        double ourFinal = Nrmse.of(o.result().data(), truth.data());
        int reach = -1;
        for (int k = 1; k <= o.solution().iterations() && reach < 0; k++) {
            Deconvolution.Outcome ok = Deconvolution.run(data, psf, "demo-psf.tif", null,
                    s.withStopping(Stopping.fixed(k)), RunContext.quiet(threads), IterationListener.NONE);
            double e = Nrmse.of(ok.result().data(), truth.data());
            nrmse.add(e);
            if (e <= bestE) {
                reach = k;
            }
        }
        long t0 = System.nanoTime();
        Deconvolution.run(data, psf, "demo-psf.tif", null, s, RunContext.quiet(threads), IterationListener.NONE);
        double full = (System.nanoTime() - t0) * 1e-9;
        System.out.printf(Locale.ROOT, "demo: ours accelerated + noise stop: %d iterations, %.2f s including set-up, "
                + "NRMSE %.4f (%s)%n", o.solution().iterations(), full, ourFinal, o.solution().stopReason());
        if (reach > 0) {
            t0 = System.nanoTime();
            long c0 = processCpu();
            Deconvolution.run(data, psf, "demo-psf.tif", null, s.withStopping(Stopping.fixed(reach)),
                    RunContext.quiet(threads), IterationListener.NONE);
            double t = (System.nanoTime() - t0) * 1e-9;
            double c = (processCpu() - c0) * 1e-9;
            System.out.printf(Locale.ROOT, "demo: ours reaches the reference best NRMSE %.4f at iteration %d in %.2f s wall, "
                    + "%.2f s CPU: %.1fx shorter in wall time (goal >= 8), %.1fx less CPU; with the noise stop it runs "
                    + "%.2f s: %.1fx shorter%n", bestE, reach, t, c, bestT / t, bestCpu / c, full, bestT / full);
        } else {
            System.out.printf(Locale.ROOT, "demo: ours did not reach the reference best NRMSE %.4f before the noise stop "
                    + "(NRMSE per iteration %s)%n", bestE, nrmse);
        }
    }

    private static List<String> runPython(String mode, Path img, int[] size, Path psf, int psfSize, String last)
            throws IOException, InterruptedException {
        return runPython(mode, img, size, psf, new int[] {psfSize, psfSize, psfSize}, last, null);
    }

    private static List<String> runPython(String mode, Path img, int[] size, Path psf, int[] ps, String third,
            String fourth) throws IOException, InterruptedException {
        List<String> cmd = new ArrayList<>(List.of(PYTHON, SCRIPT.toString(), mode, img.toString(),
                "" + size[2], "" + size[1], "" + size[0], psf.toString(), "" + ps[2], "" + ps[1], "" + ps[0], third));
        if (fourth != null) {
            cmd.add(fourth);
        }
        Process pr = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        List<String> lines = new ArrayList<>();
        try (BufferedReader b = new BufferedReader(new InputStreamReader(pr.getInputStream()))) {
            String l;
            while ((l = b.readLine()) != null) {
                lines.add(l);
            }
        }
        if (!pr.waitFor(60, TimeUnit.MINUTES)) {
            pr.destroy();
        }
        return lines;
    }

    private static void writeRaw(float[] a, Path p) throws IOException {
        ByteBuffer b = ByteBuffer.allocate(4 * a.length).order(ByteOrder.LITTLE_ENDIAN);
        b.asFloatBuffer().put(a);
        try (FileChannel c = FileChannel.open(p, StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.TRUNCATE_EXISTING)) {
            c.write(b);
        }
    }

    /** @return CPU time of this process (all threads), nanoseconds */
    private static long processCpu() {
        return ((com.sun.management.OperatingSystemMXBean) java.lang.management.ManagementFactory
                .getOperatingSystemMXBean()).getProcessCpuTime();
    }

    private static long used() {
        Runtime rt = Runtime.getRuntime();
        return rt.totalMemory() - rt.freeMemory();
    }
}
