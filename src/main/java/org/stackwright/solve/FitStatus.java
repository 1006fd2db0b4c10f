package org.stackwright.solve;

import java.util.Locale;

/**
 * How far the final data fit is from what noise alone explains, in words for the stop reason. The fit is the mean
 * Kullback-Leibler divergence of the data from the model per trusted pixel; what noise explains is its expected
 * value when the model is right ({@link org.stackwright.model.PoissonDeviance}: 1/2 for bright data, more for dim
 * data; Bertero, Boccacci, Talenti, Zanella &amp; Zanni, Inverse Problems 26, 2010). A fit clearly above it means the
 * model cannot explain all of the light: a PSF that is cropped or of the wrong width, a background that is not flat,
 * wrong camera values. A run stopped early on purpose (the automatic rule, a fixed count) has not fitted all of the
 * real structure yet, so its fit is a few percent above even when the model is right, and so is a regularised one
 * (the regularisation trades fit for smoothness on purpose: total-variation at its automatic lambda left 2% on the
 * invented exact-model stack); only a larger excess is called a stall there.
 */
final class FitStatus {

    /** Excess over what noise explains that counts as a stall after a run to convergence or to the maximum. */
    static final double STALLED = 0.02;
    /**
     * The same after an early stop: on the invented test stacks the right model left 0 to 5% at the automatic stop,
     * a PSF cropped to 60% of its energy 12% (measured; common practice, no source).
     */
    static final double STALLED_EARLY = 0.10;

    private FitStatus() {
    }

    /**
     * @param fit mean divergence per trusted pixel of the final estimate
     * @param expected what noise alone leaves
     * @param early true when the run was stopped early on purpose (automatic rule, fixed count)
     * @return a sentence for the stop reason
     */
    static String describe(double fit, double expected, boolean early) {
        double excess = fit / expected - 1;
        if (excess > (early ? STALLED_EARLY : STALLED)) {
            return String.format(Locale.ROOT, "the fit stalled at %.4f per pixel, %.0f%% above what noise explains (%.4f):"
                    + " the PSF, background or camera values may be off; see the residual view (residuals)", fit,
                    100 * excess, expected);
        }
        return String.format(Locale.ROOT, "the fit is %.4f per pixel; noise alone explains %.4f", fit, expected);
    }
}
