package org.stackwright.blocks;

import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/**
 * Runs the blocks of a plan one after the other on this machine, each with all the caller's threads: reads the
 * block's read box from every input, processes it, writes the core of every streamed output, and tells the sinks
 * when a plane is complete. Progress gives blocks done and the time left (from the mean time per block so far);
 * a warning that every block repeats is passed on once.
 */
public final class BlockRunner {

    private BlockRunner() {
    }

    /**
     * @param inputs streamed inputs by key, not modified
     * @param sinks streamed outputs by key; not committed here
     * @throws org.stackwright.parallel.CancelledException when cancelled (between blocks or inside one)
     */
    public static BlockTotals run(BlockPlan plan, BlockProcessor processor, Map<String, PlaneSource> inputs,
            Map<String, StackSink> sinks, RunContext ctx) {
        return run(plan, -1, processor, inputs, sinks, ctx);
    }

    /**
     * As above, with one block moved to the front of the order.
     *
     * @param first index of the block to process first, or -1 for the plan's order
     */
    public static BlockTotals run(BlockPlan plan, int first, BlockProcessor processor, Map<String, PlaneSource> inputs,
            Map<String, StackSink> sinks, RunContext ctx) {
        PlaneSource main = inputs.values().iterator().next();
        BlockAssembly assembly = new BlockAssembly(plan.width(), plan.height(), main.voxel());
        int[] left = plan.blocksPerPlane();
        int n = plan.blocks().size();
        long t0 = System.nanoTime();
        Set<String> warned = new LinkedHashSet<>();
        int done = 0;
        java.util.List<Block> order = new java.util.ArrayList<>(plan.blocks());
        if (first >= 0) {
            order.add(0, order.remove(first));
        }
        for (Block b : order) {
            ctx.checkCancelled();
            final int index = done;
            final double elapsed = (System.nanoTime() - t0) * 1e-9;
            String where = "block " + (index + 1) + " of " + n + (index == 0 ? "" : "; " + timeLeft(elapsed, index, n));
            RunContext inner = new RunContext(ctx.threads(),
                    (f, s) -> ctx.progress((index + Math.max(0, Math.min(1, f))) / n, where + ": " + s),
                    w -> {
                        boolean once;
                        synchronized (warned) {
                            once = warned.add(w);
                        }
                        if (once) {
                            ctx.warn(w);
                        }
                    },
                    ctx::isCancelled);
            inner.progress(0, "reading " + b.read());
            Map<String, Volume> in = new LinkedHashMap<>();
            for (Map.Entry<String, PlaneSource> e : inputs.entrySet()) {
                in.put(e.getKey(), e.getValue().read(b.read()));
            }
            BlockOutput out = processor.process(b, in, inner);
            in.clear();
            write(b, out, sinks);
            assembly.add(b, out);
            for (int z = b.core().z(); z < b.core().z() + b.core().d(); z++) {
                if (--left[z] == 0) {
                    for (StackSink s : sinks.values()) {
                        s.planeDone(z);
                    }
                }
            }
            done++;
            ctx.progress(done / (double) n, "block " + done + " of " + n + " done"
                    + (done < n ? "; " + timeLeft((System.nanoTime() - t0) * 1e-9, done, n) : ""));
        }
        return assembly.totals(n, (System.nanoTime() - t0) * 1e-9);
    }

    /** Writes the core of every streamed output of a block into its sink. */
    public static void write(Block b, BlockOutput out, Map<String, StackSink> sinks) {
        for (Map.Entry<String, StackSink> e : sinks.entrySet()) {
            Volume v = out.stacks().get(e.getKey());
            if (v == null) {
                throw new IllegalStateException("block " + b.index() + " made no output " + e.getKey());
            }
            e.getValue().write(b.core(), BlockAssembly.core(b, v));
        }
    }

    /** @return "about 3 min 20 s left" from the mean time per block so far */
    static String timeLeft(double elapsed, int done, int n) {
        double s = elapsed / done * (n - done);
        if (s < 60) {
            return String.format(Locale.ROOT, "about %.0f s left", Math.ceil(s));
        }
        if (s < 3600) {
            return String.format(Locale.ROOT, "about %d min %02d s left", (int) (s / 60), (int) (s % 60));
        }
        return String.format(Locale.ROOT, "about %d h %02d min left", (int) (s / 3600), (int) (s % 3600 / 60));
    }
}
