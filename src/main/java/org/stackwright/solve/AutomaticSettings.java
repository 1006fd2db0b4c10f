package org.stackwright.solve;

import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.model.CameraEstimate;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/**
 * Turns settings with automatic values ("auto", NaN in {@link DeconvolutionSettings}) into concrete ones, once, from
 * the whole volume, before a solver runs, and records how each was found:
 * <ol>
 * <li>camera values: given, from dark or flat frames, or from the image ({@link CameraEstimate});</li>
 * <li>background: the darkest regions of the data ({@link BackgroundEstimate});</li>
 * <li>regularisation weight of richardson-lucy-tv and total-variation ({@link RegularizationChoice});</li>
 * <li>iteration count: {@code --stop auto} becomes a fixed count found by a trial on half of the pixels
 * ({@link AutoStop}); total-variation, which solves its problem to convergence, keeps the automatic rule and stops
 * when its objective has settled within its statistical fluctuation ({@link Stopping#settled}).</li>
 * </ol>
 * The resolved settings hold no automatic value any more, so a caller that processes a large volume in parts can
 * resolve once (on the whole volume, or a representative part) and run every part with the same camera values,
 * background, lambda and iteration count. Each step is also callable on its own.
 */
public final class AutomaticSettings {

    /**
     * @param settings the concrete settings (nothing automatic left; the stop is fixed when it was auto)
     * @param camera how the camera values were found
     * @param backgroundEstimated true when the background was estimated
     * @param regularization how lambda was chosen, or null when it was given or the method has none
     * @param stop the trial of the automatic stop, or null when the stop was not auto
     */
    public record Resolved(DeconvolutionSettings settings, CameraEstimate camera, boolean backgroundEstimated,
            RegularizationChoice.Choice regularization, AutoStop.Choice stop) {

        /** @return how the values were found, for the run record's settings */
        public Map<String, Object> record() {
            Map<String, Object> m = new LinkedHashMap<>(camera.record());
            m.put("background_adu", settings.background());
            m.put("background_estimated", backgroundEstimated);
            if (regularization != null) {
                m.put("regularization_choice", regularization.record());
            }
            if (stop != null) {
                Map<String, Object> t = new LinkedHashMap<>();
                t.put("iterations", stop.iterations());
                t.put("met", stop.met());
                t.put("held_out_share", AutoStop.HELD_OUT_SHARE);
                t.put("trial_iterations", stop.heldOut().length);
                t.put("trial_seconds", stop.trialSeconds());
                t.put("model_error_stop", stop.modelErrorStop());
                if (!Double.isNaN(stop.fitExcess())) {
                    t.put("fit_excess_at_best", stop.fitExcess());
                }
                if (!Double.isNaN(stop.structuredExcess())) {
                    t.put("structured_excess", stop.structuredExcess());
                }
                t.put("held_out_history", stop.heldOut());
                m.put("stop_trial", t);
            }
            return m;
        }
    }

    private AutomaticSettings() {
    }

    /**
     * @param data camera data, not modified (non-finite pixels already masked)
     * @param psf the prepared PSF (checked, normalised, at the data's voxel size), not modified
     * @param mask untrusted pixels (nonzero), or null
     * @param s settings, possibly with automatic values
     * @param dark dark frames, or null
     * @param flat flat frames, or null
     * @param ctx threads, progress, cancel; warnings go here
     */
    public static Resolved resolve(Volume data, Volume psf, byte[] mask, DeconvolutionSettings s, Volume dark,
            Volume flat, RunContext ctx) {
        CameraEstimate camera = camera(data, mask, s, dark, flat, ctx);
        DeconvolutionSettings r = s.withCamera(camera.offset().value(), s.background(), camera.gain().value(),
                camera.readNoise().value());
        boolean bgEstimated = Double.isNaN(s.background());
        if (bgEstimated) {
            r = r.withCamera(r.offset(), BackgroundEstimate.estimate(data, mask, r.offset(), r.camera()), r.gain(), r.readNoise());
        }
        RegularizationChoice.Choice lambda = null;
        if (r.regularized() && Double.isNaN(r.regularization())) {
            lambda = RegularizationChoice.choose(data, psf, mask, r, ctx);
            r = r.withLambda(lambda.lambda());
        }
        AutoStop.Choice stop = null;
        if (r.stopping().rule() == StopRule.AUTO) {
            Stopping st = r.stopping();
            if (r.method().equals("total-variation")) {
                // solved to convergence: its own automatic rule (Stopping.settled) needs no trial
            } else if (r.method().equals("wiener")) {
                r = r.withStopping(Stopping.fixed(1));
            } else {
                stop = AutoStop.choose(data, psf, mask, boundary(r), r.camera(), r.background(), r, ctx);
                r = r.withStopping(new Stopping(StopRule.FIXED, stop.iterations(), st.tolerance()));
            }
        }
        return new Resolved(r, camera, bgEstimated, lambda, stop);
    }

    /** Step 1 alone: the camera values, with warnings passed to the context. */
    public static CameraEstimate camera(Volume data, byte[] mask, DeconvolutionSettings s, Volume dark, Volume flat,
            RunContext ctx) {
        CameraEstimate.Given given = new CameraEstimate.Given(s.gain(), s.offset(), s.readNoise(), dark, flat);
        if (given.complete() && (dark != null || flat != null)) {
            ctx.warn("dark, flat: not used, because gain, offset and read-noise are all given");
        }
        ctx.progress(0, "camera values");
        CameraEstimate e = CameraEstimate.of(data, mask, given, "dark", "flat");
        e.warnTo(ctx::warn);
        return e;
    }

    /** @return the problem boundary the settings name */
    static DeconvolutionProblem.Boundary boundary(DeconvolutionSettings s) {
        return s.boundary().equals("periodic") ? DeconvolutionProblem.Boundary.PERIODIC
                : DeconvolutionProblem.Boundary.EXTENDED;
    }
}
