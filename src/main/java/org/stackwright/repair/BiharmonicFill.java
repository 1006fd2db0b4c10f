package org.stackwright.repair;

import org.stackwright.parallel.Workers;

/**
 * Biharmonic inpainting: the filled pixels solve (L^2 u)_p = 0 at every unknown p, L the weighted graph
 * Laplacian of {@link MaskedGrid} (reflecting at the image border). Away from the border L^2 is the 13-point
 * bi-Laplacian stencil, the same equations as skimage.restoration.inpaint_biharmonic; it reproduces every
 * polynomial with zero bi-Laplacian (cubics) exactly (Damelin & Hoang, "On surface completion and image
 * inpainting by biharmonic functions", Int. J. Math. Math. Sci., 2018).
 *
 * <p>Equivalently the fill minimises sum_p (L u)_p^2 over all pixels p: the normal equations
 * (L_{.U})^T L_{.U} u_U = -(L_{.U})^T L_{.K} f_K are symmetric positive definite (the kernel of L is the
 * constants, excluded by any known pixel), solved by {@link ConjugateGradient}. Only the ring set S (unknowns
 * and their neighbours) is touched: L u_U is zero outside S.
 *
 * <p>Smoother than harmonic fills (no kinks at the hole boundary), better for larger holes in smooth regions.
 */
final class BiharmonicFill {

    private BiharmonicFill() {
    }

    /**
     * @param f image values; read at known pixels, not modified
     * @param g the unknowns
     * @param solver how the system is solved (the answer is the same to the tolerance)
     * @param out receives the filled values at the unknown linear indices (other entries untouched)
     */
    static ConjugateGradient.Outcome fill(float[] f, MaskedGrid g, double tolerance, int maxIterations,
            Inpainting.Solver solver, Workers workers, float[] out) {
        int n = g.size();
        int m = g.stride();
        MaskedGrid.IndexSet s = g.ring();
        int ns = s.size();
        // g_s = (L f0)_s on S, f0 = f with the unknowns set to zero; then b = -(L g~)_U.
        double[] t = new double[ns];
        for (int j = 0; j < ns; j++) {
            int i = s.index[j];
            double v = j < n ? 0 : s.degree[j] * f[i];
            for (int k = 0; k < m; k++) {
                int q = s.nbrLinear[j * m + k];
                if (q >= 0 && g.unknownPos[q] < 0) {
                    v -= g.weight(k) * f[q];
                }
            }
            t[j] = v;
        }
        double[] b = new double[n];
        for (int j = 0; j < n; j++) {
            double v = s.degree[j] * t[j];
            for (int k = 0; k < m; k++) {
                int qp = s.nbrPos[j * m + k];
                if (qp >= 0) {
                    v -= g.weight(k) * t[qp];
                }
            }
            b[j] = -v;
        }
        // diagonal of L^2 at an unknown: deg^2 + sum of squared neighbour weights
        double[] diag = new double[n];
        for (int j = 0; j < n; j++) {
            double v = s.degree[j] * s.degree[j];
            for (int k = 0; k < m; k++) {
                if (s.nbrLinear[j * m + k] >= 0) {
                    v += g.weight(k) * g.weight(k);
                }
            }
            diag[j] = v;
        }
        double[] x = new double[n];
        int depth = g.onionGuess(f, x);
        double[] lu = new double[ns];
        ConjugateGradient.Operator a = (in, res) -> {
            workers.forRange(ns, (from, to) -> {
                for (int j = from; j < to; j++) {
                    double v = j < n ? s.degree[j] * in[j] : 0;
                    for (int k = 0; k < m; k++) {
                        int qp = s.nbrPos[j * m + k];
                        if (qp >= 0 && qp < n) {
                            v -= g.weight(k) * in[qp];
                        }
                    }
                    lu[j] = v;
                }
            });
            workers.forRange(n, (from, to) -> {
                for (int j = from; j < to; j++) {
                    double v = s.degree[j] * lu[j];
                    for (int k = 0; k < m; k++) {
                        int qp = s.nbrPos[j * m + k];
                        if (qp >= 0) {
                            v -= g.weight(k) * lu[qp];
                        }
                    }
                    res[j] = v;
                }
            });
        };
        ConjugateGradient cg = new ConjugateGradient(n, tolerance, maxIterations, workers);
        ConjugateGradient.Outcome o = solver.multigrid(depth) ? cg.solve(a, new Multigrid(g, true), b, x)
                : cg.solve(a, diag, b, x);
        for (int j = 0; j < n; j++) {
            out[s.index[j]] = (float) x[j];
        }
        return o;
    }
}
