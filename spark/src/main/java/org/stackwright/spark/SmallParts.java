package org.stackwright.spark;

import java.io.Serializable;
import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.blocks.BlockOutput;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The small parts of a block's output that go back to the driver: its sums and its one-plane outputs (over the
 * block's read box, a few bytes per column and row). The stacks stay on disk as pieces.
 *
 * @param index the block
 * @param sums sum key to values
 * @param planes plane key to pixels over the read box's width x height
 * @param width the read box's width
 * @param height the read box's height
 * @param attempt the attempt that made it (0 = first)
 */
record SmallParts(int index, Map<String, double[]> sums, Map<String, float[]> planes, int width, int height,
        int attempt) implements Serializable {

    static SmallParts of(int index, BlockOutput out, int width, int height, int attempt) {
        Map<String, float[]> planes = new LinkedHashMap<>();
        out.planes().forEach((k, v) -> planes.put(k, v.data()));
        return new SmallParts(index, new LinkedHashMap<>(out.sums()), planes, width, height, attempt);
    }

    /** @return the parts as a block output without stacks, for the driver's assembly */
    BlockOutput toOutput() {
        Map<String, Volume> p = new LinkedHashMap<>();
        planes.forEach((k, v) -> p.put(k, new Volume(width, height, 1, v, VoxelSize.UNIT)));
        return new BlockOutput(Map.of(), p, sums);
    }
}
