package org.stackwright.solve;

import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/**
 * Deconvolution by sampling the posterior instead of reporting only the most likely image: the data's likelihood
 * (Poisson with the camera's read noise, or Gaussian) and a total-variation prior, non-negative. First the most
 * likely image under the same posterior is found (primal-dual total variation with the same lambda), then
 * {@link PosteriorSampler} runs its chains: the first from that image, the others from a flat image (started
 * apart, so that the split R-hat can tell whether they reached the same distribution). The result is the
 * posterior mean, the per-voxel standard deviation and the credible interval of {@link PosteriorSummary}.
 *
 * <p>Weights: for the Poisson likelihood the prior is exp(-lambda TV(x)) with x in photo-electrons, the same
 * lambda as {@code total-variation}; for the Gaussian likelihood the prior weight is lambda / sigma^2 (sigma the
 * read noise in photo-electrons), so that the most likely image is the one {@code total-variation} with the
 * Gaussian data term gives.
 *
 * <p>What the interval means: a Bayesian credible interval under this prior and noise model: of the images that
 * the prior and the data leave plausible, the share {@code level} has this voxel's value inside the interval. It
 * is not a frequentist guarantee, and it does not include PSF or camera errors.
 */
public final class PosteriorSampling {

    /**
     * @param outcome the run on the most likely image, its record extended by the sampling's
     * @param summary the posterior summary (mean, spread, interval)
     * @param draws the kept states
     */
    public record Result(Deconvolution.Outcome outcome, PosteriorSummary summary, PosteriorSampler.Draws draws) {
    }

    /** Grid-sized float arrays the sampling holds besides the solver's: 5 of the scheme, 6 of the drift. */
    static final int GRID_ARRAYS = 11;

    private PosteriorSampling() {
    }

    /**
     * @param data camera data, not modified
     * @param psf the PSF as read, not modified
     * @param psfName where the PSF came from
     * @param mask untrusted pixels or null
     * @param s deconvolution settings (camera, background, lambda, likelihood, boundary); the method used for the
     *     most likely image is always total-variation, with the given lambda or total-variation's default
     * @param sampler how to sample
     * @param level share of the posterior inside the interval
     * @param ctx threads, progress, cancel
     */
    public static Result run(Volume data, Volume psf, String psfName, byte[] mask, DeconvolutionSettings s,
            PosteriorSampler.Settings sampler, double level, RunContext ctx) {
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level = " + level + " is not allowed; give a share between 0 and 1, e.g. 0.9");
        }
        boolean gaussian = s.likelihood().equals("gaussian");
        double sigma = s.readNoise() / s.gain();
        if (gaussian && !(sigma > 0)) {
            throw new IllegalArgumentException("read-noise = " + s.readNoise() + " is not allowed with likelihood "
                    + "gaussian and sampling: the Gaussian noise has the read noise as standard deviation; give a positive read-noise");
        }
        long window = data.size();
        MemoryCheck.require("posterior sampling of " + data.shape() + " (" + sampler.samples() + " samples)",
                (long) sampler.samples() * window * Float.BYTES + 3 * window * Float.BYTES);
        double lambda = Double.isNaN(s.regularization())
                ? DeconvolutionSettings.defaultRegularization("total-variation") : s.regularization();
        DeconvolutionSettings map = s.withMethod("total-variation", lambda);
        double theta = gaussian ? lambda / (sigma * sigma) : lambda;
        Holder holder = new Holder();
        RunContext first = new RunContext(ctx.threads(), (f, msg) -> ctx.progress(0.1 * f, msg), ctx::warn, ctx::isCancelled);
        Deconvolution.Outcome out = Deconvolution.run(data, psf, psfName, mask, map, first, IterationListener.NONE, false,
                (problem, sol) -> {
                    long grid = problem.gridLength();
                    MemoryCheck.require("posterior sampling chains on the grid " + problem.gridWidth() + "x"
                            + problem.gridHeight() + "x" + problem.gridDepth(), grid * GRID_ARRAYS * Float.BYTES);
                    float[] mapEstimate = sol.estimate();
                    PosteriorDrift drift = new PosteriorDrift(problem, gaussian ? PosteriorDrift.Likelihood.GAUSSIAN
                            : PosteriorDrift.Likelihood.POISSON, sigma, PosteriorDrift.Prior.TOTAL_VARIATION, theta, true,
                            sampler.proxSteps(), mapEstimate);
                    float[] flat = new float[problem.gridLength()];
                    problem.initialEstimate(flat);
                    RunContext rest = new RunContext(ctx.threads(), (f, msg) -> ctx.progress(0.1 + 0.9 * f, msg),
                            ctx::warn, ctx::isCancelled);
                    holder.draws = new PosteriorSampler(sampler).run(problem, drift, new float[][] {mapEstimate, flat}, rest);
                    holder.envelope = drift.envelope();
                    holder.summary = PosteriorSummary.of(holder.draws, problem.toVolume(mapEstimate), level,
                            problem.workers());
                });
        PosteriorSummary sum = holder.summary;
        PosteriorSampler.Draws d = holder.draws;
        String drawn = d.states().length + " samples";
        NumericalGuard.values("sampling", "the posterior mean", sum.mean().data(), drawn);
        NumericalGuard.values("sampling", "the posterior spread", sum.spread().data(), drawn);
        NumericalGuard.values("sampling", "the interval's lower end", sum.lower().data(), drawn);
        NumericalGuard.values("sampling", "the interval's upper end", sum.upper().data(), drawn);
        Map<String, Object> rec = new LinkedHashMap<>(out.record());
        rec.put("uncertainty", "sampling");
        Map<String, Object> sm = new LinkedHashMap<>();
        sm.put("method", "SK-ROCK proximal Langevin on the Moreau-Yosida posterior (total-variation prior, folded at zero)");
        sm.put("likelihood", gaussian ? "gaussian" : "poisson (shifted, read noise included)");
        sm.put("regularization", lambda);
        sm.put("prior_weight_per_photoelectron", theta);
        sm.put("samples", d.states().length);
        sm.put("chains", d.chains());
        sm.put("burn_in_steps", sampler.burnIn());
        sm.put("thinning_steps", sampler.thinning());
        sm.put("stages", sampler.stages());
        sm.put("step", d.step());
        sm.put("step_times_lipschitz", sampler.stepScale());
        sm.put("lipschitz", d.lipschitz());
        sm.put("moreau_yosida", holder.envelope);
        sm.put("proximal_steps", sampler.proxSteps());
        sm.put("seed", sampler.seed());
        sm.put("seconds", d.seconds());
        sm.putAll(sum.record());
        sm.put("ess_per_second", sum.essMedian() / Math.max(d.seconds(), 1e-9));
        sm.put("note", "Bayesian credible interval under the total-variation prior and the noise model; not a "
                + "guarantee, and PSF or camera errors are not included");
        rec.put("sampling", sm);
        rec.put("result_units", "posterior mean, ADU above the camera offset (background removed)");
        Deconvolution.Outcome mean = new Deconvolution.Outcome(sum.mean(), out.solution(), rec, null, out.settings());
        return new Result(mean, sum, d);
    }

    /** Carries what the sampling makes out of the solver's scope. */
    private static final class Holder {
        PosteriorSampler.Draws draws;
        PosteriorSummary summary;
        double envelope;
    }
}
