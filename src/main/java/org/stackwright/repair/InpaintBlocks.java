package org.stackwright.repair;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.blocks.Block;
import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockOutput;
import org.stackwright.blocks.BlockPlan;
import org.stackwright.blocks.BlockProcessor;
import org.stackwright.blocks.BlockTotals;
import org.stackwright.blocks.Box;
import org.stackwright.blocks.Globals;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * The block side of {@code inpaint}. A filled pixel depends on the trusted pixels around its hole, so the halo must
 * reach past the holes that cross a block's core: {@value #HALO} pixels by default (in z too in volume mode). That
 * holds every hole of up to about 2 x {@value #HALO} pixels (dead pixels, clusters, small holes) whole inside the
 * block, so its fill equals the whole-image fill up to the solver's tolerance (the median fill exactly). A long
 * thin hole (a seam) always crosses blocks; along a line of width 1 to 3 the influence of a far part of the seam
 * falls by a factor of about 4 per pixel for the harmonic fill (the discrete Laplace equation on a strip), so at
 * {@value #HALO} pixels it is far below float precision.
 *
 * <p>Global step: the mask is checked over the whole stack (something to fill from; in slice mode in every slice).
 */
final class InpaintBlocks implements BlockOperation {

    /** Halo in pixels per side (x, y; z in volume mode). */
    static final int HALO = 16;

    @Override
    public List<String> streamedInputs() {
        return List.of("input", "mask");
    }

    @Override
    public Map<String, Integer> streamedOutputs(Values v) {
        Map<String, Integer> m = new LinkedHashMap<>();
        m.put("output", 32);
        m.put("filled-output", 8);
        return m;
    }

    @Override
    public int[] halo(Values v, PlaneSource main) {
        boolean volume = Inpainting.Mode.of(v.choice("mode")) == Inpainting.Mode.VOLUME;
        return new int[] {HALO, HALO, volume ? HALO : 0};
    }

    @Override
    public long blockBytes(Values v, PlaneSource main, int w, int h, int d) {
        // the block and its mask as read, the repaired copy and the solver's vectors (as the in-memory estimate)
        return 4L * w * h * d * 14;
    }

    private static Inpainting.Settings settings(Values v) {
        Inpainting.Method method = Inpainting.Method.of(v.choice("method"));
        Inpainting.Mode mode = Inpainting.Mode.of(v.choice("mode"));
        Inpainting.Settings defaults = Inpainting.Settings.of(method, mode);
        return new Inpainting.Settings(method, mode, v.given("tolerance") ? v.number("tolerance") : defaults.tolerance(),
                v.given("iterations") ? v.integer("iterations") : defaults.maxIterations());
    }

    @Override
    public Globals resolve(Values v, Map<String, PlaneSource> in, BlockPlan plan, RunContext ctx) {
        settings(v);
        PlaneSource data = in.get("input");
        PlaneSource mask = in.get("mask");
        if (mask == null) {
            throw new IllegalArgumentException("image 'mask' is required for inpaint: 8-bit mask, nonzero = fill");
        }
        boolean volume = Inpainting.Mode.of(v.choice("mode")) == Inpainting.Mode.VOLUME && data.depth() > 1;
        long marked = 0;
        long all = (long) data.width() * data.height() * data.depth();
        int plane = data.width() * data.height();
        for (int z = 0; z < mask.depth(); z++) {
            float[] m = mask.read(new Box(0, 0, z, mask.width(), mask.height(), 1)).data();
            int n = 0;
            for (float f : m) {
                if (f != 0) {
                    n++;
                }
            }
            if (!volume && n == plane && data.depth() > 1) {
                throw new IllegalArgumentException("mask covers every pixel of slice " + (z + 1) + " of " + data.depth()
                        + ": nothing in that slice to fill from; use mode volume or a mask that keeps some pixels of"
                        + " each slice");
            }
            marked += (long) n * (mask.depth() == 1 ? data.depth() : 1);
        }
        if (marked == all) {
            throw new IllegalArgumentException("mask covers every pixel of the image: nothing is left to fill from; "
                    + "give a mask that keeps some pixels trusted (0)");
        }
        if (marked == 0) {
            ctx.warn("mask marks no pixel (all 0); nothing is excluded or repaired");
        }
        return new Globals(Map.of(), Map.of(), Map.of("mask_pixels", marked));
    }

    @Override
    public BlockProcessor processor(Values resolved, Globals g, RunContext ctx) {
        Inpainting.Settings s = settings(resolved);
        Workers workers = new Workers(ctx.threads());
        return new BlockProcessor() {
            @Override
            public BlockOutput process(Block block, Map<String, Volume> in, RunContext c) {
                Volume img = in.get("input");
                Volume mask = in.get("mask");
                Inpainting.Outcome o = Inpainting.run(img, mask, s, workers);
                o.notes().forEach(c::warn);
                float[] f = new float[o.filledMask().length];
                for (int i = 0; i < f.length; i++) {
                    f[i] = o.filledMask()[i] & 0xff;
                }
                Map<String, Volume> out = new LinkedHashMap<>();
                out.put("output", o.filled());
                out.put("filled-output", img.withData(f));
                Box core = block.core();
                int[] off = block.coreOffset();
                double filled = 0;
                for (int z = 0; z < core.d(); z++) {
                    for (int y = 0; y < core.h(); y++) {
                        for (int x = 0; x < core.w(); x++) {
                            if (f[((z + off[2]) * img.height() + y + off[1]) * img.width() + x + off[0]] != 0) {
                                filled++;
                            }
                        }
                    }
                }
                return new BlockOutput(out, Map.of(), Map.of("filled", new double[] {filled, o.converged() ? 0 : 1,
                    o.iterations()}));
            }

            @Override
            public void close() {
                workers.close();
            }
        };
    }

    @Override
    public Result finish(Values resolved, Globals g, BlockTotals totals, Map<String, PlaneSource> in,
            RunContext ctx) {
        Inpainting.Settings s = settings(resolved);
        double[] t = totals.sums().getOrDefault("filled", new double[3]);
        long filled = (long) t[0];
        boolean converged = t[1] == 0;
        PlaneSource data = in.get("input");
        Result r = new Result();
        r.record("operation", "inpaint");
        r.record("settings", resolved.effective());
        r.record("filled_pixels", filled);
        r.record("converged", converged);
        r.line(String.format(Locale.ROOT, "filled %d pixels by %s (%s) in %d blocks; these are estimates: exclude them"
                + " from measurements (filled-output gives their mask)", filled, s.method().word(),
                data.depth() > 1 ? (s.mode() == Inpainting.Mode.VOLUME ? "as one volume" : "slice by slice") : "2D",
                totals.blocks()));
        return r;
    }
}
