package org.stackwright.solve;

import org.stackwright.model.BlurOperator;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.model.TotalVariation;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;

/**
 * Total-variation regularised deconvolution by the first-order primal-dual algorithm of Chambolle &amp; Pock, "A
 * first-order primal-dual algorithm for convex problems with applications to imaging", J Math Imaging Vis 40,
 * 2011 (Algorithm 1, theta = 1). It solves
 *
 * <pre>
 *   min over 0 &lt;= x &lt;= U of  F1(H x) + lambda TV(x)
 *   F1(u) = sum_w [ (u + b) - y + y ln(y / (u + b)) ]     (Poisson: Kullback-Leibler)   or
 *   F1(u) = sum_w (u + b - y)^2 / 2                        (Gaussian, photo-electron units)
 * </pre>
 *
 * with K = (H, D), dual variables p1 (data) and p2 (gradient):
 *
 * <pre>
 *   p1 &lt;- prox_{sigma F1*}(p1 + sigma H xbar)      Poisson: p = ((1 + t) - sqrt((t - 1)^2 + 4 sigma y)) / 2, t = q + sigma b
 *   p2 &lt;- projection onto |p2_i| &lt;= lambda of (p2 + sigma D xbar)
 *   x_new &lt;- clamp(x - tau (H^T p1 + D^T p2), 0, U);   xbar &lt;- 2 x_new - x
 * </pre>
 *
 * Step sizes tau = c / L, sigma = 1 / (c L) with L^2 = ||H||^2 + ||D||^2 (||H|| = 1 for a unit-sum PSF) and
 * c = 10 x the mean signal per trusted pixel, which balances primal (photo-electrons) and dual (order one)
 * scales (the factor was chosen by trial on invented specimens). By default the balance c is then adapted during the
 * run by residual balancing ({@link StepBalance}; Goldstein, Li, Yuan, Esser &amp; Baraniuk, NIPS 2015) with tau sigma
 * kept constant and a decaying adaptivity, which keeps the convergence and the solution. Non-negativity alone makes the dual objective
 * infinite whenever K^T p has a negative entry; the gap is therefore taken for the problem restricted to
 * 0 &lt;= x &lt;= U with U = 2 max(x_k), which holds the solution once the iterates settle:
 * gap = P(x) - D(p), D(p) = -F1*(p1) - U sum max(-(K^T p), 0). H x_new is
 * computed each iteration (two FFT convolutions per iteration) and H xbar = 2 H x_new - H x follows by linearity.
 *
 * <p>Objective per iteration: P(x) per trusted pixel. The "change" reported per iteration is the relative gap
 * (P - D) / |P|, which the {@link StopRule#CHANGE} rule compares with its tolerance. The automatic rule stops when
 * the objective has settled within its statistical fluctuation ({@link Stopping#settled}); the gap, bounded with the
 * box U, stays large long after the estimate has stopped changing (relative gap 0.03 after 1500 iterations on the
 * invented test stacks, where the error had settled after about 1000).
 */
public final class PrimalDualTv implements Solver {

    /** The data term. */
    public enum DataTerm { POISSON, GAUSSIAN }

    /** Safety bound on x, in units of the brightest data value; never reached by a sensible estimate. */
    private static final double BOX = 1000;
    /**
     * Primal / dual step balance in units of the mean signal, chosen by trial (common practice, no source) on the
     * invented exact-model stack of tools/reference/make_deconvolution_conditions.py, lambda 0.0012, error after 600
     * iterations: 0.387 with 1, 0.202 with 10, 0.185 with 30, 0.186 with 100 (which oscillates early on); but with 30
     * the gap of a small bright specimen (PrimalDualTvTest) no longer reached 1e-5 in 3000 iterations, so 10 stays.
     */
    private static final double STEP_BALANCE = 10;

    private final Stopping stopping;
    private final double lambda;
    private final DataTerm dataTerm;
    private final double meanSignal;
    private final boolean adaptive;

    /**
     * @param stopping when to stop; CHANGE stops on the relative primal-dual gap
     * @param lambda regularisation weight, positive
     * @param dataTerm Poisson (Kullback-Leibler) or Gaussian (least squares)
     */
    public PrimalDualTv(Stopping stopping, double lambda, DataTerm dataTerm) {
        this(stopping, lambda, dataTerm, true);
    }

    /**
     * @param adaptive true to adapt the step balance during the run ({@link StepBalance}, residual balancing of
     *     Goldstein et al. 2015), false for the constant balance
     */
    public PrimalDualTv(Stopping stopping, double lambda, DataTerm dataTerm, boolean adaptive) {
        this(stopping, lambda, dataTerm, Double.NaN, adaptive);
    }

    /**
     * As above, with the mean signal that sets the step sizes given instead of taken from the problem: the blocks
     * of one volume take the whole volume's, so that they all take the same steps and agree where they meet. Blocks
     * keep the balance constant ({@code adaptive} false): adapted, each block would take its own steps.
     *
     * @param meanSignal mean of max(y - b, 0) per trusted pixel in photo-electrons, or NaN to compute it
     * @param adaptive true to adapt the step balance during the run
     */
    public PrimalDualTv(Stopping stopping, double lambda, DataTerm dataTerm, double meanSignal, boolean adaptive) {
        this.meanSignal = meanSignal;
        this.adaptive = adaptive;
        if (!(lambda > 0) || !Double.isFinite(lambda)) {
            throw new IllegalArgumentException("regularization = " + lambda + " is not allowed for total-variation; give a positive number");
        }
        this.stopping = stopping;
        this.lambda = lambda;
        this.dataTerm = dataTerm;
    }

    @Override
    public String method() {
        return "total-variation";
    }

    @Override
    public String objectiveName() {
        return "primal objective (" + (dataTerm == DataTerm.POISSON ? "Kullback-Leibler" : "least squares")
                + " + lambda TV) per trusted pixel";
    }

    @Override
    public double gridArrays() {
        return adaptive ? 10 : 9;
    }

    @Override
    public Solution solve(DeconvolutionProblem p, RunContext context, IterationListener listener) {
        int n = p.gridLength();
        BlurOperator h = p.blur();
        Workers workers = p.workers();
        float[] norm = p.normalisation();
        float[] y = p.dataOnGrid();
        float b = p.background();
        TotalVariation tv = new TotalVariation(p.gridWidth(), p.gridHeight(), p.gridDepth(), p.zWeight(), workers);
        float[] x = new float[n];
        p.initialEstimate(x);
        float[] xbar = x.clone();
        float[] hx = new float[n];
        float[] buf = new float[n];
        float[] p1 = new float[n];
        float[] px = new float[n];
        float[] py = new float[n];
        float[] pz = new float[n];
        h.apply(x, hx);
        System.arraycopy(hx, 0, buf, 0, n);
        double signal = 0;
        double brightest = 0;
        for (float v : y) {
            if (v >= 0) {
                signal += Math.max(v - b, 0);
                brightest = Math.max(brightest, v - b);
            }
        }
        double trusted = p.trustedPixels();
        double scale = Math.max(Double.isNaN(meanSignal) ? signal / trusted : meanSignal, 1e-3);
        double l = Math.sqrt(1 + tv.normSquaredBound());
        StepBalance steps = new StepBalance(STEP_BALANCE * scale, l, scale, adaptive);
        // K^T p of the previous iteration, for the primal residual of the adapted steps
        float[] ktPrevious = adaptive ? new float[n] : null;
        final float upper = (float) (BOX * Math.max(brightest, 1));
        final float lam = (float) lambda;
        final boolean poisson = dataTerm == DataTerm.POISSON;
        final double floor = p.modelFloor();
        Sums dualSums = new Sums(2);
        Sums primalSums = new Sums(3);
        Sums fitSums = new Sums(2);
        IterationLog log = new IterationLog(method(), stopping, context, listener);
        log.stopWhenSettled();
        while (true) {
            log.before();
            final float sigma = steps.sigma();
            final double inverseSigma = 1.0 / sigma;
            final boolean residual = adaptive;
            // dual step for the data term; buf holds H xbar, hx holds H x (x is the iterate xbar extrapolates); with
            // adapted steps also the data part of the dual residual |(p1_old - p1_new) / sigma + H xbar - H x|
            double[] dualPass = dualSums.run(workers, n, (from, to, acc) -> {
                double s = 0;
                double r = 0;
                for (int i = from; i < to; i++) {
                    float yi = y[i];
                    if (yi < 0) {
                        p1[i] = 0f;
                        continue;
                    }
                    double q = p1[i] + sigma * buf[i];
                    double v;
                    if (poisson) {
                        double t = q + sigma * b;
                        v = 0.5 * ((1 + t) - Math.sqrt((t - 1) * (t - 1) + 4 * sigma * yi));
                        s += v * b + (yi > 0 ? yi * Math.log(1 - v) : 0);
                    } else {
                        v = (q - sigma * (yi - b)) / (1 + sigma);
                        s -= 0.5 * v * v + v * (yi - b);
                    }
                    if (residual) {
                        r += Math.abs((p1[i] - (float) v) * inverseSigma + buf[i] - hx[i]);
                    }
                    p1[i] = (float) v;
                }
                acc[0] += s;
                acc[1] += r;
            });
            double dualData = dualPass[0];
            double dualResidual = dualPass[1];
            if (adaptive) {
                dualResidual += tv.dualStepResidual(xbar, x, sigma, lam, px, py, pz);
            } else {
                tv.dualStep(xbar, sigma, lam, px, py, pz);
            }
            // K^T p = H^T p1 + D^T p2
            h.applyAdjoint(p1, buf);
            tv.adjoint(px, py, pz, buf, true);
            if (adaptive) {
                // the primal residual of the pair (the last primal step, this dual step), then the steps adapted
                // before the next primal step (Goldstein et al. 2015); on the first iteration no primal step came yet
                double primalResidual = primalResidual(workers, n, norm, x, xbar, buf, ktPrevious, steps.tau());
                if (log.done() > 0) {
                    steps.balance(primalResidual, dualResidual);
                }
            }
            final float tau = steps.tau();
            double[] s = primalSums.run(workers, n, (from, to, acc) -> {
                double neg = 0;
                double dd = 0;
                double xx = 0;
                for (int i = from; i < to; i++) {
                    float old = x[i];
                    float nv = 0f;
                    if (norm[i] > 0) {
                        float kt = buf[i];
                        if (kt < 0) {
                            neg -= kt;
                        }
                        nv = Math.min(Math.max(old - tau * kt, 0f), upper);
                    }
                    x[i] = nv;
                    xbar[i] = 2 * nv - old;
                    double diff = nv - old;
                    dd += diff * diff;
                    xx += (double) old * old;
                }
                acc[0] += neg;
                acc[1] += dd;
                acc[2] += xx;
            });
            // dual objective for the problem restricted to 0 <= x <= U with U = 2 max x (holds the solution once
            // the iterates settle): G*(-K^T p) = U sum max(-(K^T p), 0)
            double bound = 2 * Sums.maxAtLeastZero(x);
            double dual = dualData - bound * s[0];
            // H x_new; H xbar = 2 H x_new - H x; primal objective at x_new
            h.apply(x, buf);
            double held = p.heldOutFit(buf);
            double[] f = fitSums.run(workers, n, (from, to, acc) -> {
                double primal = 0;
                double kl = 0;
                for (int i = from; i < to; i++) {
                    float hn = buf[i];
                    float yi = y[i];
                    if (yi >= 0) {
                        double m = Math.max(hn + b, floor);
                        double k = yi > 0 ? yi * Math.log(yi / m) - yi + m : m;
                        kl += k;
                        primal += poisson ? k : 0.5 * (hn + b - yi) * (hn + b - yi);
                    }
                    buf[i] = 2 * hn - hx[i];
                    hx[i] = hn;
                }
                acc[0] += primal;
                acc[1] += kl;
            });
            double primal = f[0] + lambda * tv.value(x);
            double gap = (primal - dual) / Math.max(Math.abs(primal), 1e-300);
            log.fluctuation(Math.sqrt(2 / trusted) * f[0] / trusted);
            if (log.after(primal / trusted, f[1] / trusted, p.expectedFit(), gap, held, x)) {
                break;
            }
        }
        Solution s = log.finish(x);
        return new Solution(s.estimate(), s.iterations(), s.stopReason() + "; " + steps.describe(), s.objective(),
                s.change(), s.seconds());
    }

    /**
     * The l1 norm of the primal residual (x_previous - x) / tau - (K^T p_previous - K^T p) over the trusted voxels,
     * with x_previous = 2 x - xbar; stores K^T p as the next iteration's previous.
     *
     * @param kt K^T p of this iteration, not modified
     * @param ktPrevious K^T p of the previous iteration, overwritten by kt
     * @param tau the step of the last primal step
     */
    private static double primalResidual(Workers workers, int n, float[] norm, float[] x, float[] xbar, float[] kt,
            float[] ktPrevious, float tau) {
        final double inverseTau = 1.0 / tau;
        return workers.sum(n, (from, to) -> {
            double r = 0;
            for (int i = from; i < to; i++) {
                if (norm[i] > 0) {
                    r += Math.abs((x[i] - xbar[i]) * inverseTau - ktPrevious[i] + kt[i]);
                }
                ktPrevious[i] = kt[i];
            }
            return r;
        });
    }
}
