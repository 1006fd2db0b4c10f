package org.stackwright.fft;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.stackwright.parallel.Workers;
import org.stackwright.testing.VolumeAssert;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A Gaussian convolved with a Gaussian is a Gaussian whose variance is the sum of the two variances (the density
 * of a sum of independent normal variables; any probability text, e.g. Feller, "An Introduction to Probability
 * Theory and Its Applications", vol. 2, 1971, ch. II). Checked on point-sampled Gaussians wide enough (sigma >= 1.2
 * voxels) that sampling changes their discrete variance by far less than 1e-6 (Poisson summation), in an image of
 * awkward (prime and odd) sizes.
 */
class GaussianConvolutionTest {

    /** Point-sampled, unnormalised Gaussian with the given sigmas (voxels) centred at (cx, cy, cz). */
    static Volume gaussian(int nx, int ny, int nz, double cx, double cy, double cz, double sx, double sy, double sz) {
        Volume v = Volume.zeros(nx, ny, nz, VoxelSize.UNIT);
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    double q = sq((x - cx) / sx) + sq((y - cy) / sy) + sq((z - cz) / sz);
                    v.set(x, y, z, (float) Math.exp(-0.5 * q));
                }
            }
        }
        return v;
    }

    private static double sq(double a) {
        return a * a;
    }

    /** @return {sum, mean x, mean y, mean z, var x, var y, var z} of a non-negative volume taken as a density */
    static double[] moments(Volume v) {
        double s = 0;
        double[] m1 = new double[3];
        double[] m2 = new double[3];
        for (int z = 0; z < v.depth(); z++) {
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    double w = v.get(x, y, z);
                    s += w;
                    m1[0] += w * x;
                    m1[1] += w * y;
                    m1[2] += w * z;
                    m2[0] += w * x * x;
                    m2[1] += w * y * y;
                    m2[2] += w * z * z;
                }
            }
        }
        double[] r = new double[7];
        r[0] = s;
        for (int a = 0; a < 3; a++) {
            r[1 + a] = m1[a] / s;
            r[4 + a] = m2[a] / s - sq(m1[a] / s);
        }
        return r;
    }

    @Test
    void varianceOfTheResultIsTheSumOfVariances() {
        int nx = 61;
        int ny = 53;
        int nz = 41;
        double[] s1 = {2.0, 1.5, 3.0};
        double[] s2 = {3.0, 4.0, 2.5};
        // image: a Gaussian off the image centre; kernel: a normalised Gaussian centred on its centre voxel
        Volume image = gaussian(nx, ny, nz, 29, 25, 19, s1[0], s1[1], s1[2]);
        Volume kernel = gaussian(31, 33, 25, 15, 16, 12, s2[0], s2[1], s2[2]);
        double ks = kernel.sum();
        for (int i = 0; i < kernel.size(); i++) {
            kernel.data()[i] /= (float) ks;
        }
        Volume out;
        try (Workers w = new Workers(2)) {
            out = Convolution.convolve(image, kernel, w);
        }
        double[] in = moments(image);
        double[] m = moments(out);
        for (int a = 0; a < 3; a++) {
            double expected = s1[a] * s1[a] + s2[a] * s2[a];
            // second moments within 1% (the bound); the centre does not move (kernel centred)
            assertEquals(expected, m[4 + a], 0.01 * expected, "variance along axis " + a);
            assertEquals(in[1 + a], m[1 + a], 1e-3, "mean along axis " + a);
        }
        // a normalised kernel keeps the total (the Gaussians lie well inside the image)
        assertEquals(in[0], m[0], 1e-4 * in[0], "sum");
        // and the result is the Gaussian of summed variances, with the amplitude of the product of two normal
        // densities: A = prod_a s1 / sqrt(s1^2 + s2^2) (the sampled kernel sums to its continuous integral here)
        double amp = 1;
        double[] s = new double[3];
        for (int a = 0; a < 3; a++) {
            s[a] = Math.sqrt(s1[a] * s1[a] + s2[a] * s2[a]);
            amp *= s1[a] / s[a];
        }
        Volume expected = gaussian(nx, ny, nz, 29, 25, 19, s[0], s[1], s[2]);
        for (int i = 0; i < expected.size(); i++) {
            expected.data()[i] *= (float) amp;
        }
        VolumeAssert.assertClose(expected, out, 1e-4, "Gaussian of summed variances");
    }
}
