package org.stackwright.blocks;

import java.util.Locale;

/**
 * Chooses automatic blocks from a memory budget: of all the ways to cut the volume into n_x x n_y x n_z blocks whose
 * largest block fits the budget, the one whose blocks do the least work in all (for deconvolution: the fewest FFT
 * grid voxels, summed over the blocks), fewer blocks among equals. The work of a block grows with its halo and, for
 * deconvolution, with the padding of its grid to a fast FFT size, so this prefers few large blocks, keeps the whole
 * depth in a block when the stack is thin (a cut in z adds a z halo), and takes the number of pieces whose grids
 * land on fast sizes.
 *
 * <p>Cores are cut so that every block reads a box of the same size: the cores at the volume's faces are one halo
 * wider than the inner ones (a face needs no halo; the whole-volume run pays the same boundary there).
 */
public final class BlockSizing {

    /** Memory or work of one block, as the operation estimates it for a read box of w x h x d voxels. */
    @FunctionalInterface
    public interface BlockBytes {
        long of(int w, int h, int d);
    }

    /** Pieces beyond the fewest that fit, tried per axis (a fast grid size may make one more piece cheaper). */
    private static final int EXTRA = 2;

    private BlockSizing() {
    }

    /**
     * @param dims volume size (x, y, z)
     * @param halo halo per axis
     * @param budget bytes one block may use
     * @param bytes the operation's memory estimate
     * @param work the operation's work of one block (compared between plans only)
     * @param wholeDepth true when a block must hold every plane (the operation works across all planes)
     * @return the plan of least work within the budget
     * @throws IllegalArgumentException naming memory when not even the smallest block fits
     */
    public static BlockPlan auto(int[] dims, int[] halo, long budget, BlockBytes bytes, BlockBytes work,
            boolean wholeDepth) {
        int[] most = new int[3];
        for (int a = 0; a < 3; a++) {
            // cores below a quarter of the halo cost more reading than they save
            int smallest = Math.max(1, (halo[a] + 3) / 4);
            most[a] = a == 2 && wholeDepth ? 1 : Math.max(1, dims[a] / smallest);
        }
        int[] best = null;
        double bestWork = Double.POSITIVE_INFINITY;
        int fitsY = Integer.MAX_VALUE - EXTRA;
        for (int nz = 1; nz <= most[2]; nz++) {
            for (int ny = 1; ny <= most[1] && ny <= fitsY + EXTRA; ny++) {
                int nx = fewest(dims, halo, budget, bytes, ny, nz, most[0]);
                if (nx < 0) {
                    continue;
                }
                if (nx == 1) {
                    fitsY = Math.min(fitsY, ny);
                }
                for (int k = nx; k <= Math.min(most[0], nx + EXTRA); k++) {
                    int[] n = {k, ny, nz};
                    double w = work(dims, halo, n, work);
                    if (w < bestWork * (1 - 1e-9) || (w <= bestWork * (1 + 1e-9) && count(n) < count(best))) {
                        best = n;
                        bestWork = Math.min(w, bestWork);
                    }
                }
            }
            if (best != null && best[2] < nz - EXTRA) {
                break;
            }
        }
        if (best == null) {
            int[] r = new int[3];
            for (int a = 0; a < 3; a++) {
                r[a] = reads(dims[a], halo[a], most[a])[0];
            }
            long need = bytes.of(r[0], r[1], r[2]);
            throw new IllegalArgumentException(String.format(Locale.ROOT, "memory: %.0f MB is not enough for even"
                    + " the smallest block (%dx%dx%d with its halo needs about %.0f MB); give more memory"
                    + " (--memory, or java -Xmx...)", budget / 1048576.0, r[0], r[1], r[2], need / 1048576.0));
        }
        return BlockPlan.ofStarts(dims[0], dims[1], dims[2], new int[][] {starts(dims[0], halo[0], best[0]),
            starts(dims[1], halo[1], best[1]), starts(dims[2], halo[2], best[2])}, halo);
    }

    private static long count(int[] n) {
        return n == null ? Long.MAX_VALUE : (long) n[0] * n[1] * n[2];
    }

    /** @return the fewest pieces in x for which the largest block fits, or -1 when none does */
    private static int fewest(int[] dims, int[] halo, long budget, BlockBytes bytes, int ny, int nz, int most) {
        int h = reads(dims[1], halo[1], ny)[0];
        int d = reads(dims[2], halo[2], nz)[0];
        if (bytes.of(reads(dims[0], halo[0], most)[0], h, d) > budget) {
            return -1;
        }
        // the largest read shrinks as pieces grow, and the estimate grows with the read: bisect
        int lo = 1;
        int hi = most;
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            if (bytes.of(reads(dims[0], halo[0], mid)[0], h, d) <= budget) {
                hi = mid;
            } else {
                lo = mid + 1;
            }
        }
        return lo;
    }

    /** @return the work of all blocks of a cut into n pieces per axis */
    private static double work(int[] dims, int[] halo, int[] n, BlockBytes work) {
        int[][] r = {reads(dims[0], halo[0], n[0]), reads(dims[1], halo[1], n[1]), reads(dims[2], halo[2], n[2])};
        double sum = 0;
        for (int i = 0; i < r[0].length; i += 2) {
            for (int j = 0; j < r[1].length; j += 2) {
                for (int k = 0; k < r[2].length; k += 2) {
                    sum += (double) r[0][i + 1] * r[1][j + 1] * r[2][k + 1] * work.of(r[0][i], r[1][j], r[2][k]);
                }
            }
        }
        return sum;
    }

    /**
     * @return the read sizes of a cut of an axis into pieces, as pairs (read size, how many), the largest first
     */
    static int[] reads(int length, int halo, int pieces) {
        int[] s = starts(length, halo, pieces);
        java.util.TreeMap<Integer, Integer> m = new java.util.TreeMap<>(java.util.Comparator.reverseOrder());
        for (int i = 0; i < pieces; i++) {
            int r = Math.min(length, s[i + 1] + halo) - Math.max(0, s[i] - halo);
            m.merge(r, 1, Integer::sum);
        }
        int[] out = new int[2 * m.size()];
        int k = 0;
        for (java.util.Map.Entry<Integer, Integer> e : m.entrySet()) {
            out[k++] = e.getKey();
            out[k++] = e.getValue();
        }
        return out;
    }

    /**
     * @return where the cores of an axis cut into pieces start (and, last, the length): the cores at the faces one
     *     halo wider than the inner ones, so every piece reads the same size; evened out when the axis is too short
     *     for that
     */
    static int[] starts(int length, int halo, int pieces) {
        int[] s = new int[pieces + 1];
        int inner = length - 2 * halo;
        boolean equalReads = pieces > 1 && halo > 0 && inner >= pieces;
        for (int i = 0; i <= pieces; i++) {
            s[i] = i == 0 ? 0 : i == pieces ? length
                    : equalReads ? halo + (int) ((long) inner * i / pieces) : (int) ((long) length * i / pieces);
        }
        return s;
    }
}
