package org.stackwright.op;

import java.util.Locale;

/**
 * A memory estimate before a run, so that an image too large for the Java heap is refused at once with a clear
 * message instead of failing with an OutOfMemoryError half-way (and after minutes of work).
 *
 * <p>Each operation estimates what it will allocate (e.g. {@link #floats} of the padded grid times the number of
 * work buffers) and calls {@link #require}. The estimate is compared with the memory still free for Java: the
 * maximum heap minus what is in use now. That is conservative when garbage is waiting to be collected.
 *
 * <p>The system property {@value #LIMIT_PROPERTY} (megabytes) lowers the memory a run may use below the heap, for
 * a shared machine that runs several jobs at once, and for tests of the refusal without a huge image.
 */
public final class MemoryCheck {

    private static final double MB = 1024.0 * 1024.0;

    /** System property: the most memory, in MB, a run may use (optional; never more than the heap). */
    public static final String LIMIT_PROPERTY = "stackwright.memory-limit-mb";

    private MemoryCheck() {
    }

    /** @return bytes of {@code count} float arrays of {@code voxels} each */
    public static long floats(long voxels, int count) {
        return Math.multiplyExact(Math.multiplyExact(voxels, 4L), (long) count);
    }

    /** @return bytes still available to Java: maximum heap minus the heap in use */
    public static long available() {
        Runtime rt = Runtime.getRuntime();
        return Math.min(rt.maxMemory() - (rt.totalMemory() - rt.freeMemory()), limit());
    }

    /** @return the memory limit set by {@value #LIMIT_PROPERTY} in bytes, or the maximum heap when unset */
    static long limit() {
        long max = Runtime.getRuntime().maxMemory();
        String mb = System.getProperty(LIMIT_PROPERTY);
        if (mb == null || mb.isBlank()) {
            return max;
        }
        try {
            return Math.min(max, (long) (Double.parseDouble(mb.trim()) * MB));
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException(LIMIT_PROPERTY + " = '" + mb + "' is not a number; give megabytes");
        }
    }

    /**
     * Refuses a run that needs more memory than the heap has left.
     *
     * @param what what needs the memory, e.g. "deconvolve of 2048x2048x200"
     * @param bytes estimated bytes needed
     * @throws IllegalArgumentException giving both numbers and what to do
     */
    public static void require(String what, long bytes) {
        long have = available();
        if (bytes > have) {
            System.gc();
            have = available();
        }
        try {
            require(what, bytes, have, limit());
        } catch (IllegalArgumentException e) {
            if (System.getProperty(LIMIT_PROPERTY) == null) {
                throw e;
            }
            throw new IllegalArgumentException(e.getMessage() + " (the limit is lowered by -D" + LIMIT_PROPERTY + "="
                    + System.getProperty(LIMIT_PROPERTY) + ")");
        }
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
