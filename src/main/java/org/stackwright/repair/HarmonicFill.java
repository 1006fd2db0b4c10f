package org.stackwright.repair;

import org.stackwright.parallel.Workers;

/**
 * Harmonic inpainting: the filled pixels solve the discrete Laplace equation (L u)_p = 0 at every unknown p, with
 * the known pixels as Dirichlet boundary values and a reflecting boundary at the image border. With L the weighted
 * 5-point (2D) or 7-point (3D) Laplacian of {@link MaskedGrid}, the unknowns satisfy the symmetric positive
 * definite system L_UU u_U = -L_UK f_K, solved by {@link ConjugateGradient}.
 *
 * <p>A harmonic function interpolates linear functions exactly (the discrete Laplacian of a linear function is
 * zero away from the border), so a hole in a ramp is filled with the ramp; edges through a hole are smeared
 * across it. Good for dead pixels and thin seams.
 */
final class HarmonicFill {

    private HarmonicFill() {
    }

    /**
     * @param f image values; read at known pixels, not modified
     * @param g the unknowns and their neighbours
     * @param solver how the system is solved (the answer is the same to the tolerance)
     * @param out receives the filled values at the unknown linear indices (other entries untouched)
     * @return what the solver did
     */
    static ConjugateGradient.Outcome fill(float[] f, MaskedGrid g, double tolerance, int maxIterations,
            Inpainting.Solver solver, Workers workers, float[] out) {
        int n = g.size();
        int m = g.stride();
        MaskedGrid.IndexSet u = g.unknown;
        double[] b = new double[n];
        for (int j = 0; j < n; j++) {
            double s = 0;
            for (int k = 0; k < m; k++) {
                int q = u.nbrLinear[j * m + k];
                if (q >= 0 && u.nbrPos[j * m + k] < 0) {
                    s += g.weight(k) * f[q];
                }
            }
            b[j] = s;
        }
        double[] x = new double[n];
        int depth = g.onionGuess(f, x);
        ConjugateGradient.Operator a = (in, res) -> workers.forRange(n, (from, to) -> {
            for (int j = from; j < to; j++) {
                double s = u.degree[j] * in[j];
                for (int k = 0; k < m; k++) {
                    int qp = u.nbrPos[j * m + k];
                    if (qp >= 0) {
                        s -= g.weight(k) * in[qp];
                    }
                }
                res[j] = s;
            }
        });
        ConjugateGradient cg = new ConjugateGradient(n, tolerance, maxIterations, workers);
        ConjugateGradient.Outcome o = solver.multigrid(depth) ? cg.solve(a, new Multigrid(g, false), b, x)
                : cg.solve(a, u.degree, b, x);
        for (int j = 0; j < n; j++) {
            out[u.index[j]] = (float) x[j];
        }
        return o;
    }
}
