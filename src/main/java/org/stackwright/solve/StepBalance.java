package org.stackwright.solve;

import java.util.Locale;

/**
 * The primal and dual step sizes of {@link PrimalDualTv}, constant or adapted during the run by residual balancing:
 * Goldstein, Li, Yuan, Esser &amp; Baraniuk, "Adaptive Primal-Dual Splitting Methods for Statistical Learning and
 * Image Processing", NIPS 2015 (adaptive PDHG, residual balancing; earlier as Goldstein, Li &amp; Yuan, "Adaptive
 * primal-dual hybrid gradient methods for saddle-point problems", 2013).
 *
 * <p>After each pair of steps (a primal step and the dual step that follows it) the l1 norms of the primal residual
 * P = (x_old - x_new) / tau - K^T (p_old - p_new) and of the dual residual D = (p_old - p_new) / sigma - K (x_old -
 * x_new) are compared. P is the distance of the pair from the primal optimality condition 0 in dG(x) + K^T p, D
 * from the dual one 0 in dF*(p) - K x; both vanish exactly at a saddle point. When P &gt; s Delta D the primal side
 * lags: tau grows by 1 / (1 - alpha) and sigma shrinks by (1 - alpha); when P &lt; s D / Delta the other way; each
 * change multiplies alpha by eta &lt; 1. Two properties carry the convergence of the constant-step method over:
 * <ul>
 *   <li>tau sigma stays constant, so tau sigma ||K||^2 &lt;= 1 (Chambolle &amp; Pock's condition) holds at every
 *   iteration;</li>
 *   <li>the adaptivity decays: alpha_k = alpha_0 eta^k after k changes, so the sum of all changes is bounded
 *   (alpha_0 / (1 - eta)), the condition of Goldstein et al.'s convergence theorem; after a few hundred changes the
 *   steps are constant for all practical purposes.</li>
 * </ul>
 * The fixed point is the constant-step method's: the steps only weigh how fast each side moves, the saddle point of
 * the same problem is the only point where both residuals vanish.
 *
 * <p>Constants: alpha_0 = 0.5, eta = 0.95, Delta = 1.5 (the values Goldstein et al. give). The scale s makes the
 * residuals comparable: x is in photo-electrons (scale S, the mean signal) and p is dimensionless, so P scales as
 * 1 / S and D as S at a balanced state. We take s = S / c^2 with c the starting balance (tau = c / L, sigma =
 * 1 / (c L)): then equal relative progress of both sides (|x_old - x_new| / S = |p_old - p_new|) at the
 * starting steps gives P = s D, so the starting balance is neutral and the adaptation only moves away from it where
 * the run shows one side lagging.
 */
final class StepBalance {

    /** First adaptivity (Goldstein et al. 2015). */
    static final double ALPHA0 = 0.5;
    /** Decay of the adaptivity per change (Goldstein et al. 2015). */
    static final double ETA = 0.95;
    /** Tolerated imbalance of the residuals before the steps change (Goldstein et al. 2015). */
    static final double DELTA = 1.5;

    private final boolean adaptive;
    private final double start;
    private final double scale;
    private double tau;
    private double sigma;
    private double alpha = ALPHA0;
    private int changes;

    /**
     * @param balance the starting balance c: tau = c / l, sigma = 1 / (c l)
     * @param l the bound on ||K||
     * @param meanSignal the scale of x (photo-electrons)
     * @param adaptive false for constant steps
     */
    StepBalance(double balance, double l, double meanSignal, boolean adaptive) {
        this.adaptive = adaptive;
        this.tau = balance / l;
        this.sigma = 1 / (balance * l);
        this.start = balance;
        this.scale = meanSignal / (balance * balance);
    }

    /** @return the primal step */
    float tau() {
        return (float) tau;
    }

    /** @return the dual step */
    float sigma() {
        return (float) sigma;
    }

    /** @return true when the steps are adapted */
    boolean adaptive() {
        return adaptive;
    }

    /**
     * Compares the residuals of the last pair of steps and adapts the steps (nothing when constant).
     *
     * @param primal l1 norm of the primal residual
     * @param dual l1 norm of the dual residual
     */
    void balance(double primal, double dual) {
        if (!adaptive || !(primal > 0) || !(dual > 0) || !Double.isFinite(primal) || !Double.isFinite(dual)) {
            return;
        }
        if (primal > scale * DELTA * dual) {
            tau /= 1 - alpha;
            sigma *= 1 - alpha;
        } else if (primal < scale * dual / DELTA) {
            tau *= 1 - alpha;
            sigma /= 1 - alpha;
        } else {
            return;
        }
        alpha *= ETA;
        changes++;
    }

    /** @return a sentence for the stop reason: whether the steps were adapted and how far */
    String describe() {
        if (!adaptive) {
            return "constant primal/dual steps";
        }
        double c = Math.sqrt(tau / sigma);
        return String.format(Locale.ROOT, "steps adapted by residual balancing (Goldstein et al. 2015): %d changes,"
                + " final step balance %.3g times the starting one", changes, c / start);
    }
}
