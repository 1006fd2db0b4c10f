package org.stackwright.solve;

import java.util.Locale;
import java.util.SplittableRandom;

import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;

/**
 * Draws images from the posterior distribution of the object given the data by a stabilised proximal Langevin
 * scheme: SK-ROCK (Abdulle, Almuslimani &amp; Vilmart, "Optimal explicit stabilized integrator of high order for
 * stiff stochastic problems", SIAM/ASA J. Uncertain. Quantif. 6(2):937-964, 2018), applied to the
 * Moreau-Yosida-smoothed posterior as in Pereyra, Vargas-Mieles &amp; Zygalakis, "Accelerating proximal Markov
 * chain Monte Carlo by using an explicit stabilized method", SIAM J. Imaging Sci. 13(2):905-935, 2020. One step
 * with s stages costs s drift evaluations and allows a step up to l_s / L with l_s = (s - 0.5)^2 (2 - 4 eta / 3)
 * - 1.5 (eta = 0.05), about s^2 times the step of the plain unadjusted Langevin scheme (MYULA, s = 1, step &lt;
 * 1 / L), so it moves s times further per drift evaluation in the badly conditioned directions that blur leaves.
 *
 * <pre>
 *   K0 = X;  K1 = X + mu1 h f(X + nu1 sqrt(2h) Z) + kappa1 sqrt(2h) Z
 *   Kj = muj h f(K(j-1)) + nuj K(j-1) + kappaj K(j-2),  j = 2..s;   X' = Ks
 *   w0 = 1 + eta / s^2, w1 = T_s(w0) / T_s'(w0), mu1 = w1 / w0, nu1 = s w1 / 2, kappa1 = s w1 / w0,
 *   muj = 2 w1 T_(j-1)(w0) / T_j(w0), nuj = 2 w0 T_(j-1)(w0) / T_j(w0), kappaj = 1 - nuj     (T: Chebyshev)
 * </pre>
 *
 * <p>Several chains run one after the other from different starts; after the burn-in every {@code thinning}-th
 * state is kept. The noise of each step is drawn per fixed block of voxels from a seed derived from (seed, chain,
 * step, block), so a run is bit-identical for any thread count and repeatable. A non-finite state stops the run
 * with a message.
 */
public final class PosteriorSampler {

    /** Damping of the Chebyshev stages (the value of Pereyra et al. 2020). */
    static final double ETA = 0.05;

    /**
     * The default step for the total-variation posterior, h = 20 / L. For a Gaussian mode of curvature c the
     * scheme's stationary variance (from its linear recursion, s = 5 and 10) is exact to 0.3% at h c = 0.1, 2-4%
     * low at h c = 1 and 20-25% low at h c = 3 to 10: modes stiffer than 1 / h are sampled too narrow, modes
     * flatter than that are right. How much of a voxel's variance lies in stiff modes depends on the posterior:
     * <ul>
     * <li>Gaussian smoothness prior (PosteriorSamplerExactTest, 10 000 states): with h L = 4 the per-voxel standard
     * deviations came out 1.8% low on average (worst voxel 3.7%) with 5 stages, 1.2% (3.0%) with 10; h L = 7.5 to
     * 8.6 gave 5-6% low and h L = 17 or more about 18% low. Use {@link #ACCURATE_STEP_SCALE} there.</li>
     * <li>Total-variation prior (a 32 x 32 invented field, Poisson): against a long run with h L = 2 (5 stages,
     * 4000 states, median ESS 2700), h L = 20 with 10 stages gave per-voxel standard deviations with median ratio
     * 0.994 (10th to 90th percentile 0.92 to 1.07, much of it the reference's own Monte Carlo error) and h L = 60
     * 0.976, with the smallest ESS over the tracked voxels 10 and 43 against 7 for the long run: the variance of a
     * TV posterior lies in the directions the blur leaves nearly free (curvature near 0), where a large step is
     * both accurate and needed.</li>
     * </ul>
     */
    public static final double DEFAULT_STEP_SCALE = 20;

    /** A step that keeps the variance of stiff posteriors (Gaussian priors) within a few percent: h = 4 / L. */
    public static final double ACCURATE_STEP_SCALE = 4;

    /** Dual steps per TV proximal map (warm started from the previous call). */
    public static final int DEFAULT_PROX_STEPS = 5;

    /** Default stages: 10, the value Pereyra et al. (2020) use; stability limit 173 / L. */
    public static final int DEFAULT_STAGES = 10;

    /**
     * @param samples states kept in all, over all chains
     * @param chains independent chains, at least 2 for the convergence check
     * @param burnIn steps discarded at the start of each chain
     * @param thinning steps between kept states
     * @param stages SK-ROCK stages s (1 = MYULA)
     * @param stepScale the step h times L; at most the stability limit l_s of the stages (see
     *     {@link #DEFAULT_STEP_SCALE})
     * @param proxSteps dual steps per TV proximal map (warm started)
     * @param seed random seed
     */
    public record Settings(int samples, int chains, int burnIn, int thinning, int stages, double stepScale,
            int proxSteps, long seed) {
        public Settings {
            if (chains < 1) {
                throw new IllegalArgumentException("chains = " + chains + " is not allowed; give 1 or more (2 or more to check convergence)");
            }
            if (samples < 2 * chains) {
                throw new IllegalArgumentException("samples = " + samples + " is not allowed with " + chains
                        + " chains; give at least 2 per chain (100 or more for a 90% interval)");
            }
            if (burnIn < 0) {
                throw new IllegalArgumentException("burn-in = " + burnIn + " is not allowed; give 0 or more steps");
            }
            if (thinning < 1) {
                throw new IllegalArgumentException("thinning = " + thinning + " is not allowed; give 1 or more steps");
            }
            if (stages < 1 || stages > 50) {
                throw new IllegalArgumentException("stages = " + stages + " is not allowed; give 1 to 50");
            }
            if (!(stepScale > 0) || stepScale > stabilityLimit(stages)) {
                throw new IllegalArgumentException(String.format(Locale.ROOT, "step %.3g / L is not allowed with %d "
                        + "stages; give at most their stability limit %.3g / L", stepScale, stages, stabilityLimit(stages)));
            }
            if (proxSteps < 1) {
                throw new IllegalArgumentException("proximal steps = " + proxSteps + " is not allowed; give 1 or more");
            }
        }

        /** @return kept states per chain */
        public int perChain() {
            return samples / chains;
        }

        /** @return steps per chain, burn-in included */
        public int stepsPerChain() {
            return burnIn + perChain() * thinning;
        }
    }

    /**
     * The kept states.
     *
     * @param states kept states on the image window in ADU above the offset, [chain * perChain + k][voxel]
     * @param chains number of chains
     * @param perChain states per chain
     * @param step the step h
     * @param lipschitz L of the drift
     * @param seconds wall time of the sampling
     */
    public record Draws(float[][] states, int chains, int perChain, double step, double lipschitz, double seconds) {
    }

    private final Settings settings;
    private final double[] mu;
    private final double[] nu;
    private final double[] kappa;
    private final double limit;

    /** @param settings how to sample */
    public PosteriorSampler(Settings settings) {
        this.settings = settings;
        int s = settings.stages();
        mu = new double[s + 1];
        nu = new double[s + 1];
        kappa = new double[s + 1];
        if (s == 1) {
            // MYULA / ULA: X' = X + h f(X) + sqrt(2h) Z, stable for h < 2 / L; Durmus et al. use h <= 1 / L
            mu[1] = 1;
            nu[1] = 0;
            kappa[1] = 1;
        } else {
            double w0 = 1 + ETA / ((double) s * s);
            double[] t = chebyshevT(s, w0);
            double w1 = t[s] / (s * chebyshevU(s - 1, w0));
            mu[1] = w1 / w0;
            nu[1] = s * w1 / 2;
            kappa[1] = s * w1 / w0;
            for (int j = 2; j <= s; j++) {
                mu[j] = 2 * w1 * t[j - 1] / t[j];
                nu[j] = 2 * w0 * t[j - 1] / t[j];
                kappa[j] = 1 - nu[j];
            }
        }
        limit = stabilityLimit(s);
    }

    /** @return the stability limit l_s (in units of 1 / L): 1 for s = 1 (MYULA), else (s - 0.5)^2 (2 - 4 eta / 3) - 1.5 */
    static double stabilityLimit(int s) {
        return s == 1 ? 1 : (s - 0.5) * (s - 0.5) * (2 - 4 * ETA / 3) - 1.5;
    }

    /** @return the stability limit l_s of the scheme, in units of 1 / L */
    public double stabilityLimit() {
        return limit;
    }

    /** @return T_0..T_n at w (Chebyshev polynomials of the first kind) */
    static double[] chebyshevT(int n, double w) {
        double[] t = new double[n + 1];
        t[0] = 1;
        if (n > 0) {
            t[1] = w;
        }
        for (int j = 2; j <= n; j++) {
            t[j] = 2 * w * t[j - 1] - t[j - 2];
        }
        return t;
    }

    /** @return U_n(w) (Chebyshev polynomial of the second kind); T_n' = n U_(n-1) */
    static double chebyshevU(int n, double w) {
        double a = 1;
        double b = 2 * w;
        if (n == 0) {
            return a;
        }
        for (int j = 2; j <= n; j++) {
            double c = 2 * w * b - a;
            a = b;
            b = c;
        }
        return b;
    }

    /**
     * Runs the chains.
     *
     * @param p the problem, not modified
     * @param drift the posterior's drift (reset between chains)
     * @param starts one grid-sized start per chain (not modified); a start shorter than the list of chains is
     *     reused cyclically
     * @param ctx cancel and progress
     * @return the kept states
     */
    Draws run(DeconvolutionProblem p, PosteriorDrift drift, float[][] starts, RunContext ctx) {
        Settings s = settings;
        int n = p.gridLength();
        Workers workers = p.workers();
        double lipschitz = drift.lipschitz();
        double h = s.stepScale() / lipschitz;
        double sq = Math.sqrt(2 * h);
        int perChain = s.perChain();
        int steps = s.stepsPerChain();
        int window = p.imageWidth() * p.imageHeight() * p.imageDepth();
        float[][] kept = new float[s.chains() * perChain][];
        float[] x = new float[n];
        float[] a = new float[n];
        float[] c = new float[n];
        float[] f = new float[n];
        float[] z = new float[n];
        long t0 = System.nanoTime();
        for (int chain = 0; chain < s.chains(); chain++) {
            System.arraycopy(starts[chain % starts.length], 0, x, 0, n);
            drift.reset();
            int k = 0;
            for (int step = 1; step <= steps; step++) {
                ctx.checkCancelled();
                noise(z, drift, chain, step, workers);
                float[] result = step(drift, x, a, c, f, z, h, sq, workers);
                if (result != x) {
                    System.arraycopy(result, 0, x, 0, n);
                }
                if (step % 10 == 0 || step == steps) {
                    checkFinite(x, chain, step, h, lipschitz);
                }
                if (step > s.burnIn() && (step - s.burnIn()) % s.thinning() == 0) {
                    checkFinite(x, chain, step, h, lipschitz);
                    kept[chain * perChain + k++] = window(p, x, drift.nonNegative());
                }
                ctx.progress(((double) chain * steps + step) / ((double) s.chains() * steps), String.format(Locale.ROOT,
                        "sampling: chain %d of %d, step %d of %d", chain + 1, s.chains(), step, steps));
            }
        }
        return new Draws(kept, s.chains(), perChain, h, lipschitz, (System.nanoTime() - t0) * 1e-9);
    }

    /**
     * One SK-ROCK step from x; the stages rotate through x, a and c.
     *
     * @return the array that holds the new state (one of x, a, c)
     */
    private float[] step(PosteriorDrift drift, float[] x, float[] a, float[] c, float[] f, float[] z, double h,
            double sq, Workers workers) {
        int s = settings.stages();
        int n = x.length;
        // K1 = X + mu1 h f(X + nu1 sqrt(2h) Z) + kappa1 sqrt(2h) Z
        final float shift = (float) (nu[1] * sq);
        workers.forRange(n, (from, to) -> {
            for (int i = from; i < to; i++) {
                a[i] = x[i] + shift * z[i];
            }
        });
        drift.drift(a, f);
        final float m1 = (float) (mu[1] * h);
        final float k1 = (float) (kappa[1] * sq);
        workers.forRange(n, (from, to) -> {
            for (int i = from; i < to; i++) {
                a[i] = x[i] + m1 * f[i] + k1 * z[i];
            }
        });
        float[] older = x;
        float[] prev = a;
        float[] next = c;
        for (int j = 2; j <= s; j++) {
            drift.drift(prev, f);
            final float mj = (float) (mu[j] * h);
            final float nj = (float) nu[j];
            final float kj = (float) kappa[j];
            final float[] pv = prev;
            final float[] ol = older;
            final float[] nx = next;
            workers.forRange(n, (from, to) -> {
                for (int i = from; i < to; i++) {
                    nx[i] = mj * f[i] + nj * pv[i] + kj * ol[i];
                }
            });
            older = prev;
            prev = next;
            next = ol;
        }
        return prev;
    }

    /** Fills z with independent N(0, 1) on the sampled voxels, 0 elsewhere, per fixed block. */
    private void noise(float[] z, PosteriorDrift drift, int chain, int step, Workers workers) {
        int n = z.length;
        int blocks = Math.min(Workers.REDUCTION_BLOCKS, n);
        long base = settings.seed() * 0x9E3779B97F4A7C15L + chain * 0xBF58476D1CE4E5B9L + step * 0x94D049BB133111EBL;
        workers.forRange(blocks, (b0, b1) -> {
            for (int b = b0; b < b1; b++) {
                SplittableRandom rng = new SplittableRandom(base + b * 0xD1B54A32D192ED03L);
                int from = (int) ((long) n * b / blocks);
                int to = (int) ((long) n * (b + 1) / blocks);
                for (int i = from; i < to; i++) {
                    z[i] = drift.active(i) ? (float) rng.nextGaussian() : 0f;
                }
            }
        });
    }

    private void checkFinite(float[] x, int chain, int step, double h, double lipschitz) {
        for (float v : x) {
            if (!Float.isFinite(v)) {
                throw new ArithmeticException(String.format(Locale.ROOT, "sampling diverged in chain %d at step %d "
                        + "(step %.3g, L %.3g): a value is not finite; check the camera values and background", chain + 1, step, h, lipschitz));
            }
        }
    }

    /** @return |x| (folded) or x on the image window, in ADU above the offset */
    private static float[] window(DeconvolutionProblem p, float[] x, boolean fold) {
        float[] v = p.toVolume(x).data();
        if (fold) {
            for (int i = 0; i < v.length; i++) {
                v[i] = Math.abs(v[i]);
            }
        }
        return v;
    }
}
