package org.stackwright.repair;

import java.util.LinkedHashMap;
import java.util.List;
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
 * The block side of {@code find-defects} when it searches the image itself (with dark or flat frames it runs as
 * usual). A pixel's verdict needs all its slices, so each block holds every slice of a tile of columns and rows,
 * with a halo of 2 (the 3x3 median of a neighbour's neighbour). Global step: the noise level of each slice, fitted
 * on the whole slice as in memory. Each block gives its pixels' candidate verdicts; the finish takes the brightest
 * good value over the whole image and decides stuck against hot, so the mask equals the whole-image one.
 */
final class FindDefectsBlocks implements BlockOperation {

    private static final String NOISE = "noise.";

    @Override
    public boolean applies(Values v) {
        return v.images().get("dark") == null && v.images().get("flat") == null && !v.given("dark") && !v.given("flat");
    }

    @Override
    public List<String> streamedInputs() {
        return List.of("input");
    }

    @Override
    public Map<String, Integer> streamedOutputs(Values v) {
        return Map.of();
    }

    @Override
    public int[] halo(Values v, PlaneSource main) {
        return new int[] {2, 2, 0};
    }

    @Override
    public boolean wholeDepth(Values v) {
        return true;
    }

    @Override
    public long blockBytes(Values v, PlaneSource main, int w, int h, int d) {
        // the block, its temporal spread and per-thread median and residual planes
        return 4L * w * h * d + 64L * w * h;
    }

    @Override
    public Globals resolve(Values v, Map<String, PlaneSource> in, BlockPlan plan, RunContext ctx) {
        PlaneSource s = in.get("input");
        int w = s.width();
        int h = s.height();
        float[] med = new float[w * h];
        float[] res = new float[w * h];
        Map<String, Double> numbers = new LinkedHashMap<>();
        for (int z = 0; z < s.depth(); z++) {
            ctx.checkCancelled();
            ctx.progress(0, "noise level of slice " + (z + 1) + " of " + s.depth());
            float[] px = s.read(new Box(0, 0, z, w, h, 1)).data();
            double[] p = ImageDefectFinder.sliceNoise(px, 0, w, h, med, res).parameters();
            for (int i = 0; i < p.length; i++) {
                numbers.put(NOISE + z + "." + i, p[i]);
            }
        }
        if (s.depth() < 3) {
            ctx.warn("with fewer than 3 planes stuck pixels cannot be told from hot ones, and dead pixels in dim "
                    + "regions may be missed; dark or flat frames find them reliably");
        }
        return new Globals(Map.of(), numbers, Map.of("noise_levels", "fitted on each whole slice"));
    }

    @Override
    public BlockProcessor processor(Values resolved, Globals g, RunContext ctx) {
        double k = resolved.number("threshold");
        double fraction = resolved.number("fraction");
        int depth = 0;
        while (g.numbers().containsKey(NOISE + depth + ".0")) {
            depth++;
        }
        NoiseLevel[] noise = new NoiseLevel[depth];
        for (int z = 0; z < depth; z++) {
            double[] p = new double[4];
            for (int i = 0; i < 4; i++) {
                p[i] = g.number(NOISE + z + "." + i);
            }
            noise[z] = NoiseLevel.of(p);
        }
        Workers workers = new Workers(ctx.threads());
        return new BlockProcessor() {
            @Override
            public BlockOutput process(Block block, Map<String, Volume> in, RunContext c) {
                Volume img = in.get("input");
                ImageDefectFinder.Candidates cand = ImageDefectFinder.candidates(img, k, fraction, noise, workers);
                float[] codes = new float[cand.codes().length];
                for (int i = 0; i < codes.length; i++) {
                    codes[i] = cand.codes()[i];
                }
                Map<String, Volume> planes = new LinkedHashMap<>();
                planes.put("codes", new Volume(img.width(), img.height(), 1, codes, img.voxel()));
                planes.put("minimum", new Volume(img.width(), img.height(), 1, cand.minimum(), img.voxel()));
                planes.put("good", new Volume(img.width(), img.height(), 1, cand.brightestGood(), img.voxel()));
                return new BlockOutput(Map.of(), planes, Map.of());
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
        PlaneSource s = in.get("input");
        float[] c = totals.planes().get("codes").data();
        byte[] codes = new byte[c.length];
        for (int i = 0; i < c.length; i++) {
            codes[i] = (byte) c[i];
        }
        DefectMap map = new ImageDefectFinder.Candidates(s.width(), s.height(), s.depth(), codes,
                totals.planes().get("minimum").data(), totals.planes().get("good").data()).decide();
        return FindDefectsOperation.result(resolved, map, s.voxel(), s.title());
    }
}
