package org.stackwright.blocks;

import java.util.Map;

import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/** Processes single blocks with settings fixed beforehand; built once, used for many blocks, then closed. */
public interface BlockProcessor extends AutoCloseable {

    /**
     * @param block which block (its read box and core in the whole volume)
     * @param inputs the streamed inputs over the block's read box (one plane for an input of depth 1); not to be
     *     modified
     * @return the block's outputs over its read box
     */
    BlockOutput process(Block block, Map<String, Volume> inputs, RunContext ctx);

    @Override
    default void close() {
    }
}
