package org.stackwright.solve;

import java.util.Locale;

/**
 * Estimates the heap a deconvolution run needs before anything large is allocated, and refuses a run that cannot
 * fit, with the need and the available heap in the message.
 */
public final class MemoryCheck {

    /**
     * Grid-sized float arrays every run holds besides the solver's own: the normalisation (1), the transfer
     * function and the FFT work spectrum (2 x (nx/2+1)/nx, about 2). Image-sized arrays (input, data in
     * photo-electrons, output) are counted separately.
     */
    static final double PROBLEM_ARRAYS = 3;

    private MemoryCheck() {
    }

    /**
     * @param gridVoxels voxels of the padded grid
     * @param solverArrays grid-sized float arrays the solver allocates
     * @param imageVoxels voxels of the image (input and output copies)
     * @return estimated peak bytes
     */
    public static long estimate(long gridVoxels, double solverArrays, long imageVoxels) {
        double floats = gridVoxels * (PROBLEM_ARRAYS + solverArrays) + 3.0 * imageVoxels;
        return (long) (floats * Float.BYTES);
    }

    /** @return bytes the heap can still give: max heap minus what is in use */
    public static long available() {
        Runtime rt = Runtime.getRuntime();
        return rt.maxMemory() - (rt.totalMemory() - rt.freeMemory());
    }

    /**
     * @param need estimated bytes
     * @param what the image and grid, for the message
     * @throws IllegalArgumentException when need exceeds the available heap
     */
    public static void require(long need, String what) {
        long have = available();
        if (need > have) {
            System.gc();
            have = available();
        }
        if (need > have) {
            throw new IllegalArgumentException(String.format(Locale.ROOT,
                    "not enough memory to deconvolve %s: needs about %s, the Java heap has %s free (maximum %s). "
                            + "Give Java more memory (java -Xmx..., or Edit>Options>Memory in ImageJ), crop the image, "
                            + "or use --boundary periodic (smaller grid)",
                    what, mib(need), mib(have), mib(Runtime.getRuntime().maxMemory())));
        }
    }

    static String mib(long bytes) {
        return String.format(Locale.ROOT, "%.0f MiB", bytes / 1048576.0);
    }
}
