package org.stackwright.op;

import java.util.Locale;

/**
 * A memory estimate before a run, so that an image too large for the Java heap is refused at once with a clear
 * message instead of failing with an OutOfMemoryError half-way (and after minutes of work).
 *
 * <p>Each operation estimates what it will allocate (e.g. {@link #floats} of the padded grid times the number of
 * work buffers) and calls {@link #require}. The estimate is compared with the memory still free for Java: the
 * maximum heap minus what is in use now. That is conservative when garbage is waiting to be collected.
 */
public final class MemoryCheck {

    private static final double MB = 1024.0 * 1024.0;

    private MemoryCheck() {
    }

    /** @return bytes of {@code count} float arrays of {@code voxels} each */
    public static long floats(long voxels, int count) {
        return Math.multiplyExact(Math.multiplyExact(voxels, 4L), (long) count);
    }

    /** @return bytes still available to Java: maximum heap minus the heap in use */
    public static long available() {
        Runtime rt = Runtime.getRuntime();
        return rt.maxMemory() - (rt.totalMemory() - rt.freeMemory());
    }

    /**
     * Refuses a run that needs more memory than the heap has left.
     *
     * @param what what needs the memory, e.g. "deconvolve of 2048x2048x200"
     * @param bytes estimated bytes needed
     * @throws IllegalArgumentException giving both numbers and what to do
     */
    public static void require(String what, long bytes) {
        require(what, bytes, available(), Runtime.getRuntime().maxMemory());
    }

    /** As {@link #require(String, long)} with the available and maximum heap given (for tests). */
    public static void require(String what, long bytes, long available, long maxHeap) {
        if (bytes > available) {
            throw new IllegalArgumentException(String.format(Locale.ROOT,
                    "%s needs about %.0f MB of memory but only %.0f MB are free for Java (maximum heap %.0f MB);"
                    + " give Java more memory (java -Xmx..., or Edit>Options>Memory in ImageJ) or use a smaller image",
                    what, bytes / MB, Math.max(0, available) / MB, maxHeap / MB));
        }
    }
}
