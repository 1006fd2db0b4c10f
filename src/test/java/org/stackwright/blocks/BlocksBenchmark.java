package org.stackwright.blocks;

import java.io.BufferedReader;
import java.io.IOException;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Deconvolution of a stack larger than memory (not a test): each run in a JVM of its own with its own -Xmx,
 * through {@link PeakHeap}, so time and peak heap are those of the run alone.
 *
 * <pre>
 * tools/benchmark.sh org.stackwright.blocks.BlocksBenchmark [--size 2048x2048x200] [--iterations 20]
 *     [--heap 2g[,700m,...]] [--memory-size 1024x1024x200] [--memory-heap 10g] [--spark] [--spark-heap 4g] [--dir DIR]
 *     [--only-blocks]
 * </pre>
 *
 * Makes (once, in DIR) a 16-bit stack of the size with Poisson-like noise over blobs and a 21x21x15 Gaussian PSF;
 * then: (1) the block run of the whole stack in --heap (block-size auto: the blocks of least FFT work that fit; a
 * comma list runs it once per heap, and prints the expected overhead the plan stated); (2) the same
 * deconvolution in memory of a --memory-size stack cut from the same data (in a heap large enough), to compare the
 * time per voxel; (3) with --spark, the Spark runner in local mode with --block-size the largest core of the last
 * run of (1) (evened-out cores: close to (1)'s plan, whose cores at the faces are one halo wider), in --spark-heap (default
 * --heap; local[N] runs N blocks at once, one thread each, so it needs N times a block's memory). All
 * runs use accelerated Richardson-Lucy, the fixed rule and the same iterations. Prints time, peak heap and the
 * ratios.
 */
public final class BlocksBenchmark {

    private BlocksBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        String size = "2048x2048x200";
        String memSize = "1024x1024x200";
        String heap = "2g";
        String memHeap = "10g";
        int iterations = 20;
        boolean spark = false;
        String sparkHeap = null;
        boolean onlyBlocks = false;
        Path dir = Path.of("target", "blocks-benchmark");
        for (int i = 0; i < args.length; i++) {
            switch (args[i]) {
                case "--size" -> size = args[++i];
                case "--memory-size" -> memSize = args[++i];
                case "--heap" -> heap = args[++i];
                case "--memory-heap" -> memHeap = args[++i];
                case "--iterations" -> iterations = Integer.parseInt(args[++i]);
                case "--spark" -> spark = true;
                case "--spark-heap" -> sparkHeap = args[++i];
                case "--only-blocks" -> onlyBlocks = true;
                case "--dir" -> dir = Path.of(args[++i]);
                default -> throw new IllegalArgumentException("unknown argument " + args[i]);
            }
        }
        Files.createDirectories(dir);
        int[] n = org.stackwright.op.Values.parseDims("--size", size, 3);
        int[] m = org.stackwright.op.Values.parseDims("--memory-size", memSize, 3);
        Path big = stack(dir, n);
        Path small = stack(dir, m);
        Path psf = dir.resolve("psf-21x21x15.tif");
        VoxelSize vx = new VoxelSize(0.1, 0.1, 0.3);
        if (!Files.exists(psf)) {
            TiffFiles.write(GaussianPsf.sampled(0.15, 0.45, vx, 21, 21, 15), psf, true);
        }
        System.out.printf(Locale.ROOT, "load average at start: %s", Files.readString(Path.of("/proc/loadavg")));
        List<String> common = List.of("--psf", psf.toString(), "--iterations", Integer.toString(iterations), "--stop",
                "fixed", "--offset", "100", "--background", "10", "--threads", Integer.toString(
                        Runtime.getRuntime().availableProcessors()), "--overwrite");
        long bigVoxels = (long) n[0] * n[1] * n[2];
        List<double[]> blockRuns = new ArrayList<>();
        String[] heaps = heap.split(",");
        for (String hp : heaps) {
            double[] b = run(hp, false, concat(List.of("deconvolve", "--input", big.toString(), "--output",
                    dir.resolve("blocks.tif").toString(), "--record", dir.resolve("blocks.json").toString()), common));
            String json = Files.readString(dir.resolve("blocks.json"));
            System.out.printf(Locale.ROOT, "blocks %s in %s: %.1f s, peak heap %.0f MB, %.3g us per voxel; plan %s,"
                    + " expected overhead %s%n", size, hp, b[0], b[1], b[0] / bigVoxels * 1e6,
                    field(json, "\"plan\"\\s*:\\s*\"([^\"]*)\""), field(json, "\"expected_overhead\"\\s*:\\s*([0-9.eE+-]+)"));
            blockRuns.add(b);
        }
        if (onlyBlocks) {
            return;
        }
        double[] w = run(memHeap, false, concat(List.of("deconvolve", "--input", small.toString(), "--output",
                dir.resolve("whole.tif").toString()), common));
        long smallVoxels = (long) m[0] * m[1] * m[2];
        System.out.printf(Locale.ROOT, "in memory %s in %s: %.1f s, peak heap %.0f MB, %.3g us per voxel%n", memSize,
                memHeap, w[0], w[1], w[0] / smallVoxels * 1e6);
        for (int i = 0; i < heaps.length; i++) {
            double[] b = blockRuns.get(i);
            System.out.printf(Locale.ROOT, "blocks and streaming in %s cost %.2f x the in-memory time per voxel,"
                    + " %.2f x its peak heap%n", heaps[i], (b[0] / bigVoxels) / (w[0] / smallVoxels), b[1] / w[1]);
        }
        double[] b = blockRuns.get(blockRuns.size() - 1);
        if (spark) {
            String blockSize = blockSize(dir.resolve("blocks.json"));
            double[] s = run(sparkHeap == null ? heap : sparkHeap, true, concat(List.of("--master", "local[" + Runtime.getRuntime().availableProcessors()
                    + "]", "deconvolve", "--input", big.toString(), "--output", dir.resolve("spark.tif").toString(),
                    "--block-size", blockSize), common));
            System.out.printf(Locale.ROOT, "spark local, blocks %s in %s: %.1f s, peak heap %.0f MB: %.2f x the"
                    + " single-machine block run%n", blockSize, sparkHeap == null ? heap : sparkHeap, s[0], s[1],
                    s[0] / b[0]);
        }
        System.out.printf(Locale.ROOT, "load average at end: %s", Files.readString(Path.of("/proc/loadavg")));
    }

    /** @return the first group of a pattern in a record, or "?" */
    private static String field(String json, String regex) {
        java.util.regex.Matcher mm = java.util.regex.Pattern.compile(regex).matcher(json);
        return mm.find() ? mm.group(1) : "?";
    }

    /** @return the core size the block run chose, from its record ("cores up to WxHxD") */
    private static String blockSize(Path record) throws IOException {
        String json = Files.readString(record);
        java.util.regex.Matcher mm = java.util.regex.Pattern.compile("cores up to (\\d+x\\d+x\\d+)").matcher(json);
        if (!mm.find()) {
            throw new IllegalStateException("no block size in " + record);
        }
        return mm.group(1);
    }

    private static List<String> concat(List<String> a, List<String> b) {
        List<String> c = new ArrayList<>(a);
        c.addAll(b);
        return c;
    }

    /** @return {seconds, peak heap MB} of one run in a JVM of its own */
    private static double[] run(String heap, boolean spark, List<String> args) throws Exception {
        List<String> cmd = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-Xmx" + heap));
        if (spark) {
            for (String o : ("--add-opens=java.base/java.lang=ALL-UNNAMED --add-opens=java.base/java.lang.invoke=ALL-UNNAMED"
                    + " --add-opens=java.base/java.lang.reflect=ALL-UNNAMED --add-opens=java.base/java.io=ALL-UNNAMED"
                    + " --add-opens=java.base/java.net=ALL-UNNAMED --add-opens=java.base/java.nio=ALL-UNNAMED"
                    + " --add-opens=java.base/java.util=ALL-UNNAMED --add-opens=java.base/java.util.concurrent=ALL-UNNAMED"
                    + " --add-opens=java.base/java.util.concurrent.atomic=ALL-UNNAMED"
                    + " --add-opens=java.base/jdk.internal.ref=ALL-UNNAMED --add-opens=java.base/sun.nio.ch=ALL-UNNAMED"
                    + " --add-opens=java.base/sun.nio.cs=ALL-UNNAMED --add-opens=java.base/sun.security.action=ALL-UNNAMED"
                    + " --add-opens=java.base/sun.util.calendar=ALL-UNNAMED").split(" ")) {
                cmd.add(o);
            }
        }
        cmd.addAll(List.of("-cp", System.getProperty("java.class.path"), PeakHeap.class.getName()));
        if (spark) {
            cmd.add("spark");
        }
        cmd.addAll(args);
        Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        double[] out = {Double.NaN, Double.NaN};
        try (BufferedReader r = new BufferedReader(new InputStreamReader(p.getInputStream(), StandardCharsets.UTF_8))) {
            String line;
            while ((line = r.readLine()) != null) {
                if (line.startsWith("PEAK")) {
                    java.util.regex.Matcher mm = java.util.regex.Pattern.compile("exit (\\d+), ([0-9.]+) s, peak heap (\\d+) MB")
                            .matcher(line);
                    if (mm.find()) {
                        out[0] = Double.parseDouble(mm.group(2));
                        out[1] = Double.parseDouble(mm.group(3));
                    }
                } else if (line.startsWith("deconvolved") || line.startsWith("warning") || line.contains("failed")
                        || line.contains("OutOfMemoryError")) {
                    System.out.println("  " + line);
                }
            }
        }
        if (p.waitFor() != 0) {
            throw new IllegalStateException("run failed: " + String.join(" ", args));
        }
        return out;
    }

    /** A 16-bit stack of blobs with photon-like noise, written plane by plane (never whole in memory). */
    static Path stack(Path dir, int[] n) {
        Path p = dir.resolve("stack-" + n[0] + "x" + n[1] + "x" + n[2] + ".tif");
        if (Files.exists(p)) {
            return p;
        }
        TiffStackSink sink = new TiffStackSink(p, n[0], n[1], n[2], 16, new VoxelSize(0.1, 0.1, 0.3), true, false);
        SplittableRandom r = new SplittableRandom(11);
        float[] plane = new float[n[0] * n[1]];
        for (int z = 0; z < n[2]; z++) {
            for (int y = 0; y < n[1]; y++) {
                for (int x = 0; x < n[0]; x++) {
                    double a = Math.sin(x * 0.05 + z * 0.1) * Math.cos(y * 0.043 - z * 0.07);
                    double mu = 20 + 800 * Math.pow(Math.max(0, a), 8);
                    plane[y * n[0] + x] = (float) Math.max(0, Math.rint(110 + mu + Math.sqrt(mu) * (r.nextDouble() - 0.5)
                            * 3.46));
                }
            }
            sink.write(new Box(0, 0, z, n[0], n[1], 1), new Volume(n[0], n[1], 1, plane, VoxelSize.UNIT));
        }
        sink.commit();
        return p;
    }
}
