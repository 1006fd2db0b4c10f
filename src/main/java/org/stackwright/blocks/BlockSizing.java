package org.stackwright.blocks;

import java.util.Locale;

/**
 * Chooses the core size of blocks from a memory budget: the largest cores whose read box (core plus halo) the
 * operation can process within the budget. Starts from the whole volume and cuts the axis with the largest core
 * into one more piece until a block fits, so a volume that fits is one block and a thin stack is cut in x and y
 * before z.
 */
public final class BlockSizing {

    /** Memory one block needs, as the operation estimates it for a read box of w x h x d voxels. */
    @FunctionalInterface
    public interface BlockBytes {
        long of(int w, int h, int d);
    }

    private BlockSizing() {
    }

    /**
     * @param dims volume size (x, y, z)
     * @param halo halo per axis
     * @param budget bytes one block may use
     * @param bytes the operation's estimate
     * @param wholeDepth true when a block must hold every plane (the operation works across all planes)
     * @return core size per axis
     * @throws IllegalArgumentException naming memory when not even the smallest block fits
     */
    public static int[] auto(int[] dims, int[] halo, long budget, BlockBytes bytes, boolean wholeDepth) {
        int[] pieces = {1, 1, 1};
        int[] core = dims.clone();
        while (true) {
            int w = Math.min(dims[0], core[0] + 2 * halo[0]);
            int h = Math.min(dims[1], core[1] + 2 * halo[1]);
            int d = Math.min(dims[2], core[2] + 2 * halo[2]);
            long need = bytes.of(w, h, d);
            if (need <= budget) {
                return core;
            }
            int axis = -1;
            for (int a = 0; a < 3; a++) {
                if (a == 2 && wholeDepth) {
                    continue;
                }
                // cutting below the halo costs more reading than it saves; z last among equals
                if (core[a] > 1 && (axis < 0 || core[a] > core[axis])) {
                    axis = a;
                }
            }
            if (axis < 0 || core[axis] <= Math.max(1, halo[axis] / 4)) {
                throw new IllegalArgumentException(String.format(Locale.ROOT, "memory: %.0f MB is not enough for even"
                        + " the smallest block (%dx%dx%d with its halo needs about %.0f MB); give more memory"
                        + " (--memory, or java -Xmx...)", budget / 1048576.0, w, h, d, need / 1048576.0));
            }
            pieces[axis]++;
            core[axis] = (dims[axis] + pieces[axis] - 1) / pieces[axis];
        }
    }
}
