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
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
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
 * <li>for 64x256x256 and 128x512x512 with a 31^3 PSF (extended boundary), on each FFT engine (java, and native
 * where it loads) with 1 and all threads: one Richardson-Lucy iteration against the 4 FFTs it needs at the padded
 * size (ratio, goal &lt;= 1.2), and the reference library's RL per-iteration time on the same data (ratio, goal
 * ours &gt;= 3x faster), when /usr/bin/python3 has scikit-image;</li>
 * <li>live heap (and native memory) during plain and accelerated RL against the float size of the padded volume
 * (goal &lt;= 6x);</li>
 * <li>the transform alone: our native round trip against FFTW through pyFFTW (Debian python3-pyfftw) at the same
 * thread count and planning (goal ours &lt;= 1.25x), with each side's planning time;</li>
 * <li>on the bundled demo stack (invented truth known): the reference library's best NRMSE over a range of
 * iteration counts, and the time ours (accelerated, noise stop, standard engine) needs to reach that NRMSE (goal
 * &gt;= 4x shorter), with a run's phases: {@link DemoTimeToBest} (what each side's time includes).</li>
 * </ol>
 * Run from the repository root after {@code mvn -q -DskipTests package test-compile}:
 * {@code java -Xmx12g -cp target/stackwright.jar:target/test-classes org.stackwright.solve.DeconvolutionBenchmark [--small-only]}
 * (or {@code BENCH_JAVA_OPTS=-Xmx14g tools/benchmark.sh org.stackwright.solve.DeconvolutionBenchmark}); {@code
 * --memory-only} prints only the memory rows, {@code --demo-only} only the demo stack's.
 */
public final class DeconvolutionBenchmark {

    private static final String PYTHON = "/usr/bin/python3";
    private static final Path SCRIPT = Paths.get("tools", "benchmark", "skimage_rl.py");
    private static final Path PYFFTW = Paths.get("tools", "benchmark", "pyfftw_roundtrip.py");

    private DeconvolutionBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        boolean smallOnly = Arrays.asList(args).contains("--small-only");
        boolean demoOnly = Arrays.asList(args).contains("--demo-only");
        boolean memoryOnly = Arrays.asList(args).contains("--memory-only");
        int threads = Runtime.getRuntime().availableProcessors();
        System.out.printf(Locale.ROOT, "machine: %s %s, %d cores, Java %s, max heap %.1f GiB, threads %d%n",
                System.getProperty("os.name"), System.getProperty("os.arch"), threads,
                System.getProperty("java.version"), Runtime.getRuntime().maxMemory() / 1073741824.0, threads);
        Path tmp = Files.createTempDirectory("stackwright-bench");
        boolean python = Files.isExecutable(Paths.get(PYTHON)) && Files.exists(SCRIPT);
        // measured plans must be measured here, not read from an earlier run's wisdom; RL runs use estimated plans
        System.setProperty("stackwright.cache", tmp.resolve("cache").toString());
        System.setProperty("stackwright.fft.planning", "estimate");
        System.out.printf(Locale.ROOT, "load average at start: %s%n", loadAverage());
        if (memoryOnly) {
            memory(new int[] {256, 256, 64}, 31, threads);
            if (!smallOnly) {
                memory(new int[] {512, 512, 128}, 31, threads);
            }
            return;
        }
        if (!demoOnly) {
            iterationCost(new int[] {256, 256, 64}, 31, threads, tmp, python, 3);
            if (python) {
                transformAlone(288, 288, 96, threads, 5);
            }
        }
        if (!smallOnly && !demoOnly) {
            iterationCost(new int[] {512, 512, 128}, 31, threads, tmp, python, 2);
            if (python) {
                transformAlone(576, 576, 160, threads, 3);
            }
        }
        DemoTimeToBest.run(threads, tmp, python);
    }

    private static void iterationCost(int[] size, int psfSize, int threads, Path tmp, boolean python, int reps)
            throws Exception {
        Volume[] dp = benchData(size, psfSize);
        Volume data = dp[0];
        Volume psf = dp[1];
        String label = size[0] + "x" + size[1] + "x" + size[2];
        int nx = org.stackwright.fft.Convolution.paddedSize(size[0], psfSize);
        int ny = org.stackwright.fft.Convolution.paddedSize(size[1], psfSize);
        int nz = org.stackwright.fft.Convolution.paddedSize(size[2], psfSize);
        long grid = (long) nx * ny * nz;
        System.out.printf(Locale.ROOT, "%s, PSF %d^3, grid %dx%dx%d%n", label, psfSize, nx, ny, nz);
        Map<String, Double> rlTwoThreads = new LinkedHashMap<>();
        double passBytes = passBytesPerVoxel(nx, ny, nz, size);
        for (int t : threadCounts(threads)) {
            try (Workers w = new Workers(t)) {
                double bw = triadBandwidth((int) grid, w, 5);
                System.out.printf(Locale.ROOT, "  memory bandwidth, %d thread(s): %.1f GB/s (STREAM-like triad a = b + s c "
                        + "over 3 arrays of %d floats, 12 bytes per element, best of 5); the element-wise passes of one "
                        + "plain RL iteration move about %.0f bytes per grid voxel outside the FFTs: %.3f s at this "
                        + "bandwidth%n", t, bw / 1e9, grid, passBytes, passBytes * grid / bw);
            }
        }
        for (FftEngine engine : engines()) {
            for (int t : threadCounts(threads)) {
                try (Workers w = new Workers(t)) {
                    double[] fft = fourFfts(engine, nx, ny, nz, w, reps);
                    double[] rl = rlIteration(data, psf, engine, w, reps);
                    System.out.printf(Locale.ROOT, "  %s engine, %d thread(s): RL iteration %.3f s wall / %.3f s CPU, "
                            + "4 FFTs %.3f s wall / %.3f s CPU, ratio %.2f wall / %.2f CPU (goal <= 1.2)%n",
                            engine.name(), t, rl[0], rl[1], fft[0], fft[1], rl[0] / fft[0], rl[1] / fft[1]);
                    if (t == threads) {
                        rlTwoThreads.put(engine.name(), rl[0]);
                    }
                }
            }
        }
        memoryRows(data, psf, grid, threads);
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
                    System.out.printf(Locale.ROOT, "  reference library RL iteration %.3f s wall, %.3f s CPU (%s)%n",
                            theirs, theirsCpu, out.get(0));
                    rlTwoThreads.forEach((engine, ours) -> System.out.printf(Locale.ROOT, "  %s engine, %d threads: "
                            + "ours %.2fx faster per iteration (goal >= 3)%n", engine, threads, theirs / ours));
                }
            }
            Files.deleteIfExists(img);
        }
    }

    /**
     * The bytes per grid voxel that the element-wise passes of one plain Richardson-Lucy iteration read and write in
     * main memory, outside the four transforms (native engine; the Java engine's are the same less the padding),
     * counted from the code: the spectrum product of each of the two filterings reads and writes the spectrum and
     * reads the transfer function (3 x 4 bytes per padded voxel, twice); the ratio pass reads and writes the grid
     * (2 x 4, padded) and reads the data (4 per image voxel); the update reads and writes the grid (2 x 4, padded),
     * reads and writes the estimate and reads H^T w (3 x 4). Not counted: write-allocate reads of written lines.
     */
    static double passBytesPerVoxel(int nx, int ny, int nz, int[] image) {
        double padded = 2.0 * (nx / 2 + 1) / nx;
        double dataShare = (double) image[0] * image[1] * image[2] / ((double) nx * ny * nz);
        return 2 * 12 * padded + 8 * padded + 4 * dataShare + 8 * padded + 12;
    }

    /**
     * STREAM-like triad (McCalpin, "Memory bandwidth and machine balance in current high performance computers",
     * IEEE TCCA Newsletter, 1995): a = b + s c over three float arrays of n values, split over the threads.
     *
     * @return the best rate in bytes per second, counting 12 bytes per element as STREAM does
     */
    static double triadBandwidth(int n, Workers w, int reps) {
        float[] a = new float[n];
        float[] b = new float[n];
        float[] c = new float[n];
        w.forRange(n, (from, to) -> {
            for (int i = from; i < to; i++) {
                b[i] = i % 13;
                c[i] = i % 7;
            }
        });
        double best = Double.POSITIVE_INFINITY;
        for (int k = 0; k < reps + 1; k++) {
            float s = 0.5f + k;
            long t0 = System.nanoTime();
            w.forRange(n, (from, to) -> triad(a, b, c, s, from, to));
            double t = (System.nanoTime() - t0) * 1e-9;
            if (k > 0) {
                best = Math.min(best, t);
            }
        }
        return 12.0 * n / best;
    }

    private static void triad(float[] a, float[] b, float[] c, float s, int from, int to) {
        for (int i = from; i < to; i++) {
            a[i] = b[i] + s * c[i];
        }
    }

    /** The memory rows alone for one size (same data and PSF as {@link #iterationCost}). */
    private static void memory(int[] size, int psfSize, int threads) throws Exception {
        Volume[] dp = benchData(size, psfSize);
        long grid = (long) org.stackwright.fft.Convolution.paddedSize(size[0], psfSize)
                * org.stackwright.fft.Convolution.paddedSize(size[1], psfSize)
                * org.stackwright.fft.Convolution.paddedSize(size[2], psfSize);
        System.out.printf(Locale.ROOT, "%dx%dx%d, PSF %d^3, %d grid voxels%n", size[0], size[1], size[2], psfSize, grid);
        memoryRows(dp[0], dp[1], grid, threads);
    }

    private static void memoryRows(Volume data, Volume psf, long grid, int threads) throws Exception {
        for (FftEngine engine : engines()) {
            try (Workers w = new Workers(threads)) {
                for (boolean accelerated : new boolean[] {false, true}) {
                    long[] mem = liveMemory(data, psf, engine, w, accelerated);
                    System.out.printf(Locale.ROOT, "  %s engine: during %s RL live heap %.0f MiB = %.2f x the padded float "
                            + "volume, native memory %.0f MiB, together %.2f x (goal <= 6)%n", engine.name(),
                            accelerated ? "accelerated" : "plain", mem[0] / 1048576.0, mem[0] / (4.0 * grid),
                            mem[1] / 1048576.0, (mem[0] + mem[1]) / (4.0 * grid));
                }
            }
        }
    }

    /** @return the benchmark's data (uniform random 50 to 150, seed 1) and Gaussian PSF */
    private static Volume[] benchData(int[] size, int psfSize) {
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.2);
        Volume psf = GaussianPsf.sampled(0.2, 0.5, voxel, psfSize, psfSize, psfSize);
        Volume data = Volume.zeros(size[0], size[1], size[2], voxel);
        SplittableRandom r = new SplittableRandom(1);
        float[] d = data.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (50 + 100 * r.nextDouble());
        }
        return new Volume[] {data, psf};
    }

    /** One forward + inverse transform alone: our native engine against pyFFTW, each planned both ways. */
    private static void transformAlone(int nx, int ny, int nz, int threads, int reps) throws Exception {
        if (engines().size() < 2) {
            System.out.println("  transform alone: no native engine here");
            return;
        }
        for (int t : threadCounts(threads)) {
            Map<String, double[]> ours = new LinkedHashMap<>();
            for (String planning : new String[] {"estimate", "measure"}) {
                Object[] o = (Object[]) Class.forName("org.stackwright.fft.fftw.FftwTiming")
                        .getMethod("roundTrip", int.class, int.class, int.class, int.class, String.class, int.class)
                        .invoke(null, nx, ny, nz, t, planning, reps);
                ours.put(planning, new double[] {(Double) o[0], (Double) o[1]});
            }
            List<String> py = runCommand(List.of(PYTHON, PYFFTW.toString(), "" + nz, "" + ny, "" + nx, "" + t, "" + reps));
            for (String line : py) {
                if (line.startsWith("roundtrip")) {
                    String[] f = line.split(" ");
                    String planning = f[1].equals("FFTW_MEASURE") ? "measure" : "estimate";
                    double[] o = ours.get(planning);
                    double theirs = Double.parseDouble(f[3]);
                    System.out.printf(Locale.ROOT, "  transform alone %dx%dx%d, %d thread(s), %s plans: ours %.3f s "
                            + "(planning %.2f s), %s %.3f s (planning %.2f s): ours / theirs %.2f (goal <= 1.25)%n",
                            nx, ny, nz, t, planning, o[1], o[0], py.get(0), theirs, Double.parseDouble(f[2]), o[1] / theirs);
                }
            }
        }
    }

    private static int[] threadCounts(int threads) {
        return threads > 1 ? new int[] {1, threads} : new int[] {1};
    }

    /** @return the Java engine and, where it loads, the native engine */
    private static List<FftEngine> engines() {
        List<FftEngine> e = new ArrayList<>(List.of(FftEngines.java()));
        try {
            e.add(FftEngines.choose("native").engine());
        } catch (IllegalArgumentException notHere) {
            // the Java engine only
        }
        return e;
    }

    /** @return {best wall seconds, mean CPU seconds} of one plain RL iteration after the first */
    private static double[] rlIteration(Volume data, Volume psf, FftEngine engine, Workers w, int reps) {
        DeconvolutionProblem p = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                Camera.of(1, 0, 0), 10, w, engine);
        long[] stamps = new long[reps + 2];
        long[] cpu = new long[reps + 2];
        new RichardsonLucy(Stopping.fixed(reps + 1), false).solve(p, RunContext.quiet(w.threads()).withFft(engine),
                (k, max, obj, ch) -> {
                    stamps[k] = System.nanoTime();
                    cpu[k] = processCpu();
                });
        double iter = Double.POSITIVE_INFINITY;
        for (int k = 2; k <= reps + 1; k++) {
            iter = Math.min(iter, (stamps[k] - stamps[k - 1]) * 1e-9);
        }
        return new double[] {iter, (cpu[reps + 1] - cpu[1]) * 1e-9 / reps};
    }

    /** @return {live heap bytes, native bytes (JavaCPP)} during the second iteration of RL */
    private static long[] liveMemory(Volume data, Volume psf, FftEngine engine, Workers w, boolean accelerated)
            throws Exception {
        settle();
        long base = used();
        long nativeBase = nativeBytes();
        long[] live = new long[2];
        DeconvolutionProblem p = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                Camera.of(1, 0, 0), 10, w, engine);
        new RichardsonLucy(Stopping.fixed(2), accelerated).solve(p, RunContext.quiet(w.threads()).withFft(engine),
                (k, max, obj, ch) -> {
                    if (k == 2) {
                        settle();
                        live[0] = used() - base;
                        live[1] = nativeBytes() - nativeBase;
                    }
                });
        return live;
    }

    /**
     * Collects garbage and lets JavaCPP free the native buffers of transforms no longer reachable (it frees them
     * after a collection, from a queue), so that native memory counts only live buffers.
     */
    private static void settle() {
        for (int i = 0; i < 3; i++) {
            System.gc();
            try {
                Class.forName("org.bytedeco.javacpp.Pointer").getMethod("deallocateReferences").invoke(null);
                Thread.sleep(100);
            } catch (ReflectiveOperationException | LinkageError e) {
                return; // no JavaCPP: nothing native to settle
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                return;
            }
        }
    }

    /** @return bytes JavaCPP has allocated (the native engine's buffers), 0 without FFTW */
    private static long nativeBytes() {
        try {
            return (Long) Class.forName("org.bytedeco.javacpp.Pointer").getMethod("totalBytes").invoke(null);
        } catch (ReflectiveOperationException | LinkageError e) {
            return 0;
        }
    }

    /**
     * @return the shortest wall time of forward + inverse + forward + inverse at the grid size on the engine (the
     *     Java engine out of place as a solver's transforms; the native one in place without copies), and the mean
     *     CPU time (all threads) of the same (arrays freed after)
     */
    private static double[] fourFfts(FftEngine engine, int nx, int ny, int nz, Workers w, int reps) throws Exception {
        if (!engine.name().equals(FftEngines.JAVA_NAME)) {
            long c0 = processCpu();
            Object[] o = (Object[]) Class.forName("org.stackwright.fft.fftw.FftwTiming")
                    .getMethod("roundTrip", int.class, int.class, int.class, int.class, String.class, int.class)
                    .invoke(null, nx, ny, nz, w.threads(), "estimate", reps);
            double cpu = (processCpu() - c0) * 1e-9 / (reps + 1) * 2;
            return new double[] {2 * (Double) o[1], cpu};
        }
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

    private static List<String> runPython(String mode, Path img, int[] size, Path psf, int psfSize, String last)
            throws IOException, InterruptedException {
        return runPython(mode, img, size, psf, new int[] {psfSize, psfSize, psfSize}, last, null);
    }

    static List<String> runPython(String mode, Path img, int[] size, Path psf, int[] ps, String third,
            String fourth) throws IOException, InterruptedException {
        List<String> cmd = new ArrayList<>(List.of(PYTHON, SCRIPT.toString(), mode, img.toString(),
                "" + size[2], "" + size[1], "" + size[0], psf.toString(), "" + ps[2], "" + ps[1], "" + ps[0], third));
        if (fourth != null) {
            cmd.add(fourth);
        }
        return runCommand(cmd);
    }

    private static List<String> runCommand(List<String> cmd) throws IOException, InterruptedException {
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

    static void writeRaw(float[] a, Path p) throws IOException {
        ByteBuffer b = ByteBuffer.allocate(4 * a.length).order(ByteOrder.LITTLE_ENDIAN);
        b.asFloatBuffer().put(a);
        try (FileChannel c = FileChannel.open(p, StandardOpenOption.CREATE, StandardOpenOption.WRITE,
                StandardOpenOption.TRUNCATE_EXISTING)) {
            c.write(b);
        }
    }

    /** @return CPU time of this process (all threads), nanoseconds */
    static long processCpu() {
        return ((com.sun.management.OperatingSystemMXBean) java.lang.management.ManagementFactory
                .getOperatingSystemMXBean()).getProcessCpuTime();
    }

    private static String loadAverage() {
        try {
            return Files.readString(Paths.get("/proc/loadavg")).trim();
        } catch (IOException e) {
            return "unknown";
        }
    }

    private static long used() {
        Runtime rt = Runtime.getRuntime();
        return rt.totalMemory() - rt.freeMemory();
    }
}
