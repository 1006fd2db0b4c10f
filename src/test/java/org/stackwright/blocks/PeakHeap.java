package org.stackwright.blocks;

import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.util.Arrays;
import java.util.Locale;

/**
 * Runs the command line (or, with first argument {@code spark}, the Spark runner) in this JVM and prints the
 * wall-clock time and the peak heap in use: the sum of the heap pools' peak usage (collected garbage included, so
 * an upper bound on what the run needed). For the block benchmarks, which start it in a JVM with a given -Xmx.
 */
public final class PeakHeap {

    private PeakHeap() {
    }

    public static void main(String[] args) throws Exception {
        for (MemoryPoolMXBean p : ManagementFactory.getMemoryPoolMXBeans()) {
            p.resetPeakUsage();
        }
        long t0 = System.nanoTime();
        int code;
        if (args.length > 0 && args[0].equals("spark")) {
            Class<?> c = Class.forName("org.stackwright.spark.SparkMain");
            var m = c.getDeclaredMethod("run", String[].class, java.io.PrintStream.class, java.io.PrintStream.class);
            m.setAccessible(true);
            code = (Integer) m.invoke(null, Arrays.copyOfRange(args, 1, args.length), System.out, System.err);
        } else {
            code = org.stackwright.cli.Main.run(args, System.out, System.err);
        }
        double seconds = (System.nanoTime() - t0) * 1e-9;
        long peak = 0;
        for (MemoryPoolMXBean p : ManagementFactory.getMemoryPoolMXBeans()) {
            if (p.getType() == MemoryType.HEAP) {
                peak += p.getPeakUsage().getUsed();
            }
        }
        System.out.printf(Locale.ROOT, "PEAK exit %d, %.1f s, peak heap %.0f MB of max %.0f MB%n", code, seconds,
                peak / 1048576.0, Runtime.getRuntime().maxMemory() / 1048576.0);
        System.exit(code);
    }
}
