package org.stackwright.solve;

import java.util.Locale;

import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * The automatic stop ({@code --stop auto}): finds how many iterations serve best by cross-validation, without the
 * truth. A trial runs the same method on half of the pixels, chosen at random (the other half carries no likelihood
 * and is kept apart), and follows how well each estimate predicts the held-out half: the mean Kullback-Leibler
 * divergence of the held-out data from the blurred estimate, the Poisson log-likelihood of data the estimate was not
 * fitted to (Stone, "Cross-validatory choice and assessment of statistical predictions", J. R. Stat. Soc. B 36,
 * 1974). It falls while the estimate gains real structure and rises once the estimate fits the noise of its own
 * half; the trial stops {@link Stopping#patience} iterations after its best, and the full problem then runs exactly
 * that many iterations. Unlike the discrepancy principle it needs no exact camera values and is still met when the
 * model is somewhat wrong (a cropped or slightly wrong PSF, an uneven background), where the fit never reaches what
 * noise alone explains.
 *
 * <p>Why half: on half the pixels each estimate is fitted to half the data, so the trial overfits a little sooner
 * than the full problem; that offsets the held-out fit's own lateness (it weighs the estimate's errors through the
 * blur, which hides the high frequencies where noise is amplified). On invented widefield stacks made by a generator
 * of its own (tools/reference/make_deconvolution_conditions.py) this lands within a few percent of the error of the
 * best iteration count; see README, "Deconvolution", for the table. The split is seeded, so a run repeats bit for
 * bit. Cost: the trial (the best count plus the patience) and the final run.
 */
public final class AutoStop {

    /** Share of the pixels held out in the trial. */
    public static final double HELD_OUT_SHARE = 0.5;
    /** Seed of the held-out pixels (fixed: runs repeat bit for bit). */
    public static final long SEED = 20261111L;

    /**
     * What the trial found.
     *
     * @param iterations the number of iterations for the full problem (at least 1)
     * @param met true when the held-out fit passed its best within the maximum; false when the maximum came first
     * @param reason the stop reason in words
     * @param heldOut held-out fit per trial iteration (index k = the estimate after k iterations)
     * @param trialSeconds time of the trial
     */
    public record Choice(int iterations, boolean met, String reason, double[] heldOut, double trialSeconds) {
    }

    private AutoStop() {
    }

    /**
     * Runs the trial.
     *
     * @param data camera data, not modified
     * @param psf the prepared PSF, not modified
     * @param mask untrusted pixels or null
     * @param boundary the boundary of the full problem
     * @param camera the camera values
     * @param backgroundAdu background above the offset
     * @param s the settings (method, lambda, acceleration, maximum iterations)
     * @param ctx threads, progress, cancel
     */
    public static Choice choose(Volume data, Volume psf, byte[] mask, DeconvolutionProblem.Boundary boundary,
            Camera camera, double backgroundAdu, DeconvolutionSettings s, RunContext ctx) {
        int max = s.stopping().maxIterations();
        DeconvolutionSettings trial = s.withStopping(new Stopping(StopRule.AUTO, max, s.stopping().tolerance()));
        RunContext trialContext = ctx.withProgress(
                (f, status) -> ctx.progress(0.5 * f, "automatic stop, trial on half the pixels: " + status));
        Solution sol;
        HeldOutRecorder recorder = new HeldOutRecorder(max);
        try (Workers workers = new Workers(ctx.threads())) {
            DeconvolutionProblem p = DeconvolutionProblem.withHeldOut(data, psf, mask, boundary, camera, backgroundAdu,
                    workers, ctx.fft(), HELD_OUT_SHARE, SEED);
            sol = trial.solver().solve(p, trialContext, recorder);
        }
        return choice(sol, recorder.history(), max);
    }

    /** Decides from the trial's held-out history. */
    static Choice choice(Solution sol, double[] heldOut, int max) {
        int best = Stopping.bestHeldOut(heldOut);
        boolean met = sol.stopReason().startsWith("auto");
        int iterations = Math.max(1, met ? best : max);
        boolean levelled = sol.stopReason().contains("levelled off");
        String reason = met
                ? String.format(Locale.ROOT, "auto: %d iterations, where the fit to held-out pixels %s (trial on"
                        + " half of the pixels, %d iterations)", iterations, levelled ? "levelled off" : "was best",
                        sol.iterations())
                : String.format(Locale.ROOT, "maximum: the fit to held-out pixels still improved after %d iterations, the"
                        + " maximum, so the automatic rule was not met; give a larger --iterations", max);
        return new Choice(iterations, met, reason, heldOut, sol.seconds());
    }

    /** Keeps the held-out fit of every trial iteration. */
    private static final class HeldOutRecorder implements IterationListener {
        private final double[] values;
        private int n;

        HeldOutRecorder(int max) {
            values = new double[max];
        }

        double[] history() {
            return java.util.Arrays.copyOf(values, n);
        }

        @Override
        public void iteration(int iteration, int maxIterations, double objective, double change) {
        }

        @Override
        public void state(IterationState state) {
            values[n++] = state.heldOutFit();
        }
    }
}
