package org.stackwright.solve;

import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.model.CameraEstimate;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * The uncertainty part of {@code deconvolve}: none, noise replicas (parametric bootstrap, {@link NoiseReplicas})
 * or sampling the posterior ({@link PosteriorSampling}). Holds its settings' {@link Param}s and runs the
 * deconvolution in the chosen way, so the operation stays a thin door.
 */
final class UncertaintyStep {

    /** Seed of the noise replicas and of the sampler (fixed, so that a run can be repeated bit for bit). */
    static final long SEED = 20260101L;

    /** Replicas when {@code uncertainty=replicas} is asked without a count. */
    static final int DEFAULT_REPLICAS = 20;

    static final List<String> MODES = List.of("none", "replicas", "sampling");

    private UncertaintyStep() {
    }

    /** @return the settings, in dialog order */
    static List<Param> params() {
        return List.of(
                Param.choice("uncertainty", "none", MODES, "none; replicas = spread of the estimate under photon and "
                        + "camera noise (parametric bootstrap); sampling = posterior mean and credible interval under a "
                        + "total-variation prior (costs about as much as hundreds of deconvolutions)"),
                Param.integer("replicas", 0, 0, NoiseReplicas.MAX_REPLICAS, "noise replicas (uncertainty=replicas; "
                        + "0 = " + DEFAULT_REPLICAS + "); each costs one more deconvolution"),
                Param.integer("samples", 100, 4, 100_000, "posterior states kept over all chains (uncertainty=sampling)"),
                Param.number("level", 0.9, 0.5, 0.999, "", "share of the posterior inside the credible interval"),
                Param.integer("chains", 2, 1, 16, "independent chains (2 or more to check convergence)"),
                Param.integer("burn-in", 100, 0, 1_000_000, "sampler steps dropped at the start of each chain"),
                Param.integer("thinning", 10, 1, 10_000, "sampler steps between kept states"),
                Param.outputImage("spread-output", false, "per-voxel standard deviation, 32-bit, ADU: over the noise "
                        + "replicas, or of the posterior"),
                Param.outputImage("bias-output", false, "per-voxel replica mean minus the estimate, 32-bit, ADU (replicas)"),
                Param.outputImage("lower-output", false, "lower end of the credible interval, 32-bit, ADU (sampling)"),
                Param.outputImage("upper-output", false, "upper end of the credible interval, 32-bit, ADU (sampling)"),
                Param.outputImage("width-output", false, "width of the credible interval, upper - lower, 32-bit, ADU (sampling)"));
    }

    /** @return the mode asked for: {@code uncertainty}, or replicas when only a replica count is given */
    static String mode(Values v) {
        String m = v.choice("uncertainty");
        if (m.equals("none") && v.integer("replicas") > 0) {
            return "replicas";
        }
        return m;
    }

    /** Refuses outputs the chosen mode does not make, naming them. */
    static void check(Values v, String mode) {
        List<String> replicaOnly = List.of("bias-output");
        List<String> samplingOnly = List.of("lower-output", "upper-output", "width-output");
        for (String k : List.of("spread-output", "bias-output", "lower-output", "upper-output", "width-output")) {
            boolean makes = switch (mode) {
                case "replicas" -> !samplingOnly.contains(k);
                case "sampling" -> !replicaOnly.contains(k);
                default -> false;
            };
            if (v.given(k) && !makes) {
                throw new IllegalArgumentException(k + " is not made with uncertainty = " + mode + "; give uncertainty "
                        + (samplingOnly.contains(k) ? "sampling" : replicaOnly.contains(k) ? "replicas" : "replicas or sampling"));
            }
        }
    }

    /**
     * Runs the deconvolution with the uncertainty asked for and puts the outputs, record and lines into r.
     *
     * @param withModel keep the fitted forward model in the outcome (for the run's own residuals; replicas keep it
     *     anyway)
     * @return the outcome whose result is the main output (the estimate, or the posterior mean)
     */
    static Deconvolution.Outcome run(Values v, Volume data, Volume psf, String psfName, byte[] mask,
            DeconvolutionSettings s, Volume dark, Volume flat, String title, boolean withModel, RunContext ctx,
            Result r) {
        String mode = mode(v);
        check(v, mode);
        r.record("uncertainty", mode);
        switch (mode) {
            case "replicas" -> {
                int replicas = v.integer("replicas") > 0 ? v.integer("replicas") : DEFAULT_REPLICAS;
                NoiseReplicas.Noise noise = s.likelihood().equals("gaussian") ? NoiseReplicas.Noise.GAUSSIAN
                        : NoiseReplicas.Noise.CAMERA;
                NoiseReplicas.check(replicas, noise, s);
                Deconvolution.Outcome out = NoiseReplicas.deconvolveWithModel(data, psf, psfName, mask, s, dark, flat,
                        ctx, IterationListener.NONE);
                copy(out.record(), r);
                r.record("replicas", replicas);
                NoiseReplicas.Spread sp = NoiseReplicas.run(data, psf, mask, out.settings(), out, replicas, noise, SEED, ctx);
                sp.record(noise, SEED).forEach(r::record);
                r.image("spread-output", ImagePlusAdapter.toImagePlus(sp.spread(), title + "-spread"));
                r.image("bias-output", ImagePlusAdapter.toImagePlus(sp.bias(), title + "-bias"));
                r.line(String.format(Locale.ROOT, "noise replicas: %d; median spread %.4g ADU, median relative spread "
                        + "%.3g over bright voxels (photon and camera noise only)", replicas, sp.spreadMedian(),
                        sp.relativeMedian()));
                return out;
            }
            case "sampling" -> {
                PosteriorSampler.Settings ps = new PosteriorSampler.Settings(v.integer("samples"), v.integer("chains"),
                        v.integer("burn-in"), v.integer("thinning"), PosteriorSampler.DEFAULT_STAGES,
                        PosteriorSampler.DEFAULT_STEP_SCALE, PosteriorSampler.DEFAULT_PROX_STEPS, SEED);
                // the sampler's noise model needs the camera values: found once here when they are auto
                CameraEstimate camera = AutomaticSettings.camera(data, mask, s, dark, flat, ctx);
                DeconvolutionSettings known = s.withCamera(camera.offset().value(), s.background(),
                        camera.gain().value(), camera.readNoise().value());
                PosteriorSampling.Result res = PosteriorSampling.run(data, psf, psfName, mask, known, ps,
                        v.number("level"), ctx);
                PosteriorSummary sum = res.summary();
                copy(res.outcome().record(), r);
                r.image("spread-output", ImagePlusAdapter.toImagePlus(sum.spread(), title + "-posterior-sd"));
                r.image("lower-output", ImagePlusAdapter.toImagePlus(sum.lower(), title + "-lower"));
                r.image("upper-output", ImagePlusAdapter.toImagePlus(sum.upper(), title + "-upper"));
                r.image("width-output", ImagePlusAdapter.toImagePlus(sum.width(), title + "-interval-width"));
                r.line(String.format(Locale.ROOT, "posterior sampling: %d states in %d chains, %.1f s; effective sample "
                        + "size median %.0f (smallest %.0f), split R-hat median %.3f, 95th percentile %.3f; %.0f%% "
                        + "credible interval under a total-variation prior (an estimate, not a guarantee)",
                        res.draws().states().length, res.draws().chains(), res.draws().seconds(), sum.essMedian(),
                        sum.essMinimum(), sum.rhatMedian(), sum.rhatHigh(), 100 * sum.level()));
                if (!(sum.rhatHigh() < 1.1)) {
                    ctx.warn(String.format(Locale.ROOT, "sampling: the chains have not converged (split R-hat %.2f at "
                            + "the 95th percentile; below 1.1 is wanted); give a larger burn-in and more samples",
                            sum.rhatHigh()));
                }
                return res.outcome();
            }
            default -> {
                Deconvolution.Outcome out = Deconvolution.run(data, psf, psfName, mask, s, dark, flat, ctx,
                        IterationListener.NONE, withModel);
                copy(out.record(), r);
                return out;
            }
        }
    }

    private static void copy(Map<String, Object> record, Result r) {
        for (Map.Entry<String, Object> e : record.entrySet()) {
            r.record(e.getKey(), e.getValue());
        }
    }
}
