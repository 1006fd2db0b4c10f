package org.stackwright.solve;

import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;

/**
 * One-step Wiener / Tikhonov deconvolution with a flat noise-to-signal ratio lambda (Wiener, "Extrapolation,
 * Interpolation, and Smoothing of Stationary Time Series", 1949; Tikhonov &amp; Arsenin, "Solutions of Ill-Posed
 * Problems", 1977):
 *
 * <pre>
 *   x = F^-1[ conj(H^) F(y - b) / (|H^|^2 + lambda) ]
 * </pre>
 *
 * on the problem's grid. Pixels without likelihood inside the image are filled with the mean of the trusted data
 * and the padding with the image mirrored at its edges, so the filter sees no artificial step. Linear: fast and
 * good for a preview or a baseline, but it does not keep the result non-negative (ringing below zero is kept, not
 * hidden) and it does not use the Poisson statistics.
 */
public final class WienerFilter implements Solver {

    private final double lambda;

    /** @param lambda regularisation relative to |H^(0)|^2 = 1, positive (typical 1e-4 to 1e-1) */
    public WienerFilter(double lambda) {
        if (!(lambda > 0) || !Double.isFinite(lambda)) {
            throw new IllegalArgumentException("regularization = " + lambda + " is not allowed for wiener; give a positive number");
        }
        this.lambda = lambda;
    }

    @Override
    public String method() {
        return "wiener";
    }

    @Override
    public String objectiveName() {
        return "mean Kullback-Leibler divergence of the data from the model per trusted pixel (after the one step)";
    }

    @Override
    public double gridArrays() {
        return 2;
    }

    @Override
    public Solution solve(DeconvolutionProblem p, RunContext context, IterationListener listener) {
        long t0 = System.nanoTime();
        context.checkCancelled();
        int nx = p.gridWidth();
        int ny = p.gridHeight();
        int nz = p.gridDepth();
        float[] y = p.dataWindow();
        float b = p.background();
        // the image occupies the corner [0, w) x [0, h) x [0, d) of the grid
        int w = p.imageWidth();
        int h = p.imageHeight();
        int d = p.imageDepth();
        double sum = 0;
        int count = 0;
        for (float v : y) {
            if (v >= 0) {
                sum += v - b;
                count++;
            }
        }
        float mean = (float) (sum / count);
        float[] g = new float[nx * ny * nz];
        for (int z = 0; z < nz; z++) {
            int sz = mirror(z, d);
            for (int yy = 0; yy < ny; yy++) {
                int sy = mirror(yy, h);
                for (int x = 0; x < nx; x++) {
                    float v = y[(sz * h + sy) * w + mirror(x, w)];
                    g[(z * ny + yy) * nx + x] = v >= 0 ? v - b : mean;
                }
            }
        }
        p.blur().tikhonov(g, g, lambda);
        float[] work = new float[g.length];
        double fit = p.meanFit(clampedCopy(g, work), work);
        listener.iteration(1, 1, fit, Double.NaN);
        context.progress(1, "wiener done");
        return new Solution(g, 1, "one step (wiener has no iterations)", new double[] {fit}, new double[] {Double.NaN},
                (System.nanoTime() - t0) * 1e-9);
    }

    private static float[] clampedCopy(float[] g, float[] out) {
        for (int i = 0; i < g.length; i++) {
            out[i] = Math.max(g[i], 0f);
        }
        return out;
    }

    /** Mirror index into [0, n) about the edge voxels' outer faces (period 2n). */
    static int mirror(int i, int n) {
        int m = Math.floorMod(i, 2 * n);
        return m < n ? m : 2 * n - 1 - m;
    }
}
