package org.stackwright.blocks;

import java.io.Closeable;

import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A stack that blocks read part by part: a TIFF on disk, a folder of one TIFF per plane, or an image in memory
 * (an ImageJ virtual stack reads its planes from disk when asked). Reading is safe from several threads at once.
 * The stack itself is never modified.
 */
public interface PlaneSource extends Closeable {

    int width();

    int height();

    int depth();

    /** @return the voxel size in micrometres (1 um when not calibrated: see {@link #calibrated()}) */
    VoxelSize voxel();

    /** @return true when the file or image carries a length unit */
    boolean calibrated();

    /** @return bits per stored sample (8, 16 or 32): what one plane costs when loaded */
    int bitDepth();

    /** @return a name for messages and titles (file name without its ending, or the window title) */
    String title();

    /**
     * Reads a box as 32-bit floats.
     *
     * @param box inside the stack (a source of depth 1 is one plane that stands for every plane: its z is ignored)
     * @return a new volume of the box's size with this source's voxel size
     * @throws java.io.UncheckedIOException when the file cannot be read
     */
    Volume read(Box box);

    @Override
    void close();
}
