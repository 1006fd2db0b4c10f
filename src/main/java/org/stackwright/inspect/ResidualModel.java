package org.stackwright.inspect;

import org.stackwright.model.GaussianNoise;
import org.stackwright.model.NoiseModel;
import org.stackwright.model.PoissonGaussianNoise;
import org.stackwright.model.PoissonNoise;

/**
 * The forward model the residual view checks: predicted data mu = offset + background + H x (camera units, ADU),
 * with the variance of the data given by the noise model at the signal above the offset, var(y) =
 * noise.variance(background + H x). The estimate x is in the data's units above the offset (what a deconvolution
 * of offset-corrected data returns).
 *
 * @param offset camera offset (bias) in ADU, added to every predicted voxel
 * @param background background per voxel above the offset, ADU
 * @param noise the noise model
 */
public record ResidualModel(double offset, double background, NoiseModel noise) {

    public ResidualModel {
        if (!Double.isFinite(offset)) {
            throw new IllegalArgumentException("offset must be a finite number of ADU (given " + offset + ")");
        }
        if (!Double.isFinite(background)) {
            throw new IllegalArgumentException("background must be a finite number of ADU (given " + background + ")");
        }
        if (noise == null) {
            throw new IllegalArgumentException("noise model must be given");
        }
    }

    /**
     * Builds the noise model from the command-line words.
     *
     * @param name "poisson", "poisson-gaussian" or "gaussian"
     * @param gain ADU per photo-electron (poisson, poisson-gaussian)
     * @param readNoise read noise in ADU (poisson-gaussian), or the constant standard deviation (gaussian)
     * @throws IllegalArgumentException naming the option when the combination makes no sense
     */
    public static NoiseModel noiseModel(String name, double gain, double readNoise) {
        switch (name) {
            case "poisson" -> {
                if (readNoise != 0) {
                    throw new IllegalArgumentException("read-noise = " + readNoise + " is not used by noise poisson;"
                            + " choose noise poisson-gaussian (or leave read-noise at 0)");
                }
                checkGain(gain);
                return gain == 1 ? new PoissonNoise() : new PoissonGaussianNoise(gain, 0);
            }
            case "poisson-gaussian" -> {
                checkGain(gain);
                if (!(readNoise >= 0) || !Double.isFinite(readNoise)) {
                    throw new IllegalArgumentException("read-noise = " + readNoise + " must be 0 or more ADU");
                }
                return new PoissonGaussianNoise(gain, readNoise);
            }
            case "gaussian" -> {
                if (!(readNoise > 0) || !Double.isFinite(readNoise)) {
                    throw new IllegalArgumentException("read-noise = " + readNoise + ": likelihood gaussian needs the noise"
                            + " standard deviation in ADU as read-noise, a positive number");
                }
                return new GaussianNoise(readNoise);
            }
            default -> throw new IllegalArgumentException("likelihood = '" + name
                    + "' is not allowed; choose one of poisson, poisson-gaussian, gaussian");
        }
    }

    private static void checkGain(double gain) {
        if (!(gain > 0) || !Double.isFinite(gain)) {
            throw new IllegalArgumentException("gain = " + gain + " must be a positive number of ADU per photo-electron");
        }
    }
}
