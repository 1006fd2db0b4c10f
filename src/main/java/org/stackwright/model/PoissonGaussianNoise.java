package org.stackwright.model;

/**
 * A camera: y = gain * Poisson(mu_e) + N(0, readNoise^2) in ADU, with mu = gain * mu_e (after the offset, which
 * the forward model carries as background). Variance gain * mu + readNoise^2 (common practice for CCD / sCMOS).
 * The likelihood uses the shifted-Poisson approximation of Snyder, Hammoud & White, "Image recovery from data
 * acquired with a charge-coupled-device camera", JOSA A 10(5):1014-1023, 1993: (y/g + s) ~ Poisson(mu/g + s) with
 * s = (readNoise/g)^2.
 *
 * @param gain ADU per photo-electron, positive
 * @param readNoise read noise in ADU, zero or more
 */
public record PoissonGaussianNoise(double gain, double readNoise) implements NoiseModel {

    public PoissonGaussianNoise {
        if (!(gain > 0) || !Double.isFinite(gain)) {
            throw new IllegalArgumentException("gain must be positive (given " + gain + ")");
        }
        if (!(readNoise >= 0) || !Double.isFinite(readNoise)) {
            throw new IllegalArgumentException("read-noise must be zero or more (given " + readNoise + ")");
        }
    }

    @Override
    public String name() {
        return "poisson-gaussian";
    }

    /** @return the shift s = (readNoise / gain)^2 in photo-electrons */
    public double shift() {
        return (readNoise / gain) * (readNoise / gain);
    }

    @Override
    public double variance(double mu) {
        return Math.max(gain * Math.max(mu, 0) + readNoise * readNoise, PoissonNoise.TINY);
    }

    @Override
    public double deviance(double y, double mu) {
        double s = shift();
        double ys = Math.max(y / gain + s, 0);
        double ms = Math.max(mu / gain + s, PoissonNoise.TINY);
        return ys > 0 ? ys * Math.log(ys / ms) - ys + ms : ms;
    }

    @Override
    public double gradient(double y, double mu) {
        double s = shift();
        double ys = Math.max(y / gain + s, 0);
        double ms = Math.max(mu / gain + s, PoissonNoise.TINY);
        return (1 - ys / ms) / gain;
    }
}
