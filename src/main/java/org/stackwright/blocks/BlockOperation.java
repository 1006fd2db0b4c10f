package org.stackwright.blocks;

import java.util.List;
import java.util.Map;

import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;

/**
 * What an operation tells the block mechanism, and all it knows of the operation: which images are cut into
 * blocks, what halo a block needs, what a block costs in memory, the global step that fixes every whole-volume
 * choice once, how to process one block, and how to finish.
 *
 * <p>The order of a run ({@link BlockRun}): {@link #halo} and {@link #blockBytes} size the {@link BlockPlan};
 * {@link #resolve} runs once over the whole volume and returns fixed settings (a background, an iteration count,
 * noise levels) so that neighbouring blocks agree; {@link #processor} is built from those settings (once per
 * machine: a cluster rebuilds it on each node from the same settings); every block is processed; {@link #finish}
 * makes the record and any small output.
 */
public interface BlockOperation {

    /**
     * @return the image keys cut into blocks, the main input first; the others have its width and height and
     *     either its depth or one plane (which stands for every plane)
     */
    List<String> streamedInputs();

    /** @return the output image keys written block by block, with their bits per sample (8 or 32) */
    Map<String, Integer> streamedOutputs(Values v);

    /**
     * @param v settings (small inputs such as a PSF are in it; streamed inputs may not be)
     * @param main the main input (its size and voxel size; not read here)
     * @return the halo per axis (x, y, z) each block is read with
     */
    int[] halo(Values v, PlaneSource main);

    /** @return false when these settings take a path that does not run in blocks (then the usual path runs) */
    default boolean applies(Values v) {
        return true;
    }

    /**
     * @return the index of a block to process first (the global step may have done its work already, which is then
     *     handed over and freed at once), or -1
     */
    default int firstBlock(Globals globals) {
        return -1;
    }

    /** @return true when a block must hold every plane (the operation works across all planes) */
    default boolean wholeDepth(Values v) {
        return false;
    }

    /** @return bytes one block with a read box of w x h x d voxels needs, its input and output included */
    long blockBytes(Values v, PlaneSource main, int w, int h, int d);

    /**
     * The work of one block, to compare ways of cutting the volume ({@link BlockSizing}) and to state the expected
     * cost of the blocks against the whole volume in one piece. Default: the voxels of the read box.
     *
     * @return work of one block with a read box of w x h x d voxels, in any unit
     */
    default long blockWork(Values v, PlaneSource main, int w, int h, int d) {
        return (long) w * h * d;
    }

    /**
     * The global step, run once before any block: whole-volume choices fixed as settings.
     *
     * @param v the settings as given
     * @param inputs the streamed inputs by key (not modified)
     * @param plan the blocks that will run
     * @return the fixed settings and what the record says about them
     */
    Globals resolve(Values v, Map<String, PlaneSource> inputs, BlockPlan plan, RunContext ctx);

    /**
     * @param resolved the settings with the global choices filled in (small inputs included)
     * @param globals the global step's result (its numbers)
     * @return the processor of single blocks; closed after the last block
     */
    BlockProcessor processor(Values resolved, Globals globals, RunContext ctx);

    /**
     * After the last block, before the outputs are put in place.
     *
     * @param totals what the blocks added up (sums, whole planes)
     * @param inputs the streamed inputs, for a look at a representative part
     * @return record entries, report lines, rows and any output image that is not streamed
     */
    Result finish(Values resolved, Globals globals, BlockTotals totals, Map<String, PlaneSource> inputs,
            RunContext ctx);
}
