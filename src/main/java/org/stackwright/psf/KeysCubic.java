package org.stackwright.psf;

/**
 * The Keys cubic convolution kernel with a = -0.5 (Keys, "Cubic convolution interpolation for digital image
 * processing", IEEE TASSP 29(6):1153-1160, 1981): interpolates exactly through the samples and reproduces
 * quadratics.
 */
final class KeysCubic {

    private KeysCubic() {
    }

    /** @return the kernel at offset s (in samples) */
    static double kernel(double s) {
        double x = Math.abs(s);
        if (x <= 1) {
            return (1.5 * x - 2.5) * x * x + 1;
        }
        if (x < 2) {
            return ((-0.5 * x + 2.5) * x - 4) * x + 2;
        }
        return 0;
    }

    /** @return the derivative of the kernel at offset s (in samples) */
    static double derivative(double s) {
        double x = Math.abs(s);
        double d;
        if (x <= 1) {
            d = (4.5 * x - 5) * x;
        } else if (x < 2) {
            d = (-1.5 * x + 5) * x - 4;
        } else {
            return 0;
        }
        return s < 0 ? -d : d;
    }
}
