package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Locale;

import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;
import org.stackwright.op.RunContext;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** The noise-replica spread (parametric bootstrap) against exact linear-estimator statistics and a known truth. */
class NoiseReplicasTest {

    private static final VoxelSize PLANE = new VoxelSize(0.1, 0.1, 0.25);

    /**
     * Wiener / Tikhonov with a periodic boundary is a linear, shift-invariant filter G = conj(H) / (|H|^2 + lambda).
     * With additive Gaussian noise of standard deviation s, each voxel of the estimate has standard deviation
     * s * sqrt(sum_k g_k^2), and by Parseval sum_k g_k^2 = (1/N) sum_f |G(f)|^2 (elementary statistics of linear
     * estimators: Var(sum g_k e_k) = s^2 sum g_k^2 for independent e_k; Parseval's theorem for the DFT, e.g.
     * Bracewell, "The Fourier Transform and Its Applications", 3rd ed., 2000, ch. 6, Rayleigh's theorem; chapter from memory). The transfer function H is
     * computed here by a plain double-precision DFT of the PSF, independent of the project's FFT.
     *
     * <p>Monte-Carlo error: the relative standard error of a sample standard deviation from R normal values is about
     * 1 / sqrt(2 (R - 1)) (common practice; e.g. Kendall &amp; Stuart, "The Advanced Theory of Statistics"), 5% for
     * R = 200. The voxel average of the spread is at least as precise as one voxel, so it must agree within 3 of
     * those standard errors; every single voxel (256 of them) within 5 (chance of a false failure about 1e-4).
     */
    @Test
    void wienerSpreadMatchesTheExactStandardDeviationOfALinearFilter() {
        int n = 16;
        int replicas = 200;
        double s = 2.0;
        double lambda = 0.01;
        Volume psf = GaussianPsf.sampled(0.15, 0.3, PLANE, 7, 7, 1);
        Volume data = Volume.zeros(n, n, 1, PLANE);
        Well19937c rng = new Well19937c(5);
        for (int y = 0; y < n; y++) {
            for (int x = 0; x < n; x++) {
                double object = (x - 8) * (x - 8) + (y - 7) * (y - 7) < 12 ? 400 : 0;
                data.set(x, y, 0, (float) (100 + 50 + object + s * rng.nextGaussian()));
            }
        }
        DeconvolutionSettings set = new DeconvolutionSettings("wiener", Stopping.fixed(1), 100, 50, 1, s, lambda,
                "periodic", false, "gaussian");
        RunContext ctx = RunContext.quiet(2);
        Deconvolution.Outcome o = NoiseReplicas.deconvolveWithModel(data, psf, "psf", null, set, ctx, IterationListener.NONE);
        NoiseReplicas.Spread sp = NoiseReplicas.run(data, psf, null, set, o, replicas, NoiseReplicas.Noise.GAUSSIAN, 9, ctx);

        double exact = s * Math.sqrt(sumSquaredFilter(psf, n, lambda));
        double se = exact / Math.sqrt(2.0 * (replicas - 1));
        float[] sd = sp.spread().data();
        double mean = 0;
        double worst = 0;
        for (float v : sd) {
            mean += v / sd.length;
            worst = Math.max(worst, Math.abs(v - exact) / se);
        }
        System.out.printf(Locale.ROOT, "wiener spread: exact %.5f, replica mean %.5f (%.2f SE), worst voxel %.2f SE%n",
                exact, mean, Math.abs(mean - exact) / se, worst);
        assertTrue(Math.abs(mean - exact) < 3 * se, "mean spread " + mean + " vs exact " + exact);
        assertTrue(worst < 5, "worst voxel " + worst + " standard errors from " + exact);
        // bias indicator: the replicas' expected estimate is G H x^, so replica mean - x^ = F^-1[-lambda / (|H|^2 +
        // lambda) F(x^)] (the same linear algebra), up to the Monte-Carlo error sd / sqrt(R) per voxel (5 of them)
        double[] expectedBias = wienerBias(o.result(), psf, lambda);
        float[] bias = sp.bias().data();
        double worstBias = 0;
        for (int i = 0; i < bias.length; i++) {
            worstBias = Math.max(worstBias, Math.abs(bias[i] - expectedBias[i]) / (exact / Math.sqrt(replicas)));
        }
        System.out.printf(Locale.ROOT, "wiener bias indicator: worst voxel %.2f Monte-Carlo errors from (G H - 1) x%n", worstBias);
        assertTrue(worstBias < 5, "bias indicator off by " + worstBias + " Monte-Carlo errors");
    }

    /** F^-1[-lambda / (|H|^2 + lambda) F(x)] by plain DFTs (one plane, n x n). */
    private static double[] wienerBias(Volume x, Volume psf, double lambda) {
        int n = x.width();
        double[] out = new double[n * n];
        double[][] re = new double[n][n];
        double[][] im = new double[n][n];
        for (int fy = 0; fy < n; fy++) {
            for (int fx = 0; fx < n; fx++) {
                double h2 = transfer2(psf, n, fx, fy);
                double m = -lambda / (h2 + lambda);
                double r = 0;
                double i = 0;
                for (int y = 0; y < n; y++) {
                    for (int xx = 0; xx < n; xx++) {
                        double a = -2 * Math.PI * ((double) fx * xx + (double) fy * y) / n;
                        r += x.get(xx, y, 0) * Math.cos(a);
                        i += x.get(xx, y, 0) * Math.sin(a);
                    }
                }
                re[fy][fx] = m * r;
                im[fy][fx] = m * i;
            }
        }
        for (int y = 0; y < n; y++) {
            for (int xx = 0; xx < n; xx++) {
                double v = 0;
                for (int fy = 0; fy < n; fy++) {
                    for (int fx = 0; fx < n; fx++) {
                        double a = 2 * Math.PI * ((double) fx * xx + (double) fy * y) / n;
                        v += re[fy][fx] * Math.cos(a) - im[fy][fx] * Math.sin(a);
                    }
                }
                out[y * n + xx] = v / (n * n);
            }
        }
        return out;
    }

    /** |H(f)|^2 of the unit-sum PSF on an n x n periodic grid. */
    private static double transfer2(Volume psf, int n, int fx, int fy) {
        double total = psf.sum();
        int c = psf.width() / 2;
        double re = 0;
        double im = 0;
        for (int y = 0; y < psf.height(); y++) {
            for (int x = 0; x < psf.width(); x++) {
                double a = -2 * Math.PI * ((double) fx * (x - c) + (double) fy * (y - c)) / n;
                double v = psf.get(x, y, 0) / total;
                re += v * Math.cos(a);
                im += v * Math.sin(a);
            }
        }
        return re * re + im * im;
    }

    /** (1/N) sum over the DFT frequencies of |G|^2 with G = conj(H) / (|H|^2 + lambda), H of the unit-sum PSF. */
    private static double sumSquaredFilter(Volume psf, int n, double lambda) {
        double acc = 0;
        for (int fy = 0; fy < n; fy++) {
            for (int fx = 0; fx < n; fx++) {
                double h2 = transfer2(psf, n, fx, fy);
                acc += h2 / ((h2 + lambda) * (h2 + lambda));
            }
        }
        return acc / (n * n);
    }

    private static final class RlRun {
        final Simulation.Outcome sim;
        final NoiseReplicas.Spread spread;
        final Volume estimate;

        RlRun(int threads, long seed) {
            sim = TestSpecimens.cells(20, 20, 10, 1, 10, Camera.photonCounting(), 77);
            DeconvolutionSettings set = DeconvolutionSettings.richardsonLucy(new Stopping(StopRule.NOISE, 15, 1e-3), false)
                    .withCamera(0, 10, 1, 0);
            RunContext ctx = RunContext.quiet(threads);
            Deconvolution.Outcome o = NoiseReplicas.deconvolveWithModel(sim.data(), TestSpecimens.psf(), "psf", null, set,
                    ctx, IterationListener.NONE);
            estimate = o.result();
            spread = NoiseReplicas.run(sim.data(), TestSpecimens.psf(), null, set, o, 8, NoiseReplicas.Noise.CAMERA, seed, ctx);
        }
    }

    /**
     * Richardson-Lucy on an invented cell field with known truth (photon counting, Poisson noise). Poisson noise
     * grows with the signal (variance = mean), so the spread must be larger where the specimen is bright than in
     * the background. Repeat runs give the same bits, and so do 1 and 2 threads.
     *
     * <p>Coverage: RL stopped early is biased (it smooths), so |estimate - truth| / spread is not standard normal
     * and the fraction within 2 spreads is not the nominal 95%. The check only guards against a spread that is
     * useless: far too small (almost no voxel within 2 spreads) or far too large (every voxel, even where the bias
     * is large). Band [0.05, 0.99], our own choice.
     */
    @Test
    void richardsonLucySpreadFollowsTheSignalAndIsReproducible() {
        RlRun a = new RlRun(1, 3);
        RlRun b = new RlRun(2, 3);
        RlRun c = new RlRun(1, 4);
        assertArrayEquals(a.spread.spread().data(), b.spread.spread().data(), "1 vs 2 threads");
        assertArrayEquals(a.spread.bias().data(), b.spread.bias().data(), "1 vs 2 threads");
        assertTrue(!java.util.Arrays.equals(a.spread.spread().data(), c.spread.spread().data()), "another seed, other replicas");

        float[] exp = a.sim.expected().data();
        float[] sd = a.spread.spread().data();
        float[] sorted = exp.clone();
        java.util.Arrays.sort(sorted);
        float brightCut = sorted[(int) (0.9 * sorted.length)];
        float darkCut = sorted[sorted.length / 2];
        double bright = 0;
        double dark = 0;
        int nb = 0;
        int nd = 0;
        for (int i = 0; i < sd.length; i++) {
            if (exp[i] >= brightCut) {
                bright += sd[i];
                nb++;
            } else if (exp[i] < darkCut) {
                dark += sd[i];
                nd++;
            }
        }
        bright /= nb;
        dark /= nd;
        float[] est = a.estimate.data();
        float[] truth = a.sim.truth().data();
        int within = 0;
        for (int i = 0; i < sd.length; i++) {
            if (Math.abs(est[i] - truth[i]) <= 2 * sd[i]) {
                within++;
            }
        }
        double fraction = (double) within / sd.length;
        System.out.printf(Locale.ROOT, "RL spread: bright %.3f, background %.3f photons; within 2 sd of truth %.3f;"
                + " median %.4g, relative median %.3g%n", bright, dark, fraction, a.spread.spreadMedian(),
                a.spread.relativeMedian());
        assertTrue(bright > 2 * dark, "bright " + bright + " vs background " + dark);
        assertTrue(fraction > 0.05 && fraction < 0.99, "fraction within 2 sd " + fraction);
        assertEquals(8, a.spread.replicas());
    }

    /** Cancelling during the replicas stops the run with the shared cancel signal. */
    @Test
    void cancellingStopsTheReplicas() {
        Volume psf = GaussianPsf.sampled(0.15, 0.3, PLANE, 5, 5, 1);
        Volume data = Volume.zeros(12, 12, 1, PLANE);
        java.util.Arrays.fill(data.data(), 150f);
        DeconvolutionSettings set = new DeconvolutionSettings("wiener", Stopping.fixed(1), 100, 50, 1, 2, 0.01,
                "periodic", false, "poisson");
        java.util.concurrent.atomic.AtomicBoolean stop = new java.util.concurrent.atomic.AtomicBoolean();
        RunContext ctx = new RunContext(1, (f, status) -> stop.compareAndSet(false, status.contains("replica 2")), null, stop::get);
        Deconvolution.Outcome o = NoiseReplicas.deconvolveWithModel(data, psf, "psf", null, set, ctx, IterationListener.NONE);
        assertThrows(org.stackwright.parallel.CancelledException.class,
                () -> NoiseReplicas.run(data, psf, null, set, o, 10, NoiseReplicas.Noise.CAMERA, 1, ctx));
    }

    @Test
    void badReplicaCountsAreRefusedWithTheirName() {
        DeconvolutionSettings set = DeconvolutionSettings.richardsonLucy(Stopping.fixed(2), false);
        for (int r : new int[] {1, -1, NoiseReplicas.MAX_REPLICAS + 1}) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                    () -> NoiseReplicas.check(r, NoiseReplicas.Noise.CAMERA, set));
            assertTrue(e.getMessage().contains("replicas = " + r), e.getMessage());
        }
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> NoiseReplicas.check(4, NoiseReplicas.Noise.GAUSSIAN, set));
        assertTrue(e.getMessage().contains("read-noise"), e.getMessage());
    }
}
