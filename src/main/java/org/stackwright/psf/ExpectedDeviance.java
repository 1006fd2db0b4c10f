package org.stackwright.psf;

/**
 * The expected Poisson deviance term E[y ln(y/m) - y + m] for y drawn from Poisson(m): what a perfect model's
 * fit statistic would be. For large m it is 1/2 + 1/(12 m) (2 x deviance is asymptotically chi-square with one
 * degree of freedom, with the Bartlett-type correction of McCullagh &amp; Nelder, Generalized Linear Models, 2nd
 * ed., 1989, sec. 6.2); for small m, where it falls well below 1/2, it is summed exactly over y.
 */
final class ExpectedDeviance {

    private ExpectedDeviance() {
    }

    /** @return E[y ln(y/m) - y + m], y ~ Poisson(m) */
    static double poisson(double m) {
        if (!(m > 0)) {
            return 0;
        }
        if (m > 40) {
            return 0.5 + 1 / (12 * m);
        }
        // P(y) by recurrence from P(0) = exp(-m); terms beyond m + 12 sqrt(m) + 12 are negligible
        int top = (int) Math.ceil(m + 12 * Math.sqrt(m) + 12);
        double pr = Math.exp(-m);
        double e = pr * m;
        for (int y = 1; y <= top; y++) {
            pr *= m / y;
            e += pr * (y * Math.log(y / m) - y + m);
        }
        return e;
    }
}
