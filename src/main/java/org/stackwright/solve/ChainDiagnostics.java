package org.stackwright.solve;

import java.util.Arrays;

/**
 * Convergence and efficiency of Markov chains, per scalar quantity (here: one voxel's value across the kept
 * states): the split potential scale reduction R-hat and the effective sample size, both as in Gelman, Carlin,
 * Stern, Dunson, Vehtari &amp; Rubin, "Bayesian Data Analysis", 3rd ed., CRC 2013, sec. 11.4-11.5 (R-hat from
 * Gelman &amp; Rubin, "Inference from iterative simulation using multiple sequences", Statistical Science 7(4),
 * 1992). Each chain is split in half, so a chain that still drifts shows up as two chains that disagree.
 *
 * <pre>
 *   W = mean of the within-chain variances, B / n = variance of the chain means,
 *   var+ = (n - 1) / n W + B / n,   R-hat = sqrt(var+ / W)
 *   rho_t = 1 - V_t / (2 var+),  V_t = mean over chains of mean_i (psi_i - psi_(i-t))^2   (variogram)
 *   ESS = m n / (1 + 2 sum_(t=1..T) rho_t), T the first odd t with rho_(t+1) + rho_(t+2) &lt; 0
 *   (Geyer's initial positive sequence: Geyer, "Practical Markov chain Monte Carlo", Statistical Science 7(4), 1992)
 * </pre>
 */
public final class ChainDiagnostics {

    /**
     * @param rhat split R-hat (1 when the chains agree; NaN when every value is the same)
     * @param ess effective sample size over all chains
     */
    public record Scalar(double rhat, double ess) {
    }

    private ChainDiagnostics() {
    }

    /**
     * @param chains values [chain][draw], not modified; at least 4 draws per chain
     * @return split R-hat and effective sample size
     */
    public static Scalar of(double[][] chains) {
        int half = chains[0].length / 2;
        if (half < 2) {
            throw new IllegalArgumentException("need at least 4 draws per chain (given " + chains[0].length + ")");
        }
        int m = chains.length * 2;
        double[][] split = new double[m][];
        for (int c = 0; c < chains.length; c++) {
            split[2 * c] = Arrays.copyOfRange(chains[c], 0, half);
            split[2 * c + 1] = Arrays.copyOfRange(chains[c], chains[c].length - half, chains[c].length);
        }
        int n = half;
        double[] means = new double[m];
        double w = 0;
        double grand = 0;
        for (int j = 0; j < m; j++) {
            double s = 0;
            for (double v : split[j]) {
                s += v;
            }
            means[j] = s / n;
            grand += means[j];
            double ss = 0;
            for (double v : split[j]) {
                ss += (v - means[j]) * (v - means[j]);
            }
            w += ss / (n - 1);
        }
        w /= m;
        grand /= m;
        double bOverN = 0;
        for (double mj : means) {
            bOverN += (mj - grand) * (mj - grand);
        }
        bOverN /= (m - 1);
        double varPlus = (n - 1.0) / n * w + bOverN;
        if (!(varPlus > 0)) {
            return new Scalar(Double.NaN, Double.NaN);
        }
        double rhat = Math.sqrt(varPlus / w);
        double sum = 0;
        double[] rho = new double[n];
        for (int t = 1; t < n; t++) {
            double v = 0;
            for (double[] chain : split) {
                for (int i = t; i < n; i++) {
                    double d = chain[i] - chain[i - t];
                    v += d * d;
                }
            }
            v /= (double) m * (n - t);
            rho[t] = 1 - v / (2 * varPlus);
        }
        // rho_1, then pairs (rho_2 + rho_3), (rho_4 + rho_5), ... while their sum is positive (BDA3 eq. 11.8)
        sum = n > 1 ? rho[1] : 0;
        for (int t = 2; t + 1 < n; t += 2) {
            double pair = rho[t] + rho[t + 1];
            if (pair < 0) {
                break;
            }
            sum += pair;
        }
        double ess = m * n / Math.max(1 + 2 * sum, 1e-12);
        return new Scalar(rhat, ess);
    }
}
