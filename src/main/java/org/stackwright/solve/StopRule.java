package org.stackwright.solve;

import java.util.Locale;

/**
 * When an iterative solver stops. Every rule also stops at the maximum number of iterations.
 *
 * <ul>
 * <li>{@link #FIXED}: exactly the maximum number of iterations.</li>
 * <li>{@link #CHANGE}: when the relative change ||x_k+1 - x_k|| / ||x_k|| falls below the tolerance (for the
 * primal-dual method: when the relative primal-dual gap does).</li>
 * <li>{@link #NOISE}: the discrepancy principle: when the mean Kullback-Leibler divergence of the data from the
 * model per trusted pixel falls to its expected value under the noise model, 1/2 (Bertero, Boccacci, Talenti,
 * Zanella &amp; Zanni, "A discrepancy principle for Poisson data", Inverse Problems 26, 2010). Fitting the data
 * more closely than the noise allows only fits the noise.</li>
 * <li>{@link #AUTO}: on a problem with held-out pixels, when the fit to the held-out pixels has not improved for
 * {@link Stopping#patience} iterations after its best (cross-validation; {@link AutoStop} runs that trial and then the
 * full problem for the best number of iterations); on a problem without, as {@link #NOISE}. total-variation, solved
 * to convergence, stops instead when its objective has settled within its statistical fluctuation
 * ({@link Stopping#settled}).</li>
 * </ul>
 */
public enum StopRule {
    FIXED, CHANGE, NOISE, AUTO;

    /** @return the CLI word */
    public String word() {
        return name().toLowerCase(Locale.ROOT);
    }

    /** @return the CLI words of all rules */
    public static java.util.List<String> words() {
        return java.util.Arrays.stream(values()).map(StopRule::word).toList();
    }

    /** @return the rule for a CLI word (fixed, change, noise, auto) */
    public static StopRule of(String word) {
        for (StopRule r : values()) {
            if (r.word().equals(word)) {
                return r;
            }
        }
        throw new IllegalArgumentException("stop = '" + word + "' is not allowed; choose one of " + String.join(", ", words()));
    }
}
