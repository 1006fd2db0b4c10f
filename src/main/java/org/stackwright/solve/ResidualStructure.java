package org.stackwright.solve;

import org.stackwright.model.DeconvolutionProblem;

/**
 * How much of the misfit of an estimate is spatially structured: it tells a wrong model (a cropped or wrong PSF, a
 * wrong background: their misfit is blurred light, smooth across neighbouring pixels) from a wrong noise model
 * (camera values estimated a little off; pixel-to-pixel differences of gain, offset or read noise in an sCMOS
 * camera: each pixel's own, independent of its neighbours'). Both raise the data fit above what noise explains;
 * only the first is an error of the blur that the generalized discrepancy principle can take as model error.
 *
 * <p>The normalised residuals r = (y - m) / sqrt(m), m = H x + b in photo-electrons (the shifted-Poisson standard
 * deviation), have mean square q = 1 when the model and the noise model are right. The mean product c of r over
 * pairs of lateral neighbours (x and y; not z, where a camera's fixed pattern repeats from plane to plane) is 0 for
 * errors independent from pixel to pixel and about the variance of a smooth misfit, so c / (q - 1) is the share of
 * the excess that is spatially structured (a lag-one autocorrelation test of residuals, as Durbin &amp; Watson,
 * "Testing for serial correlation in least squares regression", Biometrika 37, 1950, applied across pixels).
 */
final class ResidualStructure {

    private ResidualStructure() {
    }

    /**
     * Costs one blur and three grid-sized arrays.
     *
     * @param p the problem (its trusted pixels: a trial's held-out pixels are left out), not modified
     * @param x grid-sized estimate, not modified
     * @return {q: mean squared normalised residual over trusted pixels, c: mean product over pairs of trusted
     *     lateral neighbours}
     */
    static double[] of(DeconvolutionProblem p, float[] x) {
        float[] pos = new float[x.length];
        for (int i = 0; i < x.length; i++) {
            pos[i] = Math.max(x[i], 0f);
        }
        float[] mu = new float[x.length];
        p.forward().apply(pos, mu);
        float[] y = p.dataOnGrid();
        double b = p.background();
        double floor = p.modelFloor();
        int nx = p.gridWidth();
        int ny = p.gridHeight();
        int w = p.imageWidth();
        int h = p.imageHeight();
        int d = p.imageDepth();
        // normalised residual in place of the model; NaN where a pixel carries no likelihood
        for (int z = 0; z < d; z++) {
            for (int yy = 0; yy < h; yy++) {
                int row = (z * ny + yy) * nx;
                for (int i = row; i < row + w; i++) {
                    double m = Math.max(mu[i] + b, floor);
                    mu[i] = y[i] < 0 ? Float.NaN : (float) ((y[i] - m) / Math.sqrt(m));
                }
            }
        }
        double[] sums = new double[4];
        for (int z = 0; z < d; z++) {
            for (int yy = 0; yy < h; yy++) {
                int row = (z * ny + yy) * nx;
                for (int xx = 0; xx < w; xx++) {
                    float r = mu[row + xx];
                    if (Float.isNaN(r)) {
                        continue;
                    }
                    sums[0] += r * r;
                    sums[1]++;
                    if (xx + 1 < w && !Float.isNaN(mu[row + xx + 1])) {
                        sums[2] += r * mu[row + xx + 1];
                        sums[3]++;
                    }
                    if (yy + 1 < h && !Float.isNaN(mu[row + nx + xx])) {
                        sums[2] += r * mu[row + nx + xx];
                        sums[3]++;
                    }
                }
            }
        }
        return new double[] {sums[0] / Math.max(1, sums[1]), sums[2] / Math.max(1, sums[3])};
    }
}
