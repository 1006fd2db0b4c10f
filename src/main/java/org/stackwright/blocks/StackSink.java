package org.stackwright.blocks;

import org.stackwright.volume.Volume;

/**
 * Where the cores of blocks go: a TIFF or BigTIFF file written in place, a folder of one TIFF per plane, or memory.
 * Writes are safe from several threads at once (cores never overlap). Nothing is visible under the final name
 * until {@link #commit()}: a failed or cancelled run calls {@link #abort()} and leaves no partial output.
 */
public interface StackSink {

    /**
     * Writes the pixels of one core.
     *
     * @param core where the pixels go in the whole stack
     * @param pixels the core's pixels (its size), not modified; 8 and 16-bit sinks round and clamp them to their range
     */
    void write(Box core, Volume pixels);

    /** Tells the sink that every block covering plane z has been written (a folder sink then finishes the plane). */
    default void planeDone(int z) {
    }

    /** Puts the complete output in place (rename of the temporary file). */
    void commit();

    /** Removes every temporary file; nothing is left under the final name. Safe to call twice. */
    void abort();
}
