package org.stackwright.model;

import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The sampler's histogram against the Poisson probabilities P(k) = mu^k e^-mu / k! (computed by commons-math3's
 * PoissonDistribution.probability), Pearson's chi-square goodness-of-fit test at the 0.001 level, on both branches
 * (multiplication below 10, PTRS above) and at the switch.
 */
class PoissonSamplerTest {

    @ParameterizedTest(name = "mean {0}")
    @ValueSource(doubles = {0.05, 1.3, 9.99, 10, 37.5, 800, 20000})
    void histogramFitsThePoissonProbabilities(double mean) {
        int n = 200_000;
        Well19937c rng = new Well19937c(123);
        int lo = (int) Math.max(0, Math.floor(mean - 6 * Math.sqrt(mean) - 2));
        int hi = (int) Math.ceil(mean + 6 * Math.sqrt(mean) + 4);
        long[] counts = new long[hi - lo + 1];
        for (int i = 0; i < n; i++) {
            double k = PoissonSampler.sample(rng, mean);
            int bin = (int) Math.min(hi, Math.max(lo, k)) - lo;
            counts[bin]++;
        }
        PoissonDistribution exact = new PoissonDistribution(mean);
        // pool bins into groups of expected count >= 5 (Pearson's rule of thumb, common practice)
        double chi2 = 0;
        int dof = -1;
        double expected = 0;
        long observed = 0;
        for (int k = lo; k <= hi; k++) {
            double p = k == lo ? exact.cumulativeProbability(lo) : k == hi
                    ? 1 - exact.cumulativeProbability(hi - 1) : exact.probability(k);
            expected += n * p;
            observed += counts[k - lo];
            if (expected >= 5 || k == hi) {
                chi2 += (observed - expected) * (observed - expected) / Math.max(expected, 1e-300);
                dof++;
                expected = 0;
                observed = 0;
            }
        }
        double limit = dof < 1 ? 10.83 : new ChiSquaredDistribution(dof).inverseCumulativeProbability(0.999);
        assertTrue(chi2 < limit, "chi-square " + chi2 + " with " + dof + " degrees of freedom exceeds " + limit);
    }
}
