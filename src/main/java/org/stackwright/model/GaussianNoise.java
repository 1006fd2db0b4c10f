package org.stackwright.model;

/**
 * Additive Gaussian noise of constant standard deviation sigma: deviance (y - mu)^2 / (2 sigma^2).
 *
 * @param sigma standard deviation in ADU, positive
 */
public record GaussianNoise(double sigma) implements NoiseModel {

    public GaussianNoise {
        if (!(sigma > 0) || !Double.isFinite(sigma)) {
            throw new IllegalArgumentException("noise sigma must be positive (given " + sigma + ")");
        }
    }

    @Override
    public String name() {
        return "gaussian";
    }

    @Override
    public double variance(double mu) {
        return sigma * sigma;
    }

    @Override
    public double deviance(double y, double mu) {
        double r = (y - mu) / sigma;
        return 0.5 * r * r;
    }

    @Override
    public double gradient(double y, double mu) {
        return (mu - y) / (sigma * sigma);
    }
}
