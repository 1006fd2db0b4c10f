package org.stackwright.repair;

import java.util.Arrays;

/**
 * The unknown pixels of one inpainting problem on a regular grid, and their neighbour tables for the weighted
 * graph Laplacian (L u)_p = sum_q w_pq (u_p - u_q) over the 4 (2D) or 6 (3D) face neighbours q of p that lie inside
 * the image. Neighbours outside the image are left out, which is the reflecting (Neumann) boundary. The weight of
 * the neighbours along axis k is 1 / h_k^2 (h_k = calibrated spacing, x taken as 1), so a z step larger than the
 * pixel gives a weaker coupling in z: the standard finite-difference Laplacian on an anisotropic grid.
 *
 * <p>Two index sets are built: the unknowns U (the masked pixels) and, on request, the ring set S = U plus every
 * pixel next to U, which the bi-Laplacian needs. Each set keeps, per member and direction, the linear index of the
 * neighbour (-1 outside the image) and its position in the set (-1 when not a member). Built once per problem; the
 * solvers read it without allocating.
 */
final class MaskedGrid {

    final int w;
    final int h;
    final int d;
    /** number of axes: 2 for a plane, 3 for a volume */
    final int axes;
    /** neighbour weight per axis (x, y, z) */
    final double[] axisWeight;
    /** the unknowns */
    final IndexSet unknown;
    /** position of each linear index in {@link #unknown}, -1 when known */
    final int[] unknownPos;

    /** A set of pixels with their neighbour tables (2 * axes entries per member: -x, +x, -y, +y, -z, +z). */
    static final class IndexSet {
        final int[] index;
        final int[] nbrLinear;
        final int[] nbrPos;
        /** sum of the weights of the in-image neighbours (the diagonal of L) */
        final double[] degree;

        IndexSet(int[] index, int[] nbrLinear, int[] nbrPos, double[] degree) {
            this.index = index;
            this.nbrLinear = nbrLinear;
            this.nbrPos = nbrPos;
            this.degree = degree;
        }

        int size() {
            return index.length;
        }
    }

    /**
     * @param w width
     * @param h height
     * @param d depth (1 for a plane)
     * @param spacing calibrated spacing per axis (x, y, z); only the ratios matter
     * @param fill true for each linear index to be filled; not modified
     */
    MaskedGrid(int w, int h, int d, double[] spacing, boolean[] fill) {
        this.w = w;
        this.h = h;
        this.d = d;
        this.axes = d > 1 ? 3 : 2;
        this.axisWeight = new double[3];
        for (int k = 0; k < 3; k++) {
            axisWeight[k] = (spacing[0] * spacing[0]) / (spacing[k] * spacing[k]);
        }
        int n = 0;
        for (boolean b : fill) {
            if (b) {
                n++;
            }
        }
        int[] idx = new int[n];
        unknownPos = new int[fill.length];
        Arrays.fill(unknownPos, -1);
        int j = 0;
        for (int i = 0; i < fill.length; i++) {
            if (fill[i]) {
                unknownPos[i] = j;
                idx[j++] = i;
            }
        }
        unknown = tables(idx, unknownPos);
    }

    /** Builds neighbour tables for the members (linear indices, ascending) with the position map pos. */
    private IndexSet tables(int[] idx, int[] pos) {
        int m = 2 * axes;
        int[] lin = new int[idx.length * m];
        int[] p = new int[idx.length * m];
        double[] deg = new double[idx.length];
        int plane = w * h;
        for (int j = 0; j < idx.length; j++) {
            int i = idx[j];
            int x = i % w;
            int y = (i / w) % h;
            int z = i / plane;
            int[] nb = {x > 0 ? i - 1 : -1, x < w - 1 ? i + 1 : -1, y > 0 ? i - w : -1, y < h - 1 ? i + w : -1,
                z > 0 ? i - plane : -1, z < d - 1 ? i + plane : -1};
            double s = 0;
            for (int k = 0; k < m; k++) {
                lin[j * m + k] = nb[k];
                p[j * m + k] = nb[k] < 0 ? -1 : pos[nb[k]];
                if (nb[k] >= 0) {
                    s += axisWeight[k / 2];
                }
            }
            deg[j] = s;
        }
        return new IndexSet(idx, lin, p, deg);
    }

    /** @return the number of unknowns */
    int size() {
        return unknown.size();
    }

    /** @return neighbours per member (4 or 6) */
    int stride() {
        return 2 * axes;
    }

    /** @return weight of direction k (0..5) */
    double weight(int k) {
        return axisWeight[k / 2];
    }

    /**
     * The ring set S = U plus all in-image neighbours of U; the unknowns come first in S in the same order, so the
     * position of an unknown in S equals its position in U. Allocates a position map of the grid's size.
     */
    IndexSet ring() {
        int[] pos = new int[w * h * d];
        Arrays.fill(pos, -1);
        int n = unknown.size();
        int[] list = Arrays.copyOf(unknown.index, Math.max(16, n * 2));
        for (int j = 0; j < n; j++) {
            pos[unknown.index[j]] = j;
        }
        int count = n;
        int m = stride();
        for (int j = 0; j < n; j++) {
            for (int k = 0; k < m; k++) {
                int q = unknown.nbrLinear[j * m + k];
                if (q >= 0 && pos[q] < 0) {
                    if (count == list.length) {
                        list = Arrays.copyOf(list, list.length * 2);
                    }
                    pos[q] = count;
                    list[count++] = q;
                }
            }
        }
        return tables(Arrays.copyOf(list, count), pos);
    }

    /**
     * A starting guess: unknowns next to known pixels get the weighted mean of their known neighbours, then the
     * next layer the mean of the pixels set so far, and so on inwards ("onion peeling"). Deterministic; it only
     * shortens the iterations of the solvers, which do not depend on it for their answer.
     *
     * @param f the image, read at known pixels
     * @param out one value per unknown, written
     * @return the number of layers: the largest distance (in steps) from an unknown to a known pixel
     */
    int onionGuess(float[] f, double[] out) {
        int n = size();
        int m = stride();
        boolean[] set = new boolean[n];
        int[] frontier = new int[n];
        int[] next = new int[n];
        double[] value = new double[n];
        int done = 0;
        int layers = 0;
        int layerCount = 0;
        for (int j = 0; j < n; j++) {
            frontier[layerCount++] = j;
        }
        while (done < n && layerCount > 0) {
            int nextCount = 0;
            int newly = 0;
            for (int t = 0; t < layerCount; t++) {
                int j = frontier[t];
                double s = 0;
                double ws = 0;
                for (int k = 0; k < m; k++) {
                    int q = unknown.nbrLinear[j * m + k];
                    if (q < 0) {
                        continue;
                    }
                    int qp = unknown.nbrPos[j * m + k];
                    if (qp < 0) {
                        s += weight(k) * f[q];
                        ws += weight(k);
                    } else if (set[qp]) {
                        s += weight(k) * out[qp];
                        ws += weight(k);
                    }
                }
                if (ws > 0) {
                    value[j] = s / ws;
                    frontier[newly++] = j;
                } else {
                    next[nextCount++] = j;
                }
            }
            for (int t = 0; t < newly; t++) {
                int j = frontier[t];
                out[j] = value[j];
                set[j] = true;
            }
            done += newly;
            if (newly == 0) {
                break;
            }
            layers++;
            System.arraycopy(next, 0, frontier, 0, nextCount);
            layerCount = nextCount;
        }
        for (int j = 0; j < n; j++) {
            if (!set[j]) {
                out[j] = 0;
            }
        }
        return layers;
    }
}
