package org.stackwright.model;

/**
 * The expected Kullback-Leibler divergence E[y ln(y / mu) - y + mu] of a Poisson count y of mean mu from its own
 * mean: what noise alone leaves in the data fit when the model is right. It is 1/2 + 1/(12 mu) + O(mu^-2) for large
 * mu (the value 1/2 of the discrepancy principle: Bertero, Boccacci, Talenti, Zanella &amp; Zanni, "A discrepancy
 * principle for Poisson data", Inverse Problems 26, 2010), up to 0.573 near mu = 1 and below 1/2 for mu under 0.5.
 * Below mu = 100 it is summed exactly over the Poisson distribution once, on a table of 600 logarithmically spaced
 * means, and interpolated; above, the two-term expansion is used (error below 1e-6).
 */
public final class PoissonDeviance {

    private static final double LOW = 1e-4;
    private static final double HIGH = 100;
    private static final int STEPS = 600;
    /** ln(HIGH / LOW), once: the table's span (a logarithm less per call) */
    private static final double LOG_SPAN = Math.log(HIGH / LOW);
    private static final double[] TABLE = table();

    private PoissonDeviance() {
    }

    /** @return the expected divergence of a Poisson count of mean mu (0 for mu &lt;= 0) */
    public static double expected(double mu) {
        if (!(mu > 0)) {
            return 0;
        }
        if (mu >= HIGH) {
            return 0.5 + 1 / (12 * mu);
        }
        if (mu <= LOW) {
            return TABLE[0] * mu / LOW;
        }
        double t = FastLog.log(mu / LOW) / LOG_SPAN * STEPS; // once per pixel: the table-driven logarithm
        int i = Math.min((int) t, STEPS - 1);
        double f = t - i;
        return TABLE[i] * (1 - f) + TABLE[i + 1] * f;
    }

    private static double[] table() {
        double[] t = new double[STEPS + 1];
        for (int i = 0; i <= STEPS; i++) {
            double mu = LOW * Math.pow(HIGH / LOW, (double) i / STEPS);
            t[i] = exact(mu);
        }
        return t;
    }

    /** Sum over y of P(y) (y ln(y / mu) - y + mu), with P(y) by the recurrence P(y) = P(y-1) mu / y. */
    static double exact(double mu) {
        double p = Math.exp(-mu);
        double sum = p * mu;
        int last = (int) Math.ceil(mu + 40 * Math.sqrt(mu) + 40);
        for (int y = 1; y <= last; y++) {
            p *= mu / y;
            sum += p * (y * Math.log(y / mu) - y + mu);
        }
        return sum;
    }
}
