package org.stackwright.solve;

import org.stackwright.model.BlurOperator;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.model.TotalVariation;
import org.stackwright.model.TotalVariationProx;
import org.stackwright.parallel.Workers;

/**
 * The drift of Langevin sampling, -grad U(x), for the posterior density exp(-U) of the object given the data:
 * U(x) = F(x) + G(x) with
 *
 * <pre>
 *   F(x) = sum_w (H x + b) - y ln(H x + b)            Poisson, shifted-Poisson units (camera read noise included;
 *                                                      Snyder, Hammoud &amp; White, JOSA A 10(5), 1993)
 *   F(x) = sum_w (H x + b - y)^2 / (2 sigma^2)         Gaussian, sigma = read noise / gain in photo-electrons
 *   G(x) = theta TV(x)                                 total-variation prior, through its Moreau-Yosida envelope:
 *                                                      grad G_m(x) = (x - prox_{m theta TV}(x)) / m
 *   G(x) = theta ||D x||^2                             Gaussian smoothness prior (grad 2 theta D^T D x)
 * </pre>
 *
 * The Moreau-Yosida envelope makes the non-smooth TV prior differentiable so that a Langevin scheme can use it
 * (MYULA: Durmus, Moulines &amp; Pereyra, "Efficient Bayesian computation by proximal Markov chain Monte Carlo:
 * when Langevin meets Moreau", SIAM J. Imaging Sci. 11(1):473-506, 2018), with m = 1 / L_F as they recommend.
 *
 * <p><b>Non-negativity by folding.</b> With {@code nonNegative}, U is extended to all of R^n by U(|x|); the
 * extended density, folded back by x -&gt; |x|, is exactly the posterior on x &gt;= 0. So the drift at x is
 * -sign(x) grad U(|x|) and the sampler reports |x|. This is the reflection that Melidonis, Dobson, Altmann,
 * Pereyra &amp; Zygalakis ("Efficient Bayesian computation for low-photon imaging problems", SIAM J. Imaging Sci.
 * 16(3), 2023) use to keep proximal Langevin samplers on the non-negative orthant without a hard constraint in
 * the dynamics. Voxels the data cannot see (the problem holds them at zero) stay at zero.
 *
 * <p>Not safe for two threads at once (owns its work arrays); one instance per chain.
 */
final class PosteriorDrift {

    /** The likelihood. */
    enum Likelihood { POISSON, GAUSSIAN }

    /** The prior. */
    enum Prior { TOTAL_VARIATION, SMOOTHNESS }

    private final BlurOperator blur;
    private final Workers workers;
    private final float[] y;
    private final float[] support;
    private final float b;
    private final Likelihood likelihood;
    private final double inverseVariance;
    private final Prior prior;
    private final double theta;
    private final boolean nonNegative;
    private final TotalVariationProx prox;
    private final TotalVariation tv;
    private final float[] u;
    private final float[] work;
    private final float[] grad;
    private final float[] gx;
    private final float[] gy;
    private final float[] gz;
    private double envelope;
    private final double likelihoodLipschitz;

    /**
     * @param p the problem (data, blur, background, support), not modified
     * @param likelihood Poisson or Gaussian
     * @param sigma Gaussian noise standard deviation in photo-electrons (ignored for Poisson)
     * @param prior the prior
     * @param theta prior weight, 0 or more
     * @param nonNegative fold at zero (see class comment)
     * @param proxSteps dual steps per TV proximal map
     * @param reference an estimate near the posterior's mass (e.g. the most likely one), for the Poisson curvature
     *     bound; not modified
     */
    PosteriorDrift(DeconvolutionProblem p, Likelihood likelihood, double sigma, Prior prior, double theta,
            boolean nonNegative, int proxSteps, float[] reference) {
        if (!(theta >= 0) || !Double.isFinite(theta)) {
            throw new IllegalArgumentException("regularization = " + theta + " is not allowed for sampling; give 0 or more");
        }
        if (likelihood == Likelihood.GAUSSIAN && !(sigma > 0 && Double.isFinite(sigma))) {
            throw new IllegalArgumentException("read-noise: the Gaussian likelihood needs a positive noise standard "
                    + "deviation (given " + sigma + " photo-electrons)");
        }
        int n = p.gridLength();
        this.blur = p.blur();
        this.workers = p.workers();
        this.y = p.dataOnGrid();
        this.support = p.normalisation();
        this.b = p.background();
        this.likelihood = likelihood;
        this.inverseVariance = likelihood == Likelihood.GAUSSIAN ? 1 / (sigma * sigma) : 0;
        this.prior = prior;
        this.theta = theta;
        this.nonNegative = nonNegative;
        this.tv = new TotalVariation(p.gridWidth(), p.gridHeight(), p.gridDepth(), p.zWeight(), workers);
        this.prox = prior == Prior.TOTAL_VARIATION
                ? new TotalVariationProx(p.gridWidth(), p.gridHeight(), p.gridDepth(), p.zWeight(), proxSteps, workers)
                : null;
        this.u = new float[n];
        this.work = new float[n];
        this.grad = new float[n];
        boolean smooth = prior == Prior.SMOOTHNESS;
        this.gx = smooth ? new float[n] : null;
        this.gy = smooth ? new float[n] : null;
        this.gz = smooth ? new float[n] : null;
        this.likelihoodLipschitz = likelihood == Likelihood.GAUSSIAN ? inverseVariance : poissonCurvature(reference);
        this.envelope = 1 / likelihoodLipschitz;
    }

    /**
     * The largest curvature of the Poisson term near the reference: max over trusted pixels of y / (H x + b)^2
     * (the Hessian is H^T diag(y / (H x + b)^2) H and ||H|| &lt;= 1 for a unit-sum PSF). The global bound
     * max y / b^2 is far larger and would make the steps needlessly small; the chains stay near the posterior's
     * mass, where H x + b is close to the reference's. A chain that leaves it is caught by the numerical guard.
     */
    private double poissonCurvature(float[] reference) {
        blur.apply(reference, work);
        double l = 0;
        for (int i = 0; i < y.length; i++) {
            if (y[i] > 0) {
                double m = Math.max(work[i] + b, 1e-6);
                l = Math.max(l, y[i] / (m * m));
            }
        }
        return Math.max(l, 1e-12);
    }

    /** @return the Lipschitz constant of grad F (likelihood) */
    double likelihoodLipschitz() {
        return likelihoodLipschitz;
    }

    /** @return the Moreau-Yosida parameter m of the TV prior (0 for the smoothness prior) */
    double envelope() {
        return prior == Prior.TOTAL_VARIATION ? envelope : 0;
    }

    /** @return the Lipschitz constant of the whole drift: L_F plus 1/m (TV) or 2 theta ||D||^2 (smoothness) */
    double lipschitz() {
        return likelihoodLipschitz + (prior == Prior.TOTAL_VARIATION ? 1 / envelope : 2 * theta * tv.normSquaredBound());
    }

    /** @return whether states are folded at zero (report |x|) */
    boolean nonNegative() {
        return nonNegative;
    }

    /** Forgets the warm start of the TV proximal map (a new chain starts elsewhere). */
    void reset() {
        if (prox != null) {
            prox.reset();
        }
    }

    /** @return true where the voxel is sampled (the data see it); elsewhere it is held at zero */
    boolean active(int i) {
        return support[i] > 0;
    }

    /**
     * out = -grad U at x (folded when non-negative).
     *
     * @param x grid-sized state, not modified
     * @param out grid-sized, overwritten (must not be x)
     */
    void drift(float[] x, float[] out) {
        workers.forRange(x.length, (from, to) -> {
            for (int i = from; i < to; i++) {
                u[i] = support[i] > 0 ? (nonNegative ? Math.abs(x[i]) : x[i]) : 0f;
            }
        });
        // likelihood: grad F = H^T r
        blur.apply(u, work);
        final boolean poisson = likelihood == Likelihood.POISSON;
        final float iv = (float) inverseVariance;
        final float bg = b;
        workers.forRange(x.length, (from, to) -> {
            for (int i = from; i < to; i++) {
                float yi = y[i];
                if (yi < 0) {
                    work[i] = 0f;
                } else if (poisson) {
                    work[i] = 1f - yi / Math.max(work[i] + bg, 1e-12f);
                } else {
                    work[i] = (work[i] + bg - yi) * iv;
                }
            }
        });
        blur.applyAdjoint(work, grad);
        // prior
        if (prior == Prior.TOTAL_VARIATION) {
            prox.apply(u, envelope * theta, work);
            final float inv = (float) (1 / envelope);
            workers.forRange(x.length, (from, to) -> {
                for (int i = from; i < to; i++) {
                    grad[i] += (u[i] - work[i]) * inv;
                }
            });
        } else if (theta > 0) {
            tv.gradient(u, gx, gy, gz);
            tv.adjoint(gx, gy, gz, work);
            final float two = (float) (2 * theta);
            workers.forRange(x.length, (from, to) -> {
                for (int i = from; i < to; i++) {
                    grad[i] += two * work[i];
                }
            });
        }
        workers.forRange(x.length, (from, to) -> {
            for (int i = from; i < to; i++) {
                float g = support[i] > 0 ? -grad[i] : 0f;
                out[i] = nonNegative && x[i] < 0 ? -g : g;
            }
        });
    }
}
