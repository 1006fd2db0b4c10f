package org.stackwright.repair;

/**
 * A geometric multigrid V-cycle used as the preconditioner of {@link ConjugateGradient} for harmonic (L_UU) and
 * biharmonic ((L_.U)^T L_.U) fills of large holes, where a diagonal preconditioner needs iterations growing with
 * the hole size (its condition number grows as size^2 for L and size^4 for L^2).
 *
 * <p>The unknowns are placed on the bounding box of the mask (one pixel of known margin, the z range whole).
 * Coarser levels halve x and y (z is kept: semi-coarsening, as the z step of a stack is usually the weaker
 * coupling); a coarse cell is unknown when all its fine children are, so every level keeps a known cell and its
 * operator stays positive definite. Transfers are cell-centred bilinear interpolation P and restriction R = P^T;
 * the coarse operator is the same stencil rediscretised on the coarse spacing and scaled by 4 per level, which is
 * what the Galerkin product P^T A P gives for smooth functions. Smoothing is lexicographic Gauss-Seidel, forward
 * before the coarse correction and backward after it, so the V-cycle is a symmetric positive definite operator
 * and CG keeps its guarantees: the multigrid-preconditioned CG converges to the same solution as the plain one.
 * The coarsest level is relaxed by repeated symmetric Gauss-Seidel sweeps.
 *
 * <p>Sources: Briggs, Henson & McCormick, "A Multigrid Tutorial", 2nd ed., SIAM 2000 (V-cycle, ch. 3; cell-centred
 * transfers and Galerkin scaling, ch. 5 and 8); Trottenberg, Oosterlee & Schueller, "Multigrid", Academic Press
 * 2001 (semi-coarsening for anisotropic operators, sec. 5.1; multigrid as a preconditioner of CG, sec. 7.8);
 * Tatebe, "The multigrid preconditioned conjugate gradient method", 6th Copper Mountain Conf. on Multigrid
 * Methods, NASA CP 3224, 1993 (symmetry conditions for the V-cycle).
 *
 * <p>Work arrays are allocated once, in the constructor; {@link #apply} allocates nothing and runs on the
 * calling thread (Gauss-Seidel is sequential), so its result does not depend on the thread count.
 */
final class Multigrid implements ConjugateGradient.Preconditioner {

    /** Gauss-Seidel sweeps before and after each coarse correction */
    static final int SMOOTHING = 2;
    /** symmetric Gauss-Seidel sweep pairs on the coarsest level */
    static final int COARSEST_SWEEPS = 30;
    /** coarsening stops below this many unknowns */
    static final int COARSEST_SIZE = 64;

    /** One grid level: a box of cells, which of them are unknown, the stencil weights and the work vectors. */
    private static final class Level {
        final int w;
        final int h;
        final int d;
        /** neighbour weights along x, y, z of the rediscretised Laplacian */
        final double wx;
        final double wy;
        final double wz;
        /** Galerkin scale of the operator on this level */
        final double scale;
        /** whether the image continues beyond the box on the -x, +x, -y, +y sides */
        final boolean[] open;
        final boolean[] active;
        final int activeCount;
        final double[] e;
        final double[] f;
        final double[] r;
        /** L e, kept current during biharmonic smoothing */
        final double[] t;

        Level(int w, int h, int d, double wx, double wy, double wz, double scale, boolean[] open, boolean[] active,
                boolean biharmonic) {
            this.w = w;
            this.h = h;
            this.d = d;
            this.wx = wx;
            this.wy = wy;
            this.wz = wz;
            this.scale = scale;
            this.open = open;
            this.active = active;
            int c = 0;
            for (boolean b : active) {
                if (b) {
                    c++;
                }
            }
            this.activeCount = c;
            int n = w * h * d;
            e = new double[n];
            f = new double[n];
            r = new double[n];
            t = biharmonic ? new double[n] : null;
        }

        /** Sum of the weights of the cell's neighbours inside the image (the diagonal of L). */
        double degree(int x, int y, int z) {
            double s = 0;
            if (x > 0 || open[0]) {
                s += wx;
            }
            if (x < w - 1 || open[1]) {
                s += wx;
            }
            if (y > 0 || open[2]) {
                s += wy;
            }
            if (y < h - 1 || open[3]) {
                s += wy;
            }
            if (z > 0) {
                s += wz;
            }
            if (z < d - 1) {
                s += wz;
            }
            return s;
        }

        /** Sum of the squared weights of the in-image neighbours (with degree^2 the diagonal of L^2). */
        double squaredWeights(int x, int y, int z) {
            double s = 0;
            if (x > 0 || open[0]) {
                s += wx * wx;
            }
            if (x < w - 1 || open[1]) {
                s += wx * wx;
            }
            if (y > 0 || open[2]) {
                s += wy * wy;
            }
            if (y < h - 1 || open[3]) {
                s += wy * wy;
            }
            if (z > 0) {
                s += wz * wz;
            }
            if (z < d - 1) {
                s += wz * wz;
            }
            return s;
        }

        /** sum over the in-box neighbours q of w_q v_q */
        double neighbourSum(double[] v, int i, int x, int y, int z) {
            int plane = w * h;
            double s = 0;
            if (x > 0) {
                s += wx * v[i - 1];
            }
            if (x < w - 1) {
                s += wx * v[i + 1];
            }
            if (y > 0) {
                s += wy * v[i - w];
            }
            if (y < h - 1) {
                s += wy * v[i + w];
            }
            if (z > 0) {
                s += wz * v[i - plane];
            }
            if (z < d - 1) {
                s += wz * v[i + plane];
            }
            return s;
        }
    }

    private final Level[] levels;
    private final int[] boxIndex;
    private final boolean biharmonic;

    /**
     * @param g the unknowns and the weights of the fine grid; not modified
     * @param biharmonic true for the operator (L_.U)^T L_.U of {@link BiharmonicFill}, false for L_UU of
     *     {@link HarmonicFill}
     */
    Multigrid(MaskedGrid g, boolean biharmonic) {
        this.biharmonic = biharmonic;
        int plane = g.w * g.h;
        int x0 = g.w;
        int y0 = g.h;
        int x1 = -1;
        int y1 = -1;
        int[] idx = g.unknown.index;
        for (int i : idx) {
            int x = i % g.w;
            int y = (i / g.w) % g.h;
            x0 = Math.min(x0, x);
            x1 = Math.max(x1, x);
            y0 = Math.min(y0, y);
            y1 = Math.max(y1, y);
        }
        x0 = Math.max(0, x0 - 1);
        y0 = Math.max(0, y0 - 1);
        x1 = Math.min(g.w - 1, x1 + 1);
        y1 = Math.min(g.h - 1, y1 + 1);
        int bw = x1 - x0 + 1;
        int bh = y1 - y0 + 1;
        boolean[] open = {x0 > 0, x1 < g.w - 1, y0 > 0, y1 < g.h - 1};
        boolean[] active = new boolean[bw * bh * g.d];
        boxIndex = new int[idx.length];
        for (int j = 0; j < idx.length; j++) {
            int i = idx[j];
            int x = i % g.w - x0;
            int y = (i / g.w) % g.h - y0;
            int z = i / plane;
            boxIndex[j] = (z * bh + y) * bw + x;
            active[boxIndex[j]] = true;
        }
        java.util.List<Level> list = new java.util.ArrayList<>();
        Level fine = new Level(bw, bh, g.d, g.axisWeight[0], g.axisWeight[1], g.axisWeight[2], 1, open, active,
                biharmonic);
        list.add(fine);
        Level cur = fine;
        int k = 0;
        while (cur.activeCount > COARSEST_SIZE && cur.w > 2 && cur.h > 2) {
            Level next = coarsen(cur, ++k);
            if (next.activeCount == 0) {
                break;
            }
            list.add(next);
            cur = next;
        }
        levels = list.toArray(new Level[0]);
    }

    /** @return number of grid levels (1 = no coarsening was possible) */
    int levels() {
        return levels.length;
    }

    private Level coarsen(Level fine, int k) {
        int cw = (fine.w + 1) / 2;
        int ch = (fine.h + 1) / 2;
        int d = fine.d;
        boolean[] act = new boolean[cw * ch * d];
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < ch; y++) {
                for (int x = 0; x < cw; x++) {
                    boolean all = true;
                    for (int b = 0; b < 2 && all; b++) {
                        for (int a = 0; a < 2 && all; a++) {
                            int fx = 2 * x + a;
                            int fy = 2 * y + b;
                            if (fx < fine.w && fy < fine.h) {
                                all = fine.active[(z * fine.h + fy) * fine.w + fx];
                            }
                        }
                    }
                    act[(z * ch + y) * cw + x] = all;
                }
            }
        }
        double s = Math.pow(4, k);
        // spacing doubles in x and y: their weights 1 / h^2 fall by 4; z is not coarsened
        return new Level(cw, ch, d, fine.wx / 4, fine.wy / 4, fine.wz, s, fine.open, act, biharmonic);
    }

    @Override
    public void apply(double[] in, double[] out) {
        Level top = levels[0];
        java.util.Arrays.fill(top.f, 0);
        for (int j = 0; j < boxIndex.length; j++) {
            top.f[boxIndex[j]] = in[j];
        }
        cycle(0);
        for (int j = 0; j < boxIndex.length; j++) {
            out[j] = top.e[boxIndex[j]];
        }
    }

    private void cycle(int k) {
        Level l = levels[k];
        java.util.Arrays.fill(l.e, 0);
        if (biharmonic) {
            java.util.Arrays.fill(l.t, 0);
        }
        if (k == levels.length - 1) {
            for (int s = 0; s < COARSEST_SWEEPS; s++) {
                sweep(l, true);
                sweep(l, false);
            }
            return;
        }
        for (int s = 0; s < SMOOTHING; s++) {
            sweep(l, true);
        }
        residual(l);
        Level c = levels[k + 1];
        restrict(l, c);
        cycle(k + 1);
        prolongAdd(c, l);
        if (biharmonic) {
            laplacian(l, l.e, l.t);
        }
        for (int s = 0; s < SMOOTHING; s++) {
            sweep(l, false);
        }
    }

    /** One Gauss-Seidel sweep over the unknown cells, in index order (forward) or reverse. */
    private void sweep(Level l, boolean forward) {
        int n = l.w * l.h * l.d;
        int plane = l.w * l.h;
        for (int c = 0; c < n; c++) {
            int i = forward ? c : n - 1 - c;
            if (!l.active[i]) {
                continue;
            }
            int x = i % l.w;
            int y = (i / l.w) % l.h;
            int z = i / plane;
            double deg = l.degree(x, y, z);
            if (!biharmonic) {
                l.e[i] = (l.f[i] / l.scale + l.neighbourSum(l.e, i, x, y, z)) / deg;
                continue;
            }
            double res = l.f[i] - l.scale * (deg * l.t[i] - l.neighbourSum(l.t, i, x, y, z));
            double delta = res / (l.scale * (deg * deg + l.squaredWeights(x, y, z)));
            l.e[i] += delta;
            l.t[i] += deg * delta;
            if (x > 0) {
                l.t[i - 1] -= l.wx * delta;
            }
            if (x < l.w - 1) {
                l.t[i + 1] -= l.wx * delta;
            }
            if (y > 0) {
                l.t[i - l.w] -= l.wy * delta;
            }
            if (y < l.h - 1) {
                l.t[i + l.w] -= l.wy * delta;
            }
            if (z > 0) {
                l.t[i - plane] -= l.wz * delta;
            }
            if (z < l.d - 1) {
                l.t[i + plane] -= l.wz * delta;
            }
        }
    }

    /** out = L v over the whole box (v is zero outside the unknowns). */
    private static void laplacian(Level l, double[] v, double[] out) {
        int plane = l.w * l.h;
        for (int z = 0, i = 0; z < l.d; z++) {
            for (int y = 0; y < l.h; y++) {
                for (int x = 0; x < l.w; x++, i++) {
                    out[i] = l.degree(x, y, z) * v[i] - l.neighbourSum(v, i, x, y, z);
                }
            }
        }
    }

    /** r = f - A e on the unknown cells, 0 elsewhere. */
    private void residual(Level l) {
        int plane = l.w * l.h;
        double[] src = biharmonic ? l.t : l.e;
        for (int z = 0, i = 0; z < l.d; z++) {
            for (int y = 0; y < l.h; y++) {
                for (int x = 0; x < l.w; x++, i++) {
                    l.r[i] = l.active[i]
                            ? l.f[i] - l.scale * (l.degree(x, y, z) * src[i] - l.neighbourSum(src, i, x, y, z))
                            : 0;
                }
            }
        }
    }

    /** coarse.f = P^T fine.r, restricted to the coarse unknowns. */
    private static void restrict(Level fine, Level coarse) {
        java.util.Arrays.fill(coarse.f, 0);
        int cw = coarse.w;
        int ch = coarse.h;
        for (int z = 0, i = 0; z < fine.d; z++) {
            for (int y = 0; y < fine.h; y++) {
                for (int x = 0; x < fine.w; x++, i++) {
                    double v = fine.r[i];
                    if (v == 0) {
                        continue;
                    }
                    int cx = x >> 1;
                    int cy = y >> 1;
                    int nx = clamp(cx + ((x & 1) == 0 ? -1 : 1), cw);
                    int ny = clamp(cy + ((y & 1) == 0 ? -1 : 1), ch);
                    int base = z * cw * ch;
                    coarse.f[base + cy * cw + cx] += 0.5625 * v;
                    coarse.f[base + cy * cw + nx] += 0.1875 * v;
                    coarse.f[base + ny * cw + cx] += 0.1875 * v;
                    coarse.f[base + ny * cw + nx] += 0.0625 * v;
                }
            }
        }
        for (int i = 0; i < coarse.f.length; i++) {
            if (!coarse.active[i]) {
                coarse.f[i] = 0;
            }
        }
    }

    /** fine.e += P coarse.e on the fine unknowns. */
    private static void prolongAdd(Level coarse, Level fine) {
        int cw = coarse.w;
        int ch = coarse.h;
        double[] ce = coarse.e;
        for (int z = 0, i = 0; z < fine.d; z++) {
            for (int y = 0; y < fine.h; y++) {
                for (int x = 0; x < fine.w; x++, i++) {
                    if (!fine.active[i]) {
                        continue;
                    }
                    int cx = x >> 1;
                    int cy = y >> 1;
                    int nx = clamp(cx + ((x & 1) == 0 ? -1 : 1), cw);
                    int ny = clamp(cy + ((y & 1) == 0 ? -1 : 1), ch);
                    int base = z * cw * ch;
                    fine.e[i] += 0.5625 * ce[base + cy * cw + cx] + 0.1875 * ce[base + cy * cw + nx]
                            + 0.1875 * ce[base + ny * cw + cx] + 0.0625 * ce[base + ny * cw + nx];
                }
            }
        }
    }

    private static int clamp(int v, int n) {
        return v < 0 ? 0 : v >= n ? n - 1 : v;
    }
}
