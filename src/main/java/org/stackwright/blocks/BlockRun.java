package org.stackwright.blocks;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.op.Operation;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.VoxelSize;

/**
 * A whole block run of an operation, as the doors start it: claims the outputs, checks the streamed inputs agree in
 * size, sizes the blocks (given, or the cut of least work that fits the memory budget: {@link BlockSizing}), runs
 * the global step once, processes every block, finishes, and only then puts the outputs in place; on any failure
 * or cancel every output is removed.
 *
 * <p>Doors: {@link #inMemory} for images already open (ImageJ, SciJava, library calls; a virtual stack is read plane
 * by plane), {@link #toFiles} for the command line, which streams from and to disk. A cluster runner uses
 * {@link #prepare} and {@link #resolved} and maps the same plan onto its tasks.
 */
public final class BlockRun {

    /** Makes the sink of one streamed output. */
    @FunctionalInterface
    public interface Sinks {
        StackSink make(String key, int bits, int width, int height, int depth, VoxelSize voxel);
    }

    /**
     * What is fixed before the first block: the plan, the global choices and the settings every block uses.
     *
     * @param workFactor the expected cost of the blocks: their work summed (for deconvolution, FFT grid voxels)
     *     over the work of the whole stack in one piece ({@link BlockPlan#workFactor})
     */
    public record Prepared(BlockPlan plan, Globals globals, Values resolved, long budget, long blockBytes,
            double workFactor) {
    }

    private BlockRun() {
    }

    /**
     * @return true when an operation given open images should run in blocks: a block size was given, the main
     *     input is a virtual stack, or the whole run would not fit the memory budget
     */
    public static boolean wanted(BlockOperation b, Values v) {
        ImagePlus main = v.images().get(b.streamedInputs().get(0));
        if (main == null || !b.applies(v)) {
            return false;
        }
        if (BlockSettings.given(v) || ImagePlusSource.isVirtual(main)) {
            return true;
        }
        return !fits(b, v, new ImagePlusSource(main), 0);
    }

    /**
     * @param main the main input (size and voxel size)
     * @param loadedBytes bytes the door would still have to load (the input file as an image), 0 when loaded
     * @return true when the whole stack can be processed in memory as one piece
     */
    public static boolean fits(BlockOperation b, Values v, PlaneSource main, long loadedBytes) {
        return b.blockBytes(v, main, main.width(), main.height(), main.depth()) + loadedBytes <= BlockSettings.budget(v);
    }

    /** Runs on open images; streamed outputs come back as images in the result. */
    public static Result inMemory(Operation op, BlockOperation b, Values v, RunContext ctx) {
        Map<String, PlaneSource> in = new LinkedHashMap<>();
        for (String key : b.streamedInputs()) {
            ImagePlus imp = v.images().get(key);
            if (imp != null) {
                if (imp.getNChannels() > 1 || imp.getNFrames() > 1) {
                    throw new IllegalArgumentException(key + " '" + imp.getTitle() + "' has " + imp.getNChannels()
                            + " channels and " + imp.getNFrames() + " time points; blocks need one channel and one time"
                            + " point (split the hyperstack first)");
                }
                in.put(key, new ImagePlusSource(imp));
            }
        }
        Map<String, MemorySink> made = new LinkedHashMap<>();
        Result r = execute(op, b, v, in, (key, bits, w, h, d, voxel) -> {
            MemorySink s = new MemorySink(w, h, d, bits, voxel);
            made.put(key, s);
            return s;
        }, ctx);
        String title = in.values().iterator().next().title();
        for (Map.Entry<String, MemorySink> e : made.entrySet()) {
            String t = title + "-" + op.name() + (e.getKey().equals("output") ? "" : "-" + e.getKey());
            r.image(e.getKey(), e.getValue().image(t));
        }
        return r;
    }

    /**
     * Runs from files to files. Outputs whose path is a folder (existing, or ending in a separator) become one TIFF
     * per plane; the others one TIFF (BigTIFF over 4 GB).
     *
     * @param inputs the streamed inputs, opened by the door (closed by the caller)
     * @param outputs streamed output key to path; keys not given are computed but not written
     * @param folders the output keys that name folders of planes (also when the folder does not exist yet)
     */
    public static Result toFiles(Operation op, BlockOperation b, Values v, Map<String, PlaneSource> inputs,
            Map<String, Path> outputs, java.util.Set<String> folders, boolean overwrite, RunContext ctx) {
        return execute(op, b, v, inputs, (key, bits, w, h, d, voxel) -> {
            Path p = outputs.get(key);
            if (p == null) {
                return null;
            }
            return folders.contains(key) || isFolder(p) ? new PlaneFolderSink("--" + key, p, w, h, d, bits, voxel)
                    : new TiffStackSink("--" + key, p, w, h, d, bits, voxel, overwrite, false);
        }, ctx);
    }

    /** @return true when an output path names an existing folder (a folder of planes) */
    public static boolean isFolder(Path p) {
        return Files.isDirectory(p);
    }

    /** @return true when an output as typed names a folder of planes: an existing folder, or ends in a separator */
    public static boolean isFolder(String typed) {
        return typed != null && (typed.endsWith("/") || typed.endsWith(java.io.File.separator)
                || Files.isDirectory(Path.of(typed)));
    }

    /**
     * Checks the inputs, sizes the plan and runs the global step.
     *
     * @param inputs streamed inputs by key, the main input first
     */
    public static Prepared prepare(Operation op, BlockOperation b, Values v, Map<String, PlaneSource> inputs,
            RunContext ctx) {
        return prepare(op, b, v, inputs, ctx, -1);
    }

    /**
     * As {@link #prepare(Operation, BlockOperation, Values, Map, RunContext)}, for a runner whose blocks run
     * elsewhere or several at once (a cluster runner): the memory one block may use is given.
     *
     * @param blockBudget bytes one block may use, or -1 for the memory setting and this JVM's heap
     */
    public static Prepared prepare(Operation op, BlockOperation b, Values v, Map<String, PlaneSource> inputs,
            RunContext ctx, long blockBudget) {
        PlaneSource main = inputs.get(b.streamedInputs().get(0));
        if (main == null) {
            throw new IllegalArgumentException(b.streamedInputs().get(0) + " is required for " + op.name());
        }
        for (Map.Entry<String, PlaneSource> e : inputs.entrySet()) {
            PlaneSource s = e.getValue();
            if (s != main && (s.width() != main.width() || s.height() != main.height()
                    || (s.depth() != main.depth() && s.depth() != 1))) {
                throw new IllegalArgumentException(e.getKey() + " is " + s.width() + "x" + s.height() + "x" + s.depth()
                        + " but " + b.streamedInputs().get(0) + " is " + main.width() + "x" + main.height() + "x"
                        + main.depth() + "; give the same width and height, and one plane or one per slice");
            }
        }
        int[] dims = {main.width(), main.height(), main.depth()};
        int[] halo = b.halo(v, main);
        if (dims[2] == 1) {
            halo[2] = 0;
        }
        if (blockBudget < 0 && BlockSettings.beyondHeap(v)) {
            ctx.warn(String.format(Locale.ROOT, "memory = %s is more than the Java heap has free (%.0f MB); using %.0f MB"
                    + " (give Java more with java -Xmx...)", v.text(BlockSettings.MEMORY),
                    BlockSettings.budget(v) / 1048576.0, BlockSettings.budget(v) / 1048576.0));
        }
        long budget = blockBudget < 0 ? BlockSettings.budget(v) : blockBudget;
        int[] core = BlockSettings.coreSize(v);
        boolean whole = b.wholeDepth(v);
        BlockSizing.BlockBytes work = (w, h, d) -> b.blockWork(v, main, w, h, d);
        BlockPlan plan;
        if (core == null) {
            plan = BlockSizing.auto(dims, halo, budget, (w, h, d) -> b.blockBytes(v, main, w, h, d), work, whole);
        } else if (whole && core[2] < dims[2]) {
            throw new IllegalArgumentException(BlockSettings.BLOCK_SIZE + " = '" + v.text(BlockSettings.BLOCK_SIZE) + "': "
                    + op.name() + " needs every plane in a block; give a depth of " + dims[2] + " or more, or auto");
        } else {
            plan = new BlockPlan(dims[0], dims[1], dims[2], core, halo);
        }
        int[] largest = plan.largestRead();
        long need = b.blockBytes(v, main, largest[0], largest[1], largest[2]);
        if (need > budget) {
            ctx.warn(String.format(Locale.ROOT, "block-size: the largest block (%dx%dx%d with its halo) needs about %.0f MB"
                    + " but %.0f MB are free; it may run out of memory (give a smaller block-size or auto)",
                    largest[0], largest[1], largest[2], need / 1048576.0, budget / 1048576.0));
        }
        double factor = plan.workFactor(work);
        ctx.progress(0, String.format(Locale.ROOT, "global settings for %s; expected work %.3f x the whole stack in"
                + " one piece", plan.describe(), factor));
        Globals g = b.resolve(v, inputs, plan, ctx);
        return new Prepared(plan, g, resolved(op, v, g), budget, need, factor);
    }

    private static Result execute(Operation op, BlockOperation b, Values v, Map<String, PlaneSource> inputs,
            Sinks factory, RunContext ctx) {
        PlaneSource main = inputs.get(b.streamedInputs().get(0));
        if (main == null) {
            throw new IllegalArgumentException(b.streamedInputs().get(0) + " is required for " + op.name());
        }
        Map<String, StackSink> sinks = new LinkedHashMap<>();
        List<StackSink> all = new ArrayList<>();
        try {
            // the sinks first: each claims its output's name before any work, so a second run is refused at once
            for (Map.Entry<String, Integer> e : b.streamedOutputs(v).entrySet()) {
                StackSink s = factory.make(e.getKey(), e.getValue(), main.width(), main.height(), main.depth(), main.voxel());
                if (s != null) {
                    sinks.put(e.getKey(), s);
                    all.add(s);
                }
            }
            Prepared p = prepare(op, b, v, inputs, ctx);
            BlockTotals totals;
            try (BlockProcessor proc = b.processor(p.resolved(), p.globals(), ctx)) {
                totals = BlockRunner.run(p.plan(), b.firstBlock(p.globals()), proc, inputs, sinks, ctx);
            }
            Result r = b.finish(p.resolved(), p.globals(), totals, inputs, ctx);
            record(r, p, totals);
            ctx.checkCancelled();
            for (StackSink s : all) {
                s.commit();
            }
            all.clear();
            return r;
        } finally {
            for (StackSink s : all) {
                s.abort();
            }
        }
    }

    /** Adds the block entries to a record. */
    public static void record(Result r, Prepared p, BlockTotals totals) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("plan", p.plan().describe());
        m.put("blocks", p.plan().blocks().size());
        m.put("halo", List.of(p.plan().halo()[0], p.plan().halo()[1], p.plan().halo()[2]));
        m.put("read_factor", p.plan().readFactor());
        // for deconvolution: FFT grid voxels of all blocks over those of the whole stack in one piece
        m.put("expected_overhead", p.workFactor());
        m.put("memory_budget_bytes", p.budget());
        m.put("block_memory_estimate_bytes", p.blockBytes());
        m.put("block_seconds", totals.seconds());
        r.record("blocks", m);
        r.record("global_settings", p.globals().record());
    }

    /** @return the settings as given with the global choices put in, small input images carried over */
    public static Values resolved(Operation op, Values v, Globals g) {
        Map<String, String> raw = new LinkedHashMap<>(v.givenText());
        raw.putAll(g.settings());
        Values out = Values.parse(op.name(), op.params(), raw);
        for (Map.Entry<String, ImagePlus> e : v.images().entrySet()) {
            out.withImage(e.getKey(), e.getValue());
        }
        return out;
    }
}
