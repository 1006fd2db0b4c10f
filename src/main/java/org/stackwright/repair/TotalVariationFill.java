package org.stackwright.repair;

/**
 * Total-variation inpainting (Chan & Shen, "Mathematical models for local nontexture inpaintings", SIAM J. Appl.
 * Math. 62(3):1019-1043, 2002): the filled pixels minimise the isotropic total variation
 * TV(u) = sum_p |grad u(p)| (Rudin, Osher & Fatemi, Physica D 60:259-268, 1992) with the known pixels held fixed.
 * Edges that cross a hole are continued as sharp edges instead of being smeared as by harmonic filling.
 *
 * <p>Solver: the first-order primal-dual algorithm of Chambolle & Pock ("A first-order primal-dual algorithm for
 * convex problems with applications to imaging", J. Math. Imaging Vis. 40:120-145, 2011, Algorithm 1) for
 * min_u F(K u) + G(u) with K = grad (forward differences, scaled per axis by the calibrated spacing, reflecting
 * border), F = the sum of Euclidean norms, G = the indicator of {u : u = f on known pixels}:
 * p <- proj_{|p| <= 1}(p + sigma grad ubar); u' <- proj_G(u + tau div p); ubar <- 2 u' - u; tau sigma ||K||^2 <= 1
 * with ||K||^2 <= 4 sum_k s_k^2. The work happens in the bounding box of the mask grown by 2 pixels (terms of TV
 * that touch no unknown are constants). Starts from the harmonic fill; stops when the largest change of a filled
 * pixel over an iteration falls below tolerance times the data range (looked at after {@link #MIN_ITERATIONS}),
 * or after maxIterations.
 *
 * <p>Kept apart from {@code model.TotalVariation} (the deconvolution's D, D^T and dual step) on purpose: this fill
 * iterates in double precision because its stopping rule compares the change per iteration with the tolerance
 * times the data range (default 1e-7, allowed down to 1e-12), at or below float rounding; it weights y as well
 * as z by the calibrated spacing; and it fuses the primal step, the projection onto the known pixels, the
 * over-relaxation and the largest change into one pass over the bounding box.
 */
final class TotalVariationFill {

    /**
     * Iterations before the stopping rule is looked at: the harmonic start has zero divergence of the gradient at
     * every filled pixel, so the first updates are tiny until the dual variable reaches the unit ball.
     */
    static final int MIN_ITERATIONS = 200;

    /** What a run did. */
    record Outcome(int iterations, double lastChange, boolean converged) {
    }

    private TotalVariationFill() {
    }

    /**
     * @param f the image (w x h x d), not modified
     * @param fill true at pixels to fill, not modified
     * @param spacing calibrated spacing per axis (x, y, z); only ratios matter
     * @param start starting values at the filled pixels (e.g. the harmonic fill), full size, not modified
     * @param out receives the filled values at filled pixels (others untouched)
     */
    static Outcome fill(float[] f, boolean[] fill, int w, int h, int d, double[] spacing, float[] start,
            double tolerance, int maxIterations, float[] out) {
        int x0 = w;
        int y0 = h;
        int z0 = d;
        int x1 = -1;
        int y1 = -1;
        int z1 = -1;
        float lo = Float.POSITIVE_INFINITY;
        float hi = Float.NEGATIVE_INFINITY;
        for (int z = 0, i = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++, i++) {
                    if (fill[i]) {
                        x0 = Math.min(x0, x);
                        x1 = Math.max(x1, x);
                        y0 = Math.min(y0, y);
                        y1 = Math.max(y1, y);
                        z0 = Math.min(z0, z);
                        z1 = Math.max(z1, z);
                    } else {
                        lo = Math.min(lo, f[i]);
                        hi = Math.max(hi, f[i]);
                    }
                }
            }
        }
        if (x1 < 0) {
            return new Outcome(0, 0, true);
        }
        int g = 2;
        x0 = Math.max(0, x0 - g);
        y0 = Math.max(0, y0 - g);
        z0 = Math.max(0, z0 - g);
        x1 = Math.min(w - 1, x1 + g);
        y1 = Math.min(h - 1, y1 + g);
        z1 = Math.min(d - 1, z1 + g);
        int bw = x1 - x0 + 1;
        int bh = y1 - y0 + 1;
        int bd = z1 - z0 + 1;
        int n = bw * bh * bd;
        boolean is3d = d > 1;
        double sx = 1;
        double sy = spacing[0] / spacing[1];
        double sz = is3d ? spacing[0] / spacing[2] : 0;
        double norm2 = 4 * (sx * sx + sy * sy + sz * sz);
        double tau = 1 / Math.sqrt(norm2);
        double sigma = tau;
        double[] u = new double[n];
        double[] ubar = new double[n];
        double[] px = new double[n];
        double[] py = new double[n];
        double[] pz = is3d ? new double[n] : null;
        boolean[] free = new boolean[n];
        int[] map = new int[n];
        for (int z = 0, b = 0; z < bd; z++) {
            for (int y = 0; y < bh; y++) {
                for (int x = 0; x < bw; x++, b++) {
                    int i = ((z + z0) * h + (y + y0)) * w + (x + x0);
                    map[b] = i;
                    free[b] = fill[i];
                    u[b] = fill[i] ? start[i] : f[i];
                    ubar[b] = u[b];
                }
            }
        }
        double stop = tolerance * Math.max(hi - lo, Float.MIN_NORMAL);
        int plane = bw * bh;
        int it = 0;
        double change = Double.POSITIVE_INFINITY;
        while (it < maxIterations && (it < MIN_ITERATIONS || change > stop)) {
            // dual ascent and projection onto the unit ball, pointwise
            for (int z = 0, b = 0; z < bd; z++) {
                for (int y = 0; y < bh; y++) {
                    for (int x = 0; x < bw; x++, b++) {
                        double gx = x < bw - 1 ? sx * (ubar[b + 1] - ubar[b]) : 0;
                        double gy = y < bh - 1 ? sy * (ubar[b + bw] - ubar[b]) : 0;
                        double qx = px[b] + sigma * gx;
                        double qy = py[b] + sigma * gy;
                        double qz = 0;
                        if (is3d) {
                            double gz = z < bd - 1 ? sz * (ubar[b + plane] - ubar[b]) : 0;
                            qz = pz[b] + sigma * gz;
                        }
                        double len = Math.sqrt(qx * qx + qy * qy + qz * qz);
                        double scale = len > 1 ? 1 / len : 1;
                        px[b] = qx * scale;
                        py[b] = qy * scale;
                        if (is3d) {
                            pz[b] = qz * scale;
                        }
                    }
                }
            }
            // primal descent u + tau div p on free pixels (known pixels stay fixed), over-relaxation
            change = 0;
            for (int z = 0, b = 0; z < bd; z++) {
                for (int y = 0; y < bh; y++) {
                    for (int x = 0; x < bw; x++, b++) {
                        if (!free[b]) {
                            ubar[b] = u[b];
                            continue;
                        }
                        double div = sx * ((x < bw - 1 ? px[b] : 0) - (x > 0 ? px[b - 1] : 0))
                                + sy * ((y < bh - 1 ? py[b] : 0) - (y > 0 ? py[b - bw] : 0));
                        if (is3d) {
                            div += sz * ((z < bd - 1 ? pz[b] : 0) - (z > 0 ? pz[b - plane] : 0));
                        }
                        double old = u[b];
                        double nu = old + tau * div;
                        u[b] = nu;
                        ubar[b] = 2 * nu - old;
                        change = Math.max(change, Math.abs(nu - old));
                    }
                }
            }
            it++;
        }
        for (int b = 0; b < n; b++) {
            if (free[b]) {
                out[map[b]] = (float) u[b];
            }
        }
        return new Outcome(it, change, change <= stop);
    }
}
