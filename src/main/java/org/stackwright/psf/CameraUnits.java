package org.stackwright.psf;

/**
 * Camera values that turn ADU into shifted-Poisson photo-electrons (Snyder, Hammoud &amp; White, JOSA A 10(5),
 * 1993): y = (adu - offset) / gain + s with s = (read noise / gain)^2, so that y is close to Poisson with mean
 * (expected photo-electrons + s), and the Fisher information of a voxel is (dm)^2 / m in those units.
 *
 * @param offset camera offset (bias), ADU
 * @param gain ADU per photo-electron, positive
 * @param readNoise read noise standard deviation, ADU, zero or more
 */
record CameraUnits(double offset, double gain, double readNoise) {

    CameraUnits {
        if (!(gain > 0) || !Double.isFinite(gain)) {
            throw new IllegalArgumentException("gain = " + gain + " is not allowed; give a positive number of ADU per photo-electron");
        }
        if (!(readNoise >= 0) || !Double.isFinite(readNoise)) {
            throw new IllegalArgumentException("read-noise = " + readNoise + " is not allowed; give 0 or more ADU");
        }
        if (!Double.isFinite(offset)) {
            throw new IllegalArgumentException("offset = " + offset + " is not a finite number of ADU");
        }
    }

    /** @return the shift s = (read noise / gain)^2, photo-electrons */
    double shift() {
        return (readNoise / gain) * (readNoise / gain);
    }

    /** @return a camera value as shifted photo-electrons, clamped at 0 */
    double toElectrons(double adu) {
        return Math.max(0, (adu - offset) / gain + shift());
    }
}
