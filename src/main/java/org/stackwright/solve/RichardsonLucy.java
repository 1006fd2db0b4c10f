package org.stackwright.solve;

import org.stackwright.fft.WorkGrid;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;

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
 * y_{k+1} = x_{k+1} + alpha_k (x_{k+1} - x_k) ({@link Extrapolation}, shared with accelerated
 * {@link RichardsonLucyTv}). Safeguards: alpha = 0 for the first two iterations, alpha clamped to [0, 0.95], alpha
 * reset to 0 after an iteration whose data fit got worse, and voxels that the extrapolation would make negative keep
 * their RL value.
 *
 * <p>Objective per iteration: the mean Kullback-Leibler divergence per trusted pixel (the negative Poisson
 * log-likelihood up to a constant) of the estimate that entered the iteration (the extrapolated point when
 * accelerated).
 */
public final class RichardsonLucy implements Solver {

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
        CorrectionStep step = new CorrectionStep(p);
        WorkGrid buf = step.grid();
        Extrapolation ex = new Extrapolation(p, y, fixedSteps);
        IterationLog log = new IterationLog(method(), stopping, context, listener);
        while (true) {
            log.before();
            step.run(y);
            double fit = step.fit();
            // buf <- psi(y) = x_{k+1}, alpha; then y <- the extrapolated point, also left in buf as the next input
            double change = ex.step(buf, y, null, 0f, fit);
            ex.extrapolate(buf, y);
            step.holdsNext();
            if (log.after(fit, fit, p.expectedFit(), change, step.held(), ex.estimate())) {
                break;
            }
        }
        usedSteps = ex.steps();
        return log.finish(ex.estimate());
    }
}
