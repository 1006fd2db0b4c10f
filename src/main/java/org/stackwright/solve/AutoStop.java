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
 *
 * <p><b>When the model is wrong.</b> A PSF cropped well inside its out-of-focus light cannot explain all of the
 * light: every further iteration then explains the missing light with structure that is not there, while the
 * held-out pixels are still predicted better (they hold the same missing light), so the held-out best comes far too
 * late. The sign is a fit that stalls clearly above what noise explains at the held-out best (more than
 * {@link #MODEL_ERROR}; the trial fits its own half more closely than the full run fits all pixels), with most of
 * that excess smooth across neighbouring pixels ({@link #STRUCTURED_SHARE}, {@link ResidualStructure}): a wrong
 * blur leaves blurred, smooth misfit, whereas a wrong noise model (camera values found a little off on dim data, the
 * pixel-to-pixel gain differences of an sCMOS camera on bright data) raises the fit just as much with misfit that
 * is each pixel's own, and is no error of the blur (on the second generator's stacks the rule fired there without
 * this condition and stopped 14-15% above the best error). The structure is measured on the trial's last estimate
 * (the held-out best plus the patience), on the pixels it was fitted to. For plain Richardson-Lucy the trial then
 * takes the excess of its fit at the held-out best as the model error's share mu and stops at the first iteration
 * whose fit is within noise plus model error, the generalized discrepancy principle ||H x - y|| &lt;= delta + eta
 * (Tikhonov, Goncharsky, Stepanov &amp; Yagola, "Numerical Methods for the Solution of Ill-Posed Problems", Kluwer
 * 1995, ch. 1; the residual norm of noise alone delta, of the model error eta): with the mean divergence per pixel about half the squared residual per
 * pixel, e (expected) = delta^2 / 2N and mu = eta^2 / 2N, so the fit must reach e + mu + 2 sqrt(e mu). Regularised
 * methods are left out: their fit sits above the noise on purpose.
 */
public final class AutoStop {

    /** Share of the pixels held out in the trial. */
    public static final double HELD_OUT_SHARE = 0.5;
    /**
     * Excess of the trial's own fit at the held-out best over what noise explains above which the model counts as
     * wrong: twice the largest excess left on the first generator's invented test stacks by the right or a nearly
     * right model (2.3%; the PSF cropped to 61% of its energy left 5.3%; measured, common practice, no source). On
     * the second generator's stacks (tools/reference/make_born_wolf_conditions.py) right or nearly right models left
     * up to 3.8% with the camera values found (4.8% with the true ones) and its cropped PSF 3.3%: the threshold alone
     * does not tell them apart there; {@link #STRUCTURED_SHARE} keeps it from firing on noise-model errors.
     */
    static final double MODEL_ERROR = 0.04;
    /**
     * Share of that excess that must be spatially structured (the mean product of lateral neighbours' normalised
     * residuals, {@link ResidualStructure}) for the model-error rule: a wrong blur leaves smooth misfit, a wrong
     * noise model (camera values a little off, an sCMOS camera's pixel-to-pixel differences) leaves misfit that is
     * each pixel's own (common practice, no source; measured on the test stacks: 0.66 of the excess for the cropped
     * PSF, below 0 where dim data with camera values 13% off or bright data with a 2% pixel gain spread left 6.5%
     * and 121%).
     */
    static final double STRUCTURED_SHARE = 0.5;
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
     * @param modelErrorStop true when the stop came from the generalized discrepancy principle (fit stalled)
     * @param fitExcess the trial's own fit at the held-out best over what noise explains, minus 1 (the model-error
     *     rule fires above {@link #MODEL_ERROR}); NaN when not measured (regularised methods, maximum reached)
     * @param structuredExcess the spatially structured part of the trial's misfit relative to noise
     *     ({@link ResidualStructure}: the rule needs at least {@link #STRUCTURED_SHARE} of the excess); NaN when not
     *     measured
     */
    public record Choice(int iterations, boolean met, String reason, double[] heldOut, double trialSeconds,
            boolean modelErrorStop, double fitExcess, double structuredExcess) {
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
        double expected;
        double[] structure;
        HeldOutRecorder recorder = new HeldOutRecorder(max);
        try (Workers workers = new Workers(ctx.threads())) {
            DeconvolutionProblem p = DeconvolutionProblem.withHeldOut(data, psf, mask, boundary, camera, backgroundAdu,
                    workers, ctx.fft(), HELD_OUT_SHARE, SEED);
            sol = trial.solver().solve(p, trialContext, recorder);
            expected = p.fitOfEstimate(sol.estimate())[1];
            structure = s.regularized() ? null : ResidualStructure.of(p, sol.estimate());
        }
        return choice(sol, recorder.history(), max, s.regularized() ? null : recorder.fits(), expected,
                structure == null ? Double.NaN : structure[1]);
    }

    /**
     * Decides from the trial's held-out history.
     *
     * @param fits the trial's own fit per iteration (index k = the estimate after k iterations), or null to leave out
     *     the model-error rule
     * @param expected what noise alone explains of that fit
     * @param structured the structured part of the trial's misfit: the mean product of lateral neighbours'
     *     normalised residuals of {@link ResidualStructure} (NaN when not measured)
     */
    static Choice choice(Solution sol, double[] heldOut, int max, double[] fits, double expected,
            double structured) {
        int best = Stopping.bestHeldOut(heldOut);
        boolean met = sol.stopReason().startsWith("auto");
        int iterations = Math.max(1, met ? best : max);
        double excess = met && fits != null && best >= 0 && best < fits.length ? fits[best] / expected - 1 : Double.NaN;
        if (excess > MODEL_ERROR && structured >= STRUCTURED_SHARE * excess) {
            double mu = fits[best] - expected;
            double target = expected + mu + 2 * Math.sqrt(expected * mu);
            int k = 1;
            while (k < best && !(fits[k] <= target)) {
                k++;
            }
            String reason = String.format(Locale.ROOT, "auto: %d iterations, where the fit came within noise plus model"
                    + " error (%.4f per pixel; generalized discrepancy principle): the held-out fit was best after %d"
                    + " iterations, but there the fit stalled at %.4f, %.0f%% above what noise explains (%.4f), most"
                    + " of it smooth across neighbouring pixels (%.0f%%), so the model cannot explain all of the light"
                    + " (trial on half of the pixels, %d iterations)", k, target, best, fits[best], 100 * excess,
                    expected, 100 * structured, sol.iterations());
            return new Choice(k, true, reason, heldOut, sol.seconds(), true, excess, structured);
        }
        boolean levelled = sol.stopReason().contains("levelled off");
        String reason = met
                ? String.format(Locale.ROOT, "auto: %d iterations, where the fit to held-out pixels %s (trial on"
                        + " half of the pixels, %d iterations)", iterations, levelled ? "levelled off" : "was best",
                        sol.iterations())
                : String.format(Locale.ROOT, "maximum: the fit to held-out pixels still improved after %d iterations, the"
                        + " maximum, so the automatic rule was not met; give a larger --iterations", max);
        return new Choice(iterations, met, reason, heldOut, sol.seconds(), false, excess, structured);
    }

    /** Keeps the held-out fit of every trial iteration. */
    private static final class HeldOutRecorder implements IterationListener {
        private final double[] values;
        private final double[] fits;
        private int n;

        HeldOutRecorder(int max) {
            values = new double[max];
            fits = new double[max];
        }

        double[] history() {
            return java.util.Arrays.copyOf(values, n);
        }

        double[] fits() {
            return java.util.Arrays.copyOf(fits, n);
        }

        @Override
        public void iteration(int iteration, int maxIterations, double objective, double change) {
        }

        @Override
        public void state(IterationState state) {
            fits[n] = state.meanFit();
            values[n++] = state.heldOutFit();
        }
    }
}
