package org.stackwright.refine;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.random.Well19937c;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.BeadRefinement;
import org.stackwright.psf.DiffractionPsf;
import org.stackwright.psf.FisherSummary;
import org.stackwright.psf.OpticsParameter;
import org.stackwright.psf.PsfSettings;
import org.stackwright.psf.Refinement;
import org.stackwright.psf.RefinementSearch;
import org.stackwright.solve.BackgroundEstimate;
import org.stackwright.solve.IterationListener;
import org.stackwright.solve.RichardsonLucy;
import org.stackwright.solve.StopRule;
import org.stackwright.solve.Stopping;
import org.stackwright.volume.Volume;

/**
 * Refines the optics of the Gibson-Lanni PSF from a specimen stack without beads, by how well a short
 * deconvolution with a candidate PSF predicts data it has not seen.
 *
 * <p><b>Statistic.</b> The photon counts are split into two independent halves by binomial thinning: each count n
 * becomes n_A ~ Binomial(n, 1/2) and n_B = n - n_A, and for Poisson data the halves are independent Poisson images
 * of half the mean (the thinning property; used for validation as "data fission" by Leiner, Duan, Wasserman &amp;
 * Ramdas, JASA 2023, from memory). Half A is deconvolved with a fixed number of Richardson-Lucy iterations and the
 * candidate PSF; the blurred estimate predicts half B, scored by the Poisson deviance; then the roles swap. The sum
 * of the two held-out deviances is minimised over the optics. Why held out: the deviance of the data that were
 * deconvolved always improves with a PSF that lets the estimate fit more of the noise, while the noise of the other
 * half cannot be fitted, so the held-out deviance is smallest for the PSF that explains the signal (cross-validation;
 * Stone, J. R. Stat. Soc. B 36, 1974). With read noise the counts are rounded shifted-Poisson values
 * ((adu - offset) / gain + (read noise / gain)^2), for which the halves are only approximately independent.
 *
 * <p><b>Standard errors</b> come from the curvature of the held-out deviance at its minimum (second differences),
 * treated as observed information; they ignore the uncertainty of the deconvolved estimate and are approximate.
 */
public final class SpecimenRefinement {

    /** Richardson-Lucy iterations of the short deconvolution, by default. */
    public static final int DEFAULT_ITERATIONS = 10;

    /** Seed of the thinning (fixed, so that a run repeats bit for bit). */
    static final long SEED = 20261204L;

    private SpecimenRefinement() {
    }

    /**
     * @param stack specimen stack (ADU), calibrated; not modified
     * @param nominal start optics with the stack's voxel size and the PSF grid used for the deconvolutions
     * @param free the parameters to fit
     * @param deepestUm the deepest depth searched
     * @param iterations Richardson-Lucy iterations per candidate
     * @param ctx threads, progress, cancel
     */
    public static Refinement run(Volume stack, PsfSettings nominal, List<OpticsParameter> free, double deepestUm,
            double offset, double gain, double readNoise, int iterations, RunContext ctx) {
        Camera camera = Camera.of(gain, offset, readNoise);
        long grid = (long) org.stackwright.fft.Convolution.paddedSize(stack.width(), nominal.nx())
                * org.stackwright.fft.Convolution.paddedSize(stack.height(), nominal.ny())
                * org.stackwright.fft.Convolution.paddedSize(stack.depth(), nominal.nz());
        // two problems (normalisation, transfer function, FFT work: about 3 grid arrays each), the RL estimate and
        // buffer, the two halves, the PSF
        MemoryCheck.require("psf-refine --source specimen of " + stack.shape() + " with a PSF of " + nominal.nx() + "x"
                + nominal.ny() + "x" + nominal.nz(), MemoryCheck.floats(grid, 9) + MemoryCheck.floats(stack.size(), 3));
        double backgroundAdu = BackgroundEstimate.estimate(stack, null, offset);
        double halfBackground = 0.5 * (backgroundAdu / gain + camera.readNoiseShift());
        Volume[] halves = thin(stack, camera, SEED);
        double[][] bounds = new double[free.size()][];
        double[] start = new double[free.size()];
        for (int i = 0; i < free.size(); i++) {
            bounds[i] = free.get(i).bounds(nominal, deepestUm);
            start[i] = Math.max(bounds[i][0], Math.min(bounds[i][1], free.get(i).get(nominal)));
        }
        RunContext quiet = new RunContext(ctx.threads(), null, null, ctx::isCancelled);
        DiffractionPsf model = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI);
        try (Workers workers = new Workers(ctx.threads())) {
            RefinementSearch.Objective heldOut = (theta, scanning) -> {
                Volume psf = model.compute(BeadRefinement.apply(nominal, free, theta), workers);
                return heldOutDeviance(halves, psf, halfBackground, iterations, workers, quiet);
            };
            RefinementSearch.Outcome search = RefinementSearch.run(free, start, bounds, heldOut, true, ctx);
            double[] best = search.best();
            ctx.progress(0.92, "psf-refine: curvature for the standard errors");
            double[][] info = curvature(heldOut, free, best, bounds, search.value());
            FisherSummary summary = new FisherSummary(info, free, bounds, best);
            double atStart = heldOut.value(start, false);
            Map<String, Object> quality = new LinkedHashMap<>();
            quality.put("statistic", "held-out Poisson deviance of a " + iterations + "-iteration Richardson-Lucy "
                    + "deconvolution of one thinned half predicting the other, both ways, summed");
            quality.put("held_out_deviance", search.value());
            quality.put("held_out_deviance_at_start", atStart);
            quality.put("ratio", search.value() / atStart);
            quality.put("voxels", stack.size());
            Map<String, Object> details = new LinkedHashMap<>();
            details.put("source", "specimen");
            details.put("iterations", iterations);
            details.put("thinning_seed", SEED);
            details.put("background_adu", backgroundAdu);
            details.put("evaluations", search.evaluations());
            details.put("scan", scanRecord(free, search.scan()));
            details.put("condition_number", summary.conditionNumber());
            List<String> notes = new java.util.ArrayList<>(summary.notes());
            notes.add("specimen refinement is experimental: on an invented test stack at 20 um it found 14 um; the "
                    + "statistic of a short deconvolution favours narrower PSFs (shallower depths), and its standard "
                    + "errors, from the curvature of the held-out deviance, are approximate and far too small; prefer "
                    + "beads when you have them");
            return new Refinement(nominal, BeadRefinement.apply(nominal, free, best), free, best, summary.standardErrors(),
                    summary.identifiable(), summary.correlationRecord(), notes, quality, details);
        }
    }

    /** @return the sum of the two held-out deviances (A predicts B, B predicts A) */
    static double heldOutDeviance(Volume[] halves, Volume psf, double background, int iterations, Workers workers,
            RunContext ctx) {
        Camera counting = Camera.photonCounting();
        DeconvolutionProblem a = new DeconvolutionProblem(halves[0], psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                counting, background, workers);
        DeconvolutionProblem b = new DeconvolutionProblem(halves[1], psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                counting, background, workers);
        RichardsonLucy rl = new RichardsonLucy(new Stopping(StopRule.FIXED, iterations, 1e-3), false);
        float[] work = new float[a.gridLength()];
        float[] xa = rl.solve(a, ctx, IterationListener.NONE).estimate();
        double toB = b.meanFit(xa, work) * b.trustedPixels();
        float[] xb = rl.solve(b, ctx, IterationListener.NONE).estimate();
        double toA = a.meanFit(xb, work) * a.trustedPixels();
        return toA + toB;
    }

    /**
     * Splits camera data into two halves of photo-electron counts by binomial thinning (exact: each count's
     * photons are kept or passed by fair coin flips, 64 at a time from one random long).
     */
    static Volume[] thin(Volume stack, Camera camera, long seed) {
        RandomGenerator rng = new Well19937c(seed);
        float[] d = stack.data();
        float[] a = new float[d.length];
        float[] b = new float[d.length];
        double s = camera.readNoiseShift();
        for (int i = 0; i < d.length; i++) {
            long n = Math.max(0, Math.round((d[i] - camera.offset()) / camera.gain() + s));
            long kept = 0;
            for (long left = n; left > 0; left -= 64) {
                long bits = rng.nextLong();
                kept += Long.bitCount(left >= 64 ? bits : bits & ((1L << left) - 1));
            }
            a[i] = kept;
            b[i] = n - kept;
        }
        return new Volume[] {stack.withData(a), stack.withData(b)};
    }

    /**
     * The Hessian of the objective at its minimum by central second differences (step: twice each parameter's
     * derivative step, kept inside the search range).
     */
    private static double[][] curvature(RefinementSearch.Objective f, List<OpticsParameter> free, double[] best,
            double[][] bounds, double atBest) {
        int g = free.size();
        double[] h = new double[g];
        double[] c = best.clone();
        for (int i = 0; i < g; i++) {
            h[i] = 2 * free.get(i).scale() * 0.05;
            // centre the stencil inside the range
            c[i] = Math.max(bounds[i][0] + h[i], Math.min(bounds[i][1] - h[i], best[i]));
        }
        double f0 = java.util.Arrays.equals(c, best) ? atBest : f.value(c, false);
        double[][] hess = new double[g][g];
        for (int i = 0; i < g; i++) {
            double up = f.value(shifted(c, i, h[i], -1, 0), false);
            double down = f.value(shifted(c, i, -h[i], -1, 0), false);
            hess[i][i] = (up - 2 * f0 + down) / (h[i] * h[i]);
        }
        for (int i = 0; i < g; i++) {
            for (int j = i + 1; j < g; j++) {
                double pp = f.value(shifted(c, i, h[i], j, h[j]), false);
                double pm = f.value(shifted(c, i, h[i], j, -h[j]), false);
                double mp = f.value(shifted(c, i, -h[i], j, h[j]), false);
                double mm = f.value(shifted(c, i, -h[i], j, -h[j]), false);
                hess[i][j] = (pp - pm - mp + mm) / (4 * h[i] * h[j]);
                hess[j][i] = hess[i][j];
            }
        }
        return hess;
    }

    private static double[] shifted(double[] c, int i, double di, int j, double dj) {
        double[] t = c.clone();
        t[i] += di;
        if (j >= 0) {
            t[j] += dj;
        }
        return t;
    }

    private static List<Map<String, Object>> scanRecord(List<OpticsParameter> free, List<double[]> scan) {
        return BeadRefinement.scanRecord(free, scan);
    }
}
