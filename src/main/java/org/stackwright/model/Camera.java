package org.stackwright.model;

import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.random.Well19937c;
import org.stackwright.volume.Volume;

/**
 * The one description of a camera that every part uses: the solvers and the residual view read it to model the
 * noise, the noise replicas and the simulator draw images from it. Expected photons per pixel become counts by
 * Poisson photon noise, are multiplied by the gain (ADU per photo-electron), get Gaussian read noise (ADU) and an
 * offset (ADU), and are clipped to the camera's range. This is the common Poisson-Gaussian model of CCD / sCMOS
 * cameras (common practice, no source; see ../shared/REFERENCES.md, "Poisson-Gaussian camera model"): a pixel of
 * mean m ADU above the offset has variance gain * m + readNoise^2.
 *
 * <p>The background (light that is not the object) is not a property of the camera; the forward model carries it
 * beside the camera ({@link DeconvolutionProblem}).
 *
 * @param gain ADU per photo-electron, positive
 * @param offset camera offset (bias) in ADU
 * @param readNoise read noise standard deviation in ADU, zero or more
 * @param fullScale largest value the camera can give (saturation), ADU; infinite for none
 */
public record Camera(double gain, double offset, double readNoise, double fullScale) {

    public Camera {
        if (!(gain > 0) || !Double.isFinite(gain)) {
            throw new IllegalArgumentException("gain = " + gain + " is not allowed; give a positive number of ADU per photo-electron");
        }
        if (!(readNoise >= 0) || !Double.isFinite(readNoise)) {
            throw new IllegalArgumentException("read noise = " + readNoise + " is not allowed; give 0 or more ADU");
        }
        if (!Double.isFinite(offset)) {
            throw new IllegalArgumentException("offset = " + offset + " is not a finite number of ADU");
        }
        if (!(fullScale > offset)) {
            throw new IllegalArgumentException("camera full scale must be above the offset " + offset + " (given "
                    + fullScale + ")");
        }
    }

    /** A camera without saturation. */
    public static Camera of(double gain, double offset, double readNoise) {
        return new Camera(gain, offset, readNoise, Double.POSITIVE_INFINITY);
    }

    /** A photon-counting detector: gain 1, no offset, no read noise, no saturation. */
    public static Camera photonCounting() {
        return new Camera(1, 0, 0, Double.POSITIVE_INFINITY);
    }

    /** A 16-bit scientific camera: gain 1, offset 100 ADU, read noise 2 ADU, full scale 65535. */
    public static Camera scientific16bit() {
        return new Camera(1, 100, 2, 65535);
    }

    /** @return the read noise in photo-electrons squared, (readNoise / gain)^2: the shift of the shifted-Poisson model */
    public double readNoiseShift() {
        return (readNoise / gain) * (readNoise / gain);
    }

    /** @return the variance in ADU^2 of a pixel whose mean is {@code aboveOffset} ADU above the offset */
    public double variance(double aboveOffset) {
        return gain * Math.max(aboveOffset, 0) + readNoise * readNoise;
    }

    /**
     * Records an image.
     *
     * @param expectedPhotons expected photons per pixel (blurred specimen plus background), not modified;
     *     negative values are treated as 0
     * @param seed random seed; the same seed gives the same image
     * @return camera values in ADU (not rounded to integers, so that tests see the exact model)
     */
    public Volume record(Volume expectedPhotons, long seed) {
        RandomGenerator rng = new Well19937c(seed);
        float[] mu = expectedPhotons.data();
        float[] out = new float[mu.length];
        for (int i = 0; i < mu.length; i++) {
            double m = Math.max(0, mu[i]);
            double counts = m > 0 ? PoissonSampler.sample(rng, m) : 0;
            double adu = gain * counts + offset + (readNoise > 0 ? readNoise * rng.nextGaussian() : 0);
            out[i] = (float) Math.min(fullScale, adu);
        }
        return expectedPhotons.withData(out);
    }
}
