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
 * <p><b>Acceleration</b> (optional, as for {@link RichardsonLucy}): the update above is a fixed-point iteration
 * x = psi(x), so the vector extrapolation of Biggs &amp; Andrews, Applied Optics 36(8), 1997 applies to it unchanged
 * ({@link Extrapolation}): psi is taken at the extrapolated point y (its curvature, correction and objective at y), and
 * alpha restarts at 0 when the objective at y got worse. Where photon counts are high the automatic lambda is small,
 * the update is nearly plain Richardson-Lucy and needs as many iterations; extrapolated, it needs several times fewer
 * (README, Deconvolution).
 *
 * <p>Objective per iteration: (KL + lambda TV) per trusted pixel of the estimate that entered the iteration (the
 * extrapolated point when accelerated).
 */
public final class RichardsonLucyTv implements Solver {

    private final Stopping stopping;
    private final double lambda;
    private final boolean accelerated;
    /** extrapolation steps fixed beforehand (index k-1 for iteration k), or null to compute them */
    private final double[] fixedSteps;
    private double[] usedSteps = new double[0];

    /**
     * Without acceleration.
     *
     * @param stopping when to stop
     * @param lambda regularisation weight, at least 0 (typical 1e-4 to 1e-2; 0 gives plain Richardson-Lucy)
     */
    public RichardsonLucyTv(Stopping stopping, double lambda) {
        this(stopping, lambda, false, null);
    }

    /**
     * @param stopping when to stop
     * @param lambda regularisation weight, at least 0
     * @param accelerated true for vector extrapolation
     */
    public RichardsonLucyTv(Stopping stopping, double lambda, boolean accelerated) {
        this(stopping, lambda, accelerated, null);
    }

    /**
     * Accelerated, with the extrapolation step of every iteration given instead of computed (the blocks of one
     * volume take the steps of one representative run, as for {@link RichardsonLucy#RichardsonLucy(Stopping,
     * double[])}).
     *
     * @param steps alpha per iteration (index k-1 for iteration k); 0 past the end; not modified
     */
    public RichardsonLucyTv(Stopping stopping, double lambda, double[] steps) {
        this(stopping, lambda, true, steps.clone());
    }

    private RichardsonLucyTv(Stopping stopping, double lambda, boolean accelerated, double[] steps) {
        if (!(lambda >= 0) || !Double.isFinite(lambda)) {
            throw new IllegalArgumentException("regularization = " + lambda + " is not allowed; give 0 or more");
        }
        this.stopping = stopping;
        this.lambda = lambda;
        this.accelerated = accelerated;
        this.fixedSteps = steps;
    }

    /** @return the extrapolation step of each iteration of the last accelerated run (index k-1 for iteration k) */
    public double[] steps() {
        return usedSteps.clone();
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
        return accelerated ? 4.5 : 3;
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
        Extrapolation ex = accelerated ? new Extrapolation(p, x, fixedSteps) : null;
        while (true) {
            log.before();
            double tvValue = lambda > 0 ? tv.value(x) : 0;
            if (lambda > 0) {
                tv.curvature(x, eps, curv);
            }
            step.run(x);
            double fit = step.fit();
            double objective = fit + lambda * tvValue / trusted;
            double change;
            if (ex == null) {
                change = step.update(x, curv, lam);
            } else {
                // grid <- psi(x) = x_{k+1}, alpha; then x <- the extrapolated point, also left in the grid
                change = ex.step(step.grid(), x, lambda > 0 ? curv : null, lam, objective);
                ex.extrapolate(step.grid(), x);
                step.holdsNext();
            }
            if (log.after(objective, fit, p.expectedFit(), change, step.held(), ex == null ? x : ex.estimate())) {
                break;
            }
        }
        if (ex != null) {
            usedSteps = ex.steps();
        }
        return log.finish(ex == null ? x : ex.estimate());
    }
}
