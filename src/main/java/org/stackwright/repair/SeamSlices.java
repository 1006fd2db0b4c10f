package org.stackwright.repair;

import org.stackwright.volume.Volume;

/**
 * The slices of a stack that seam detection reads. The tiles of a tiled z-stack are placed once for all slices, so
 * every slice has its seams at the same place; the detector's work grows with the slices it reads (measured: a
 * 412 x 276 mosaic took 1.1 s of CPU, the same as 30 slices 27 s). It reads at most {@link #MAX} of them, spread
 * evenly from the first to the last, so out-of-focus ends and the sharpest middle both count.
 */
final class SeamSlices {

    /**
     * At most this many slices are read: the detector's rules were measured on single planes (every draw of the
     * independent generator is one), so a few slices already carry more evidence than they were tuned on; 8 keeps a
     * 2000 x 2000 stack's detection under a minute on one core (common practice with no source for the number).
     */
    static final int MAX = 8;

    private SeamSlices() {
    }

    /** @return the 0-based slices read of a stack of this depth, evenly spread, first and last included */
    static int[] read(int depth) {
        int n = Math.min(depth, MAX);
        int[] z = new int[n];
        for (int i = 0; i < n; i++) {
            z[i] = n == 1 ? 0 : (int) Math.round(i * (depth - 1) / (double) (n - 1));
        }
        return z;
    }

    /** @return v itself when all its slices are read, else a new volume of the slices read (v is not modified) */
    static Volume of(Volume v) {
        if (v.depth() <= MAX) {
            return v;
        }
        int[] z = read(v.depth());
        int plane = v.width() * v.height();
        float[] d = new float[plane * z.length];
        for (int i = 0; i < z.length; i++) {
            System.arraycopy(v.data(), z[i] * plane, d, i * plane, plane);
        }
        return new Volume(v.width(), v.height(), z.length, d, v.voxel());
    }
}
