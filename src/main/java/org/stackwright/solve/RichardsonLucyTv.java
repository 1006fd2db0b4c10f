package org.stackwright.solve;

import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.model.TotalVariation;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;

/**
 * Richardson-Lucy with total-variation regularisation (Dey, Blanc-Feraud, Zimmer, Roux, Kam, Olivo-Marin &amp;
 * Zerubia, "Richardson-Lucy algorithm with total variation regularization for 3D confocal microscope
 * deconvolution", Microscopy Research and Technique 69, 2006), the one-step-late multiplicative update for
 * KL(y | Hx + b) + lambda TV(x):
 *
 * <pre>
 *   x_{k+1} = x_k / (H^T w - lambda div(D x_k / |D x_k|_eps)) * H^T( w y / (H x_k + b) )
 * </pre>
 *
 * with the weights, background and anisotropic TV of {@link DeconvolutionProblem} and {@link TotalVariation}
 * (eps = 1e-3 of the start value keeps the curvature finite in flat regions). Safeguard (common practice; Dey et al.
 * note that lambda must keep the denominator positive): the denominator is held at or above half of H^T w.
 *
 * <p>Objective per iteration: (KL + lambda TV) per trusted pixel of the estimate that entered the iteration.
 */
public final class RichardsonLucyTv implements Solver {

    private final Stopping stopping;
    private final double lambda;

    /**
     * @param stopping when to stop
     * @param lambda regularisation weight, at least 0 (typical 1e-4 to 1e-2; 0 gives plain Richardson-Lucy)
     */
    public RichardsonLucyTv(Stopping stopping, double lambda) {
        if (!(lambda >= 0) || !Double.isFinite(lambda)) {
            throw new IllegalArgumentException("regularization = " + lambda + " is not allowed; give 0 or more");
        }
        this.stopping = stopping;
        this.lambda = lambda;
    }

    @Override
    public String method() {
        return "richardson-lucy-tv";
    }

    @Override
    public String objectiveName() {
        return "(Kullback-Leibler divergence + lambda TV) per trusted pixel";
    }

    @Override
    public double gridArrays() {
        return 3;
    }

    @Override
    public Solution solve(DeconvolutionProblem p, RunContext context, IterationListener listener) {
        int n = p.gridLength();
        p.blur(); // throws for a depth-variant problem: this solver needs one PSF
        CorrectionStep step = new CorrectionStep(p);
        Workers workers = p.workers();
        float[] x = new float[n];
        p.initialEstimate(x);
        float[] curv = new float[n];
        TotalVariation tv = new TotalVariation(p.gridWidth(), p.gridHeight(), p.gridDepth(), p.zWeight(), workers);
        double eps = 1e-3 * Math.max(Sums.maxAtLeastZero(x), 1e-6);
        IterationLog log = new IterationLog(method(), stopping, context, listener);
        if (lambda > 0) {
            log.stopWhenLevelledOff(p.heldOutPixels());
        }
        double trusted = p.trustedPixels();
        final float lam = (float) lambda;
        while (true) {
            log.before();
            double tvValue = lambda > 0 ? tv.value(x) : 0;
            if (lambda > 0) {
                tv.curvature(x, eps, curv);
            }
            step.run(x);
            double fit = step.fit();
            double change = step.update(x, curv, lam);
            if (log.after(fit + lambda * tvValue / trusted, fit, p.expectedFit(), change, step.held(), x)) {
                break;
            }
        }
        return log.finish(x);
    }
}
