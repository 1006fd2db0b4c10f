package org.stackwright.simulate;

import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.random.Well19937c;
import org.stackwright.volume.Volume;

/**
 * A camera model: expected photons per pixel become counts by Poisson photon noise, are multiplied by the gain
 * (ADU per photo-electron), get Gaussian read noise (ADU) and an offset (ADU), and are clipped to the camera's
 * range. This is the common Poisson-Gaussian model of CCD / sCMOS cameras (common practice; see
 * ../shared/REFERENCES.md, "Poisson-Gaussian camera model").
 *
 * @param gain ADU per photo-electron, positive
 * @param offset camera offset (bias) in ADU
 * @param readNoise read noise standard deviation in ADU, zero or more
 * @param fullScale largest value the camera can give (saturation), ADU
 */
public record Camera(double gain, double offset, double readNoise, double fullScale) {

    public Camera {
        if (!(gain > 0) || !Double.isFinite(gain)) {
            throw new IllegalArgumentException("camera gain must be positive (given " + gain + ")");
        }
        if (!(readNoise >= 0) || !Double.isFinite(readNoise)) {
            throw new IllegalArgumentException("read noise must be zero or more (given " + readNoise + ")");
        }
        if (!Double.isFinite(offset)) {
            throw new IllegalArgumentException("camera offset must be finite (given " + offset + ")");
        }
        if (!(fullScale > offset)) {
            throw new IllegalArgumentException("camera full scale must be above the offset " + offset + " (given "
                    + fullScale + ")");
        }
    }

    /** A photon-counting detector: gain 1, no offset, no read noise, no saturation. */
    public static Camera photonCounting() {
        return new Camera(1, 0, 0, Double.POSITIVE_INFINITY);
    }

    /** A 16-bit scientific camera: gain 1, offset 100 ADU, read noise 2 ADU, full scale 65535. */
    public static Camera scientific16bit() {
        return new Camera(1, 100, 2, 65535);
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
            double counts = m > 0 ? poisson(rng, m) : 0;
            double adu = gain * counts + offset + (readNoise > 0 ? readNoise * rng.nextGaussian() : 0);
            out[i] = (float) Math.min(fullScale, adu);
        }
        return expectedPhotons.withData(out);
    }

    /** One Poisson sample with the given mean, in constant expected time (see {@link PoissonSampler}). */
    static double poisson(RandomGenerator rng, double mean) {
        return PoissonSampler.sample(rng, mean);
    }
}
