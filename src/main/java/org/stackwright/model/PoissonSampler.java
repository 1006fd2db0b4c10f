package org.stackwright.model;

import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.special.Gamma;

/**
 * Poisson random numbers in constant expected time for any mean.
 *
 * <p>Means below 10: multiplication of uniforms (Knuth, "The Art of Computer Programming", vol. 2, 3rd ed., 1997,
 * sec. 3.4.1, algorithm Q), about mean + 1 uniforms. Means of 10 and more: transformed rejection with squeeze,
 * PTRS (Hörmann, "The transformed rejection method for generating Poisson random variables", Insurance:
 * Mathematics and Economics 12(1):39-45, 1993), with the constants of that paper; about 1.2 uniform pairs.
 *
 * <p>Why not commons-math3's {@code PoissonDistribution.sample()}: in version 3.6.1 its large-mean branch
 * evaluates log k! by summing k logarithms, so a sample costs O(mean) (about 0.1 ms at 800 photons), which made
 * simulating bright specimens take minutes.
 */
final class PoissonSampler {

    private PoissonSampler() {
    }

    /** @return one Poisson sample with the given mean (0 for a mean of 0 or less) */
    static double sample(RandomGenerator rng, double mean) {
        if (!(mean > 0)) {
            return 0;
        }
        return mean < 10 ? multiplication(rng, mean) : ptrs(rng, mean);
    }

    private static double multiplication(RandomGenerator rng, double mean) {
        double limit = Math.exp(-mean);
        double p = rng.nextDouble();
        int k = 0;
        while (p > limit) {
            k++;
            p *= rng.nextDouble();
        }
        return k;
    }

    private static double ptrs(RandomGenerator rng, double mean) {
        double slam = Math.sqrt(mean);
        double loglam = Math.log(mean);
        double b = 0.931 + 2.53 * slam;
        double a = -0.059 + 0.02483 * b;
        double invalpha = 1.1239 + 1.1328 / (b - 3.4);
        double vr = 0.9277 - 3.6224 / (b - 2);
        while (true) {
            double u = rng.nextDouble() - 0.5;
            double v = rng.nextDouble();
            double us = 0.5 - Math.abs(u);
            double k = Math.floor((2 * a / us + b) * u + mean + 0.43);
            if (us >= 0.07 && v <= vr) {
                return k;
            }
            if (k < 0 || (us < 0.013 && v > us)) {
                continue;
            }
            if (Math.log(v) + Math.log(invalpha) - Math.log(a / (us * us) + b)
                    <= -mean + k * loglam - Gamma.logGamma(k + 1)) {
                return k;
            }
        }
    }
}
