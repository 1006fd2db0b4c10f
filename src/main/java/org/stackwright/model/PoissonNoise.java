package org.stackwright.model;

/**
 * Photon counting: y ~ Poisson(mu) with y and mu in photo-electrons (gain 1, no offset). The per-voxel deviance is
 * the Kullback-Leibler (I-divergence) term y ln(y/mu) - y + mu, zero when mu = y.
 */
public final class PoissonNoise implements NoiseModel {

    /** Smallest mu used inside logarithms and divisions. */
    static final double TINY = 1e-12;

    @Override
    public String name() {
        return "poisson";
    }

    @Override
    public double variance(double mu) {
        return Math.max(mu, TINY);
    }

    @Override
    public double deviance(double y, double mu) {
        double m = Math.max(mu, TINY);
        return y > 0 ? y * Math.log(y / m) - y + m : m;
    }

    @Override
    public double gradient(double y, double mu) {
        return 1 - y / Math.max(mu, TINY);
    }
}
