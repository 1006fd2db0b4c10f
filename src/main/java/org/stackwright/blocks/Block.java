package org.stackwright.blocks;

import java.io.Serializable;

/**
 * One block of a {@link BlockPlan}: its core, which it alone writes, and the larger box it reads, the core grown
 * by the halo on every side and clipped to the volume.
 *
 * @param index position in the plan's order, from 0
 * @param core the voxels this block writes; the cores of a plan tile the volume
 * @param read the voxels this block reads: the core with its halo, inside the volume
 */
public record Block(int index, Box core, Box read) implements Serializable {

    /** @return where the core starts inside the read box, per axis (x, y, z) */
    public int[] coreOffset() {
        return new int[] {core.x() - read.x(), core.y() - read.y(), core.z() - read.z()};
    }
}
