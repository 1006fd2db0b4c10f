package org.stackwright.solve;

import org.stackwright.fft.WorkGrid;
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
        WorkGrid buf = step.grid();
        Workers workers = p.workers();
        float[] norm = p.normalisation();
        float[] x = new float[n];
        p.initialEstimate(x);
        float[] curv = new float[n];
        TotalVariation tv = new TotalVariation(p.gridWidth(), p.gridHeight(), p.gridDepth(), p.zWeight(), workers);
        double eps = 1e-3 * Math.max(Sums.maxAtLeastZero(x), 1e-6);
        Sums sums = new Sums(2);
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
            double[] s = sums.run(workers, n, (from, to, acc) -> buf.update(from, to, (a, at, index, count) -> {
                double dd = acc[0];
                double xx = acc[1];
                for (int j = 0; j < count; j++) {
                    int i = index + j;
                    float old = x[i];
                    float nv = 0f;
                    if (norm[i] > 0) {
                        float den = Math.max(norm[i] - lam * curv[i], 0.5f * norm[i]);
                        nv = old * Math.max(a[at + j], 0f) / den;
                    }
                    x[i] = nv;
                    a[at + j] = nv;
                    double diff = nv - old;
                    dd += diff * diff;
                    xx += (double) old * old;
                }
                acc[0] = dd;
                acc[1] = xx;
            }));
            step.holdsNext();
            double change = Math.sqrt(s[0] / Math.max(s[1], 1e-300));
            if (log.after(fit + lambda * tvValue / trusted, fit, p.expectedFit(), change, step.held(), x)) {
                break;
            }
        }
        return log.finish(x);
    }
}
