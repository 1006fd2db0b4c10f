package org.stackwright.blocks;

import java.io.Serializable;
import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.volume.Volume;

/**
 * What one block gives back.
 *
 * @param stacks streamed outputs over the block's read box (only the core is kept)
 * @param planes one-plane outputs over the read box's width and height (only the core's columns and rows are
 *     kept), put together into whole planes for {@link BlockOperation#finish}
 * @param sums numbers added up over all blocks, element by element (e.g. a sum per plane)
 */
public record BlockOutput(Map<String, Volume> stacks, Map<String, Volume> planes, Map<String, double[]> sums)
        implements Serializable {

    /** @return an output with stacks only */
    public static BlockOutput of(Map<String, Volume> stacks) {
        return new BlockOutput(stacks, Map.of(), Map.of());
    }

    /** @return a copy with one more sum */
    public BlockOutput withSum(String key, double[] values) {
        Map<String, double[]> s = new LinkedHashMap<>(sums);
        s.put(key, values);
        return new BlockOutput(stacks, planes, s);
    }
}
