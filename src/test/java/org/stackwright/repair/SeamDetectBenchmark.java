package org.stackwright.repair;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.stackwright.volume.TiffFiles;
import org.stackwright.op.InputChecks;
import org.stackwright.volume.Volume;

/**
 * Time of {@code seam-mask --detect} on workstation-sized mosaics; not a test. The mosaics come from the independent
 * generator at about 2000 px a side, whole and trimmed ({@code tools/benchmark/make_large_mosaics.py DIR}); run
 * <pre>
 * /usr/bin/python3 tools/benchmark/make_large_mosaics.py target/large-mosaics
 * tools/benchmark.sh org.stackwright.repair.SeamDetectBenchmark target/large-mosaics [RUNS]
 * </pre>
 * For each mosaic: the best of RUNS detections (second argument, 3 by default; the first run includes the JIT's
 * warm-up; the detector runs on one thread), whether it met the
 * issue's goals (every seam within 2 px, nothing else, step exact) and, as the floor, one pass that reads every pixel
 * (the least any detector must do), with the ratio to it. The CPU time of the detecting thread is printed beside the
 * wall time: on a shared machine it is the steadier of the two.
 */
public final class SeamDetectBenchmark {

    private SeamDetectBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        Path dir = Path.of(args.length > 0 ? args[0] : "target/large-mosaics");
        int runs = args.length > 1 ? Integer.parseInt(args[1]) : 3;
        List<String[]> table = new ArrayList<>();
        for (String line : Files.readAllLines(dir.resolve("truth.txt"))) {
            if (!line.isBlank() && !line.startsWith("#")) {
                table.add(line.trim().split("\\s+"));
            }
        }
        System.out.printf(Locale.ROOT, "Seam detection benchmark: Java %s, %d cores, load average %.1f%n",
                System.getProperty("java.version"), Runtime.getRuntime().availableProcessors(),
                java.lang.management.ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
        double sink = 0;
        for (String[] r : table) {
            if (!r[0].equals("size")) {
                continue;
            }
            IndependentMosaicSeamTest.Truth t = IndependentMosaicSeamTest.truth(r[1], table);
            Volume img = InputChecks.oneVolume("input", TiffFiles.open(dir.resolve(t.name() + ".tif"), "--input"));
            SeamDetector.Found[] last = new SeamDetector.Found[1];
            double best = Double.POSITIVE_INFINITY;
            StringBuilder each = new StringBuilder();
            double bestCpu = Double.POSITIVE_INFINITY;
            java.lang.management.ThreadMXBean cpu = java.lang.management.ManagementFactory.getThreadMXBean();
            for (int k = 0; k < runs; k++) {
                long c0 = cpu.getCurrentThreadCpuTime();
                long t0 = System.nanoTime();
                last[0] = SeamDetector.detect(img, 8, 4);
                double s = (System.nanoTime() - t0) * 1e-9;
                double c = (cpu.getCurrentThreadCpuTime() - c0) * 1e-9;
                each.append(String.format(Locale.ROOT, " %.2f", s));
                best = Math.min(best, s);
                bestCpu = Math.min(bestCpu, c);
                System.out.printf(Locale.ROOT, "  %s run %d: %.2f s, CPU %.2f s%n", t.name(), k + 1, s, c);
            }
            double floor = Double.POSITIVE_INFINITY;
            for (int k = 0; k < 20; k++) {
                long t0 = System.nanoTime();
                float[] p = img.data();
                double sum = 0;
                for (float v : p) {
                    sum += v;
                }
                sink += sum;
                floor = Math.min(floor, (System.nanoTime() - t0) * 1e-9);
            }
            List<String> problems = IndependentMosaicSeamTest.problems(t, last[0]);
            SeamDetector.Tiling tl = last[0].tiling();
            System.out.printf(Locale.ROOT, "%-24s %4d x %4d  step %d x %d (true %d x %d) trimmed %-5s  %7.2f s (CPU %.2f s) "
                    + "(runs:%s) floor %.4f s  ratio %.0f  %s%n", t.name(), img.width(), img.height(), tl.stepX(),
                    tl.stepY(), t.stepX(), t.stepY(), tl.trimmed(), best, bestCpu, each, floor, best / floor,
                    problems.isEmpty() ? "all goals met" : problems.size() + " problems: " + problems);
        }
        System.out.printf(Locale.ROOT, "(pixel sum over all floor passes, printed so the pass is not optimised away: %.3g)%n",
                sink);
    }
}
