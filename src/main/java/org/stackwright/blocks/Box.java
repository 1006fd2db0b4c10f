package org.stackwright.blocks;

import java.io.Serializable;

/**
 * A box of voxels: its corner (x, y, z) and its size (w, h, d), all in voxels of the whole volume. Immutable.
 *
 * @param x first column
 * @param y first row
 * @param z first plane
 * @param w columns, at least 1
 * @param h rows, at least 1
 * @param d planes, at least 1
 */
public record Box(int x, int y, int z, int w, int h, int d) implements Serializable {

    public Box {
        if (x < 0 || y < 0 || z < 0 || w < 1 || h < 1 || d < 1) {
            throw new IllegalArgumentException("bad box " + x + "," + y + "," + z + " size " + w + "x" + h + "x" + d);
        }
    }

    /** @return number of voxels */
    public long voxels() {
        return (long) w * h * d;
    }

    /** @return true when the plane z (of the whole volume) crosses this box */
    public boolean holdsPlane(int plane) {
        return plane >= z && plane < z + d;
    }

    /** @return "WxHxD at (x, y, z)" */
    @Override
    public String toString() {
        return w + "x" + h + "x" + d + " at (" + x + ", " + y + ", " + z + ")";
    }
}
