package org.stackwright.solve;

import org.stackwright.fft.WorkGrid;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;

/**
 * Richardson-Lucy deconvolution (Richardson, "Bayesian-based iterative method of image restoration", JOSA 62,
 * 1972; Lucy, "An iterative technique for the rectification of observed distributions", AJ 79, 1974), the EM
 * algorithm for Poisson data (Shepp &amp; Vardi, IEEE TMI 1, 1982), with background, weights and non-negativity:
 *
 * <pre>
 *   x_{k+1} = x_k / (H^T w) * H^T( w y / (H x_k + b) )
 * </pre>
 *
 * with w = 0 outside the data and on masked pixels and H^T w as normalisation (Bertero &amp; Boccacci 2005; see
 * {@link DeconvolutionProblem}). Each iteration costs one blur and one correlation (4 FFTs) and two fused
 * element-wise passes (three when accelerated): the ratio with the data fit, and the update. They run on the
 * operator's work grid ({@link org.stackwright.model.OperatorWork}, through {@link CorrectionStep}), where the transforms leave their result (FFTW's native buffer or the
 * Java engine's in-place array): the update writes the next input of the blur there too, so no grid is copied
 * between a Java array and the transforms' buffer. Nothing is allocated inside the loop.
 *
 * <p><b>Acceleration</b> (optional): vector extrapolation of Biggs &amp; Andrews, "Acceleration of iterative image
 * restoration algorithms", Applied Optics 36(8), 1997: with g_k = psi(y_k) - y_k the last RL step,
 * alpha_k = sum(g_k g_{k-1}) / sum(g_{k-1} g_{k-1}) and x_{k+1} = psi(y_k), the next point is
 * y_{k+1} = x_{k+1} + alpha_k (x_{k+1} - x_k). Safeguards: alpha = 0 for the first two iterations, alpha clamped
 * to [0, 0.95], alpha reset to 0 after an iteration whose data fit got worse, and voxels that the extrapolation
 * would make negative keep their RL value.
 *
 * <p>Objective per iteration: the mean Kullback-Leibler divergence per trusted pixel (the negative Poisson
 * log-likelihood up to a constant) of the estimate that entered the iteration (the extrapolated point when
 * accelerated).
 */
public final class RichardsonLucy implements Solver {

    private static final double MAX_ALPHA = 0.95;

    private final Stopping stopping;
    private final boolean accelerated;
    /** extrapolation steps fixed beforehand (index k-1 for iteration k), or null to compute them */
    private final double[] fixedSteps;
    private double[] usedSteps = new double[0];

    /**
     * @param stopping when to stop
     * @param accelerated true for vector extrapolation
     */
    public RichardsonLucy(Stopping stopping, boolean accelerated) {
        this.stopping = stopping;
        this.accelerated = accelerated;
        this.fixedSteps = null;
    }

    /**
     * Accelerated, with the extrapolation step of every iteration given instead of computed: the blocks of one
     * volume use the steps of one representative run, so that they all take the same update and agree where they
     * meet (alpha is a sum over the whole grid, which each block would otherwise take over itself alone).
     *
     * @param stopping when to stop
     * @param steps alpha per iteration (index k-1 for iteration k); 0 past the end; not modified
     */
    public RichardsonLucy(Stopping stopping, double[] steps) {
        this.stopping = stopping;
        this.accelerated = true;
        this.fixedSteps = steps.clone();
    }

    /** @return the extrapolation step of each iteration of the last accelerated run (index k-1 for iteration k) */
    public double[] steps() {
        return usedSteps.clone();
    }

    @Override
    public String method() {
        return "richardson-lucy";
    }

    @Override
    public String objectiveName() {
        return "mean Kullback-Leibler divergence of the data from the model per trusted pixel";
    }

    @Override
    public double gridArrays() {
        return accelerated ? 4 : 2;
    }

    @Override
    public Solution solve(DeconvolutionProblem p, RunContext context, IterationListener listener) {
        int n = p.gridLength();
        float[] x = new float[n];
        p.initialEstimate(x);
        return solve(p, x, context, listener);
    }

    /**
     * Runs from a given start.
     *
     * @param x start estimate on the grid; overwritten and returned as the result's estimate
     */
    public Solution solve(DeconvolutionProblem p, float[] x, RunContext context, IterationListener listener) {
        return accelerated ? accelerated(p, x, context, listener) : plain(p, x, context, listener);
    }

    private Solution plain(DeconvolutionProblem p, float[] x, RunContext context, IterationListener listener) {
        CorrectionStep step = new CorrectionStep(p);
        IterationLog log = new IterationLog(method(), stopping, context, listener);
        while (true) {
            log.before();
            step.run(x);
            double fit = step.fit();
            // x <- x H^T(ratio) / H^T w, also left in the work grid as the next iteration's input
            double change = step.update(x, null, 0f);
            if (log.after(fit, fit, p.expectedFit(), change, step.held(), x)) {
                break;
            }
        }
        return log.finish(x);
    }

    private Solution accelerated(DeconvolutionProblem p, float[] y, RunContext context, IterationListener listener) {
        int n = p.gridLength();
        Workers workers = p.workers();
        float[] norm = p.normalisation();
        CorrectionStep step = new CorrectionStep(p);
        WorkGrid buf = step.grid();
        float[] xOld = y.clone();
        // the last RL step, for the extrapolation's alpha only, kept in 16 bits ({@link #toHalf}); not needed when the
        // steps are given
        short[] gPrev = fixedSteps == null ? new short[n] : null;
        Sums sums = new Sums(4);
        IterationLog log = new IterationLog(method(), stopping, context, listener);
        double lastFit = Double.POSITIVE_INFINITY;
        int k = 0;
        java.util.List<Double> steps = new java.util.ArrayList<>();
        while (true) {
            log.before();
            step.run(y);
            double fit = step.fit();
            // buf <- psi(y) = x_{k+1}; g = x_{k+1} - y; sums for alpha and for the change x_{k+1} - x_k
            double[] s = sums.run(workers, n, (from, to, acc) -> buf.update(from, to, (a, at, index, count) -> {
                double gg = acc[0];
                double pp = acc[1];
                double dd = acc[2];
                double xx = acc[3];
                for (int j = 0; j < count; j++) {
                    int i = index + j;
                    float yi = y[i];
                    float xn = norm[i] > 0 ? yi * Math.max(a[at + j], 0f) / norm[i] : 0f;
                    a[at + j] = xn;
                    if (gPrev != null) {
                        float g = xn - yi;
                        float gp = fromHalf(gPrev[i]);
                        gg += (double) g * gp;
                        pp += (double) gp * gp;
                        gPrev[i] = toHalf(g);
                    }
                    double diff = xn - xOld[i];
                    dd += diff * diff;
                    xx += (double) xOld[i] * xOld[i];
                }
                acc[0] = gg;
                acc[1] = pp;
                acc[2] = dd;
                acc[3] = xx;
            }));
            k++;
            double alpha = 0;
            if (fixedSteps != null) {
                alpha = k <= fixedSteps.length ? fixedSteps[k - 1] : 0;
            } else if (k >= 3 && s[1] > 0 && fit <= lastFit) {
                alpha = Math.max(0, Math.min(MAX_ALPHA, s[0] / s[1]));
            }
            steps.add(alpha);
            lastFit = fit;
            double change = Math.sqrt(s[2] / Math.max(s[3], 1e-300));
            final float a = (float) alpha;
            // y <- the extrapolated point, also left in the work grid as the next iteration's input; xOld <- x_{k+1}
            workers.forRange(n, (from, to) -> buf.update(from, to, (w, at, index, count) -> {
                for (int j = 0; j < count; j++) {
                    int i = index + j;
                    float xn = w[at + j];
                    float next = xn + a * (xn - xOld[i]);
                    float yn = next >= 0 ? next : xn;
                    y[i] = yn;
                    w[at + j] = yn;
                    xOld[i] = xn;
                }
            }));
            step.holdsNext();
            if (log.after(fit, fit, p.expectedFit(), change, step.held(), xOld)) {
                break;
            }
        }
        usedSteps = steps.stream().mapToDouble(Double::doubleValue).toArray();
        return log.finish(xOld);
    }

    /**
     * A float rounded to its upper 16 bits (sign, the float's 8-bit exponent and 7 stored mantissa bits, the
     * "bfloat16" format; round to nearest, ties to even): half the memory of a float, with a relative rounding
     * error of at most 2^-8. The previous RL step serves only the extrapolation's step alpha, a ratio of two sums
     * over the whole grid clamped to [0, 0.95], where these errors average out; keeping it in 16 bits brings
     * accelerated RL to 5.5 grids of floats plus the transfer function (README, Deconvolution).
     */
    static short toHalf(float f) {
        int b = Float.floatToRawIntBits(f);
        return (short) ((b + 0x7FFF + ((b >>> 16) & 1)) >>> 16);
    }

    /** @return the float a {@link #toHalf} value stands for */
    static float fromHalf(short h) {
        return Float.intBitsToFloat(h << 16);
    }
}
