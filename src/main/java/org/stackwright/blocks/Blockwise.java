package org.stackwright.blocks;

/** Implemented by an {@link org.stackwright.op.Operation} that can run block by block. */
public interface Blockwise {

    /** @return the operation's block side */
    BlockOperation blocks();
}
