package org.stackwright.blocks;

import java.util.Map;

import org.stackwright.volume.Volume;

/**
 * What the blocks of a run added up.
 *
 * @param sums each sum key's element-wise total over all blocks
 * @param planes each one-plane output put together over the whole width and height
 * @param blocks number of blocks processed
 * @param seconds wall-clock time of the block phase
 */
public record BlockTotals(Map<String, double[]> sums, Map<String, Volume> planes, int blocks, double seconds) {
}
