package org.stackwright.fft;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

import org.jtransforms.fft.FloatFFT_3D;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Speed of the FFT engine (a benchmark, not a test). For each image size with a 31x31x31 PSF it prints:
 * <ol>
 * <li>the limit: one forward + inverse real FFT at the zero-padded size (what one blur costs at least);</li>
 * <li>one convolution through {@link Convolver} on that grid, and its ratio to the limit (goal: at most 1.1);</li>
 * <li>at equal sizes: our half-spectrum {@link RealFft3D} against JTransforms' own 3D transforms,
 * {@code FloatFFT_3D.realForward} (packed, power-of-two sizes only) and {@code realForwardFull}, each checked by
 * its round-trip error and, for the full form, by its spectrum against ours.</li>
 * </ol>
 * With {@code --scipy} it also runs {@code tools/reference/fft_benchmark.py} (SciPy's pocketfft, same thread
 * count) on the same sizes and prints our time as a ratio of SciPy's.
 *
 * <p>Run: {@code mvn -B -q -DskipTests package && java -Xmx8g -cp target/stackwright.jar
 * org.stackwright.fft.FftBenchmark [--threads N] [--repeats N] [--scipy] [--small | --size WxHxD]}
 * (with {@code --threads 1} the CPU times are the calling thread's, exact to the nanosecond).
 */
public final class FftBenchmark {

    private static final int PSF = 31;

    private FftBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        int threads = Runtime.getRuntime().availableProcessors();
        int repeats = 5;
        boolean scipy = false;
        List<int[]> sizes = new ArrayList<>(List.of(new int[] {256, 256, 64}, new int[] {512, 512, 128}));
        for (int i = 0; i < args.length; i++) {
            switch (args[i]) {
                case "--threads" -> threads = Integer.parseInt(args[++i]);
                case "--repeats" -> repeats = Integer.parseInt(args[++i]);
                case "--scipy" -> scipy = true;
                case "--small" -> sizes = List.of(new int[] {128, 128, 32});
                case "--size" -> {
                    String[] d = args[++i].split("x");
                    sizes = List.of(new int[] {Integer.parseInt(d[0]), Integer.parseInt(d[1]), Integer.parseInt(d[2])});
                }
                default -> throw new IllegalArgumentException("unknown option " + args[i]
                        + "; allowed --threads N, --repeats N, --scipy, --small, --size WxHxD");
            }
        }
        org.visnow.jlargearrays.ConcurrencyUtils.setNumberOfThreads(threads);
        singleThread = threads == 1;
        System.out.printf(Locale.ROOT, "FFT benchmark: %d threads, %d cores, Java %s, max heap %d MiB, median of %d;"
                + " load average at start %.1f%n", threads, Runtime.getRuntime().availableProcessors(),
                System.getProperty("java.version"), Runtime.getRuntime().maxMemory() >> 20, repeats,
                ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
        try (Workers w = new Workers(threads)) {
            for (int[] s : sizes) {
                convolutionAgainstLimit(s, w, repeats, scipy);
                transformsAtEqualSize(s, w, repeats);
            }
        }
    }

    /** Times one FFT round trip at the padded size and one convolution through the engine on that grid. */
    static void convolutionAgainstLimit(int[] s, Workers w, int repeats, boolean scipy) throws Exception {
        int px = Convolution.paddedSize(s[0], PSF);
        int py = Convolution.paddedSize(s[1], PSF);
        int pz = Convolution.paddedSize(s[2], PSF);
        Volume psf = GaussianPsf.sampled(1.5, 3, VoxelSize.UNIT, PSF, PSF, PSF);
        float[] grid = random(px * py * pz, 1);
        RealFft3D fft = new RealFft3D(px, py, pz, w);
        float[] spec = fft.newSpectrum();
        float[] back = new float[grid.length];
        Convolver c = new Convolver(psf, px, py, pz, w);
        // the two are measured alternately, so that a change in machine load hits both alike
        Timing[] t = medians(repeats, () -> {
            fft.forward(grid, spec);
            fft.inverse(spec, back);
        }, () -> c.convolve(grid, back));
        Timing roundTrip = t[0];
        Timing conv = t[1];
        System.out.printf(Locale.ROOT, "%nimage %dx%dx%d, PSF %d^3, padded grid %dx%dx%d (%s)%n", s[0], s[1], s[2],
                PSF, px, py, pz, FastSizes.isFast(px) && FastSizes.isFast(py) && FastSizes.isFast(pz)
                        ? "2^a 3^b 5^c" : "not all fast");
        System.out.printf(Locale.ROOT, "  limit: one real FFT forward + inverse  %s%n", roundTrip);
        System.out.printf(Locale.ROOT, "  one convolution through Convolver      %s   ratio %.3f (cpu %.3f; goal <= 1.1)%n",
                conv, conv.wall() / roundTrip.wall(), conv.cpu() / roundTrip.cpu());
        if (scipy) {
            double[] ref = scipyRoundTrip(px, py, pz, w.threads());
            if (ref != null) {
                System.out.printf(Locale.ROOT, "  SciPy rfftn + irfftn, same grid        %8.1f ms (cpu %8.1f ms)   ours/SciPy %.2f (cpu %.2f)%n",
                        ref[0], ref[1], roundTrip.wall() / ref[0], roundTrip.cpu() / ref[1]);
            }
        }
    }

    /** Ours against JTransforms' packed and full 3D real transforms at one size, checked for correctness. */
    static void transformsAtEqualSize(int[] s, Workers w, int repeats) {
        int nx = s[0];
        int ny = s[1];
        int nz = s[2];
        int n = nx * ny * nz;
        float[] data = random(n, 2);
        RealFft3D ours = new RealFft3D(nx, ny, nz, w);
        float[] spec = ours.newSpectrum();
        float[] back = new float[n];
        FloatFFT_3D jt = new FloatFFT_3D(nz, ny, nx);
        boolean pow2 = Integer.bitCount(nx) == 1 && Integer.bitCount(ny) == 1 && Integer.bitCount(nz) == 1;
        float[] packed = new float[n];
        float[] full = new float[2 * n];
        Runnable runOurs = () -> {
            ours.forward(data, spec);
            ours.inverse(spec, back);
        };
        Runnable runPacked = () -> {
            System.arraycopy(data, 0, packed, 0, n);
            jt.realForward(packed);
            jt.realInverse(packed, true);
        };
        Runnable runFull = () -> {
            System.arraycopy(data, 0, full, 0, n);
            jt.realForwardFull(full);
            jt.complexInverse(full, true);
        };
        Timing[] t = pow2 ? medians(repeats, runOurs, runPacked, runFull) : medians(repeats, runOurs, runFull);
        Timing tOurs = t[0];
        Timing tFull = t[t.length - 1];
        System.out.printf(Locale.ROOT, "  at equal size %dx%dx%d, forward + inverse:%n", nx, ny, nz);
        runOurs.run();
        System.out.printf(Locale.ROOT, "    half spectrum (RealFft3D, ours)    %s   round-trip error %.1e%n",
                tOurs, relError(data, back, n));
        if (pow2) {
            runPacked.run();
            System.out.printf(Locale.ROOT, "    JTransforms realForward (packed)   %s   round-trip error %.1e   ours/packed %.2f (cpu %.2f)%n",
                    t[1], relError(data, packed, n), tOurs.wall() / t[1].wall(), tOurs.cpu() / t[1].cpu());
        } else {
            System.out.println("    JTransforms realForward (packed)   needs power-of-two sizes: not applicable");
        }
        runFull.run();
        float[] re = new float[n];
        for (int i = 0; i < n; i++) {
            re[i] = full[2 * i];
        }
        double roundTripFull = relError(data, re, n);
        ours.forward(data, spec);
        System.arraycopy(data, 0, full, 0, n);
        Arrays.fill(full, n, 2 * n, 0f);
        jt.realForwardFull(full);
        System.out.printf(Locale.ROOT, "    JTransforms realForwardFull        %s   round-trip error %.1e   ours/full %.2f (cpu %.2f)   spectra differ by %.1e%n",
                tFull, roundTripFull, tOurs.wall() / tFull.wall(), tOurs.cpu() / tFull.cpu(),
                spectrumDifference(spec, full, nx, ny, nz));
    }

    /** @return max |ours - full| / max |full| over the half spectrum kx = 0 .. nx/2 */
    static double spectrumDifference(float[] half, float[] full, int nx, int ny, int nz) {
        int hx = nx / 2 + 1;
        double err = 0;
        double scale = 0;
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < hx; x++) {
                    int h = 2 * ((z * ny + y) * hx + x);
                    int f = 2 * ((z * ny + y) * nx + x);
                    for (int c = 0; c < 2; c++) {
                        err = Math.max(err, Math.abs(half[h + c] - full[f + c]));
                        scale = Math.max(scale, Math.abs(full[f + c]));
                    }
                }
            }
        }
        return err / scale;
    }

    private static double relError(float[] a, float[] b, int n) {
        double err = 0;
        double scale = 0;
        for (int i = 0; i < n; i++) {
            err = Math.max(err, Math.abs(a[i] - b[i]));
            scale = Math.max(scale, Math.abs(a[i]));
        }
        return err / scale;
    }

    private static float[] random(int n, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] f = new float[n];
        for (int i = 0; i < n; i++) {
            f[i] = (float) r.nextDouble();
        }
        return f;
    }

    /** Median wall-clock time and median process CPU time (all threads, GC included) of one run, milliseconds. */
    record Timing(double wall, double cpu) {
        @Override
        public String toString() {
            return String.format(Locale.ROOT, "%8.1f ms (cpu %8.1f ms)", wall, cpu);
        }
    }

    /** @return the medians of repeats runs, after three untimed warm-up runs (JIT compilation) */
    static Timing median(int repeats, Runnable r) {
        return medians(repeats, r)[0];
    }

    /**
     * Times several tasks, alternating between them run by run, after three untimed warm-up runs of each (JIT).
     *
     * @return the median timing of each task, in order
     */
    static Timing[] medians(int repeats, Runnable... tasks) {
        for (int i = 0; i < 3; i++) {
            for (Runnable r : tasks) {
                r.run();
            }
        }
        double[][] wall = new double[tasks.length][repeats];
        double[][] cpu = new double[tasks.length][repeats];
        for (int i = 0; i < repeats; i++) {
            for (int k = 0; k < tasks.length; k++) {
                long c0 = cpuNanos();
                long t0 = System.nanoTime();
                tasks[k].run();
                wall[k][i] = (System.nanoTime() - t0) * 1e-6;
                cpu[k][i] = (cpuNanos() - c0) * 1e-6;
            }
        }
        Timing[] out = new Timing[tasks.length];
        for (int k = 0; k < tasks.length; k++) {
            Arrays.sort(wall[k]);
            Arrays.sort(cpu[k]);
            out[k] = new Timing(wall[k][repeats / 2], cpu[k][repeats / 2]);
        }
        return out;
    }

    /** Set for one thread: all work then runs on the calling thread, whose CPU clock is exact to the nanosecond. */
    private static boolean singleThread;

    /**
     * CPU time in ns: of the calling thread when {@link #singleThread} (fine resolution), else of the whole process
     * (all threads and the garbage collector; about 10 ms resolution on Linux).
     */
    private static long cpuNanos() {
        if (singleThread) {
            return ManagementFactory.getThreadMXBean().getCurrentThreadCpuTime();
        }
        return ((com.sun.management.OperatingSystemMXBean) ManagementFactory.getOperatingSystemMXBean())
                .getProcessCpuTime();
    }

    /** Runs the SciPy script beside this benchmark; null (with a note) when Python or SciPy is missing. */
    private static double[] scipyRoundTrip(int nx, int ny, int nz, int threads) throws IOException, InterruptedException {
        Path script = Paths.get("tools", "reference", "fft_benchmark.py");
        if (!Files.exists(script)) {
            System.out.println("  (SciPy comparison skipped: run from the repository root)");
            return null;
        }
        ProcessBuilder pb = new ProcessBuilder("python3", script.toString(), String.valueOf(nx), String.valueOf(ny),
                String.valueOf(nz), String.valueOf(threads)).redirectErrorStream(true);
        Process p = pb.start();
        String last = null;
        try (BufferedReader in = new BufferedReader(new InputStreamReader(p.getInputStream(), StandardCharsets.UTF_8))) {
            for (String line; (line = in.readLine()) != null;) {
                last = line;
            }
        }
        if (p.waitFor() != 0 || last == null) {
            System.out.println("  (SciPy comparison failed: " + last + ")");
            return null;
        }
        String[] f = last.trim().split("\\s+");
        return new double[] {Double.parseDouble(f[0]), Double.parseDouble(f[1])};
    }
}
