package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.ejml.simple.SimpleMatrix;
import org.junit.jupiter.api.Test;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.model.TotalVariation;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The sampler where the posterior is known exactly: Gaussian noise of standard deviation sigma, a periodic blur H
 * and a Gaussian smoothness prior theta ||D x||^2 give a Gaussian posterior with precision
 * P = H^T H / sigma^2 + 2 theta D^T D, mean P^-1 H^T y / sigma^2 and covariance P^-1 (conjugate Gaussian algebra;
 * Kaipio &amp; Somersalo, "Statistical and Computational Inverse Problems", Springer 2005, ch. 3). P is built as
 * a dense matrix from the operators and inverted with EJML, so the reference does not rely on the sampler's own
 * code. Tolerances from the issue: per-voxel standard deviation within 5%, mean within 2%. The step is the one
 * for stiff posteriors ({@link PosteriorSampler#ACCURATE_STEP_SCALE}): most of this posterior's variance lies in
 * modes whose curvature is close to L, which the larger default step for total variation samples too narrow (see
 * {@link PosteriorSampler#DEFAULT_STEP_SCALE}).
 */
class PosteriorSamplerExactTest {

    static final int NX = 12;
    static final int NY = 12;
    static final double SIGMA = 2.0;
    static final double THETA = 0.02;

    record Case(DeconvolutionProblem problem, SimpleMatrix mean, SimpleMatrix cov, Workers workers) {
    }

    static Case problem(Workers w) {
        VoxelSize vox = new VoxelSize(0.1, 0.1, 0.3);
        Volume psf = GaussianPsf.sampled(0.15, 0.3, vox, 7, 7, 1);
        float[] truth = new float[NX * NY];
        for (int y = 0; y < NY; y++) {
            for (int x = 0; x < NX; x++) {
                truth[y * NX + x] = (float) (20 + 30 * Math.exp(-((x - 4) * (x - 4) + (y - 6) * (y - 6)) / 6.0)
                        + (x > 7 && y > 3 && y < 9 ? 25 : 0));
            }
        }
        Volume t = new Volume(NX, NY, 1, truth, vox);
        Volume blurred = org.stackwright.fft.Convolution.apply(t, psf, org.stackwright.fft.Convolution.Boundary.PERIODIC, false, w);
        SplittableRandom rng = new SplittableRandom(5);
        float[] d = blurred.data().clone();
        for (int i = 0; i < d.length; i++) {
            d[i] += (float) (SIGMA * rng.nextGaussian());
        }
        Volume data = blurred.withData(d);
        DeconvolutionProblem p = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.PERIODIC,
                Camera.of(1, 0, SIGMA), 0, w);
        int n = NX * NY;
        SimpleMatrix h = new SimpleMatrix(n, n);
        SimpleMatrix dtd = new SimpleMatrix(n, n);
        TotalVariation tv = new TotalVariation(NX, NY, 1, p.zWeight(), w);
        float[] e = new float[n];
        float[] col = new float[n];
        float[] gx = new float[n];
        float[] gy = new float[n];
        float[] gz = new float[n];
        for (int j = 0; j < n; j++) {
            java.util.Arrays.fill(e, 0f);
            e[j] = 1;
            p.blur().apply(e, col);
            for (int i = 0; i < n; i++) {
                h.set(i, j, col[i]);
            }
            tv.gradient(e, gx, gy, gz);
            tv.adjoint(gx, gy, gz, col);
            for (int i = 0; i < n; i++) {
                dtd.set(i, j, col[i]);
            }
        }
        SimpleMatrix precision = h.transpose().mult(h).scale(1 / (SIGMA * SIGMA)).plus(dtd.scale(2 * THETA));
        SimpleMatrix cov = precision.invert();
        SimpleMatrix yv = new SimpleMatrix(n, 1);
        for (int i = 0; i < n; i++) {
            yv.set(i, 0, d[i]);
        }
        SimpleMatrix mean = cov.mult(h.transpose().mult(yv).scale(1 / (SIGMA * SIGMA)));
        return new Case(p, mean, cov, w);
    }

    static PosteriorSampler.Draws sample(Case c, PosteriorSampler.Settings s) {
        float[] start = new float[NX * NY];
        for (int i = 0; i < start.length; i++) {
            start[i] = (float) c.mean().get(i, 0);
        }
        PosteriorDrift drift = new PosteriorDrift(c.problem(), PosteriorDrift.Likelihood.GAUSSIAN, SIGMA,
                PosteriorDrift.Prior.SMOOTHNESS, THETA, false, 1, start);
        return new PosteriorSampler(s).run(c.problem(), drift, new float[][] {start}, RunContext.quiet(1));
    }

    @Test
    void meanAndStandardDeviationMatchTheExactGaussianPosterior() {
        try (Workers w = new Workers(1)) {
            Case c = problem(w);
            PosteriorSampler.Settings s = new PosteriorSampler.Settings(10_000, 2, 200, 2,
                    PosteriorSampler.DEFAULT_STAGES, PosteriorSampler.ACCURATE_STEP_SCALE, 1, 11);
            PosteriorSampler.Draws draws = sample(c, s);
            PosteriorSummary sum = PosteriorSummary.of(draws, c.problem().toVolume(new float[NX * NY]), 0.9, w);
            int n = NX * NY;
            double worstSd = 0;
            double meanErr = 0;
            double meanNorm = 0;
            for (int i = 0; i < n; i++) {
                double exactSd = Math.sqrt(c.cov().get(i, i));
                worstSd = Math.max(worstSd, Math.abs(sum.spread().data()[i] / exactSd - 1));
                double dm = sum.mean().data()[i] - c.mean().get(i, 0);
                meanErr += dm * dm;
                meanNorm += c.mean().get(i, 0) * c.mean().get(i, 0);
            }
            double relMean = Math.sqrt(meanErr / meanNorm);
            System.out.printf("exact Gaussian posterior: worst per-voxel sd error %.4f, mean error %.4f, step %.4g, "
                    + "L %.4g, ESS median %.0f, R-hat max %.4f%n", worstSd, relMean, draws.step(), draws.lipschitz(),
                    sum.essMedian(), sum.rhatMaximum());
            assertTrue(worstSd < 0.05, "per-voxel sd within 5% of the exact posterior: worst " + worstSd);
            assertTrue(relMean < 0.02, "mean within 2% of the exact posterior mean: " + relMean);
        }
    }
}
