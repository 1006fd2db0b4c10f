package org.stackwright.psf;

import org.apache.commons.math3.exception.MathIllegalStateException;
import org.apache.commons.math3.fitting.leastsquares.LeastSquaresBuilder;
import org.apache.commons.math3.fitting.leastsquares.LeastSquaresOptimizer;
import org.apache.commons.math3.fitting.leastsquares.LevenbergMarquardtOptimizer;
import org.apache.commons.math3.fitting.leastsquares.MultivariateJacobianFunction;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.util.Pair;
import org.stackwright.volume.Volume;

/**
 * Full width at half maximum of a PSF or a bead in x, y and z: the 1D profiles through the brightest voxel are
 * each fitted with a Gaussian plus a constant (commons-math3 Levenberg-Marquardt) and the width is
 * 2 sqrt(2 ln 2) sigma. The fit uses the main lobe only (out to the first minimum of the lightly smoothed
 * profile below half the peak), so the side lobes of a widefield PSF do not widen it. A Gaussian fitted to an
 * Airy main lobe gives its FWHM within about 2 %. If the fit fails to converge, the distance between the
 * linearly interpolated half-maximum crossings is given instead.
 */
public final class Fwhm {

    /** 2 sqrt(2 ln 2): FWHM / sigma of a Gaussian. */
    public static final double FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.log(2));

    /**
     * The widths and where they were measured.
     *
     * @param xUm FWHM in x, micrometres (NaN when the profile is too short to fit)
     * @param yUm FWHM in y
     * @param zUm FWHM in z (NaN for a single plane)
     * @param x column of the brightest voxel
     * @param y row of the brightest voxel
     * @param z plane of the brightest voxel
     */
    public record Widths(double xUm, double yUm, double zUm, int x, int y, int z) {

        /**
         * @return "FWHM x 0.2252 um, y 0.2252 um, z 0.7591 um"; a width that could not be measured (z of a single
         *     plane, a profile too short to fit) reads "not measured" instead of NaN
         */
        public String text() {
            return "FWHM x " + um(xUm) + ", y " + um(yUm) + ", z " + um(zUm);
        }

        private static String um(double v) {
            return Double.isFinite(v) ? String.format(java.util.Locale.ROOT, "%.4f um", v) : "not measured";
        }
    }

    private Fwhm() {
    }

    /** Measures around the brightest voxel of the volume (not modified). */
    public static Widths measure(Volume v) {
        int m = v.argMax();
        int x = m % v.width();
        int y = (m / v.width()) % v.height();
        int z = m / (v.width() * v.height());
        return measureAt(v, x, y, z);
    }

    /** Measures the profiles through voxel (x, y, z) of the volume (not modified). */
    public static Widths measureAt(Volume v, int x, int y, int z) {
        double[] px = new double[v.width()];
        double[] py = new double[v.height()];
        double[] pz = new double[v.depth()];
        for (int i = 0; i < px.length; i++) {
            px[i] = v.get(i, y, z);
        }
        for (int i = 0; i < py.length; i++) {
            py[i] = v.get(x, i, z);
        }
        for (int i = 0; i < pz.length; i++) {
            pz[i] = v.get(x, y, i);
        }
        return new Widths(width(px, x) * v.voxel().x(), width(py, y) * v.voxel().y(), width(pz, z) * v.voxel().z(),
                x, y, z);
    }

    /**
     * @param p profile, not modified
     * @param peak index of its maximum
     * @return FWHM in samples of the Gaussian fitted to the main lobe, NaN when fewer than 4 samples are usable
     */
    public static double width(double[] p, int peak) {
        if (p.length < 4) {
            return Double.NaN;
        }
        double[] smooth = new double[p.length];
        for (int i = 0; i < p.length; i++) {
            double s = 0;
            int n = 0;
            for (int k = Math.max(0, i - 1); k <= Math.min(p.length - 1, i + 1); k++) {
                s += p[k];
                n++;
            }
            smooth[i] = s / n;
        }
        double low = Double.MAX_VALUE;
        for (double d : p) {
            low = Math.min(low, d);
        }
        double half = low + 0.5 * (p[peak] - low);
        int hi = lobeEnd(smooth, peak, 1, half);
        int lo = lobeEnd(smooth, peak, -1, half);
        if (hi - lo + 1 < 4) {
            lo = Math.max(0, peak - 2);
            hi = Math.min(p.length - 1, peak + 2);
            if (hi - lo + 1 < 4) {
                return Double.NaN;
            }
        }
        try {
            return FWHM_PER_SIGMA * fitSigma(p, lo, hi, peak, low);
        } catch (MathIllegalStateException e) {
            return crossingWidth(p, peak, half);
        }
    }

    /** Fallback when the fit fails: distance between the half-maximum crossings, linearly interpolated. */
    static double crossingWidth(double[] p, int peak, double half) {
        double right = Double.NaN;
        for (int i = peak + 1; i < p.length; i++) {
            if (p[i] < half) {
                right = i - 1 + (p[i - 1] - half) / (p[i - 1] - p[i]);
                break;
            }
        }
        double left = Double.NaN;
        for (int i = peak - 1; i >= 0; i--) {
            if (p[i] < half) {
                left = i + 1 - (p[i + 1] - half) / (p[i + 1] - p[i]);
                break;
            }
        }
        return right - left;
    }

    /** @return the last index of the main lobe going in direction dir from the peak */
    private static int lobeEnd(double[] s, int peak, int dir, double half) {
        int i = peak;
        while (i + dir >= 0 && i + dir < s.length) {
            int next = i + dir;
            if (s[i] < half && s[next] > s[i]) {
                break;
            }
            i = next;
        }
        return i;
    }

    /** Gaussian plus constant fitted to p[lo..hi], started from moments; returns sigma in samples. */
    private static double fitSigma(double[] p, int lo, int hi, int peak, double low) {
        double amp = p[peak] - low;
        double m2 = 0;
        double w = 0;
        for (int i = lo; i <= hi; i++) {
            double f = Math.max(0, p[i] - low);
            m2 += f * (i - peak) * (i - peak);
            w += f;
        }
        double sigma0 = Math.max(0.5, Math.sqrt(m2 / Math.max(w, 1e-300)));
        return fitGaussian(p, lo, hi, amp, peak, sigma0, low);
    }

    /**
     * Least-squares fit of f(i) = b + a exp(-(i - c)^2 / (2 s^2)) to the samples p[lo..hi] (sample i at position
     * i) by commons-math3 Levenberg-Marquardt, at most 1000 iterations. The one profile fit of the project: the
     * bead widths of the residual view use it too.
     *
     * @param p profile, not modified
     * @param a start amplitude
     * @param c start centre, in samples
     * @param s start standard deviation, in samples
     * @param b start background
     * @return |s| of the fit, in samples
     * @throws MathIllegalStateException when the fit does not converge
     */
    public static double fitGaussian(double[] p, int lo, int hi, double a, double c, double s, double b) {
        int n = hi - lo + 1;
        double[] target = new double[n];
        System.arraycopy(p, lo, target, 0, n);
        MultivariateJacobianFunction model = params -> {
            double amp = params.getEntry(0);
            double mu = params.getEntry(1);
            double sg = params.getEntry(2);
            double bg = params.getEntry(3);
            RealVector value = new ArrayRealVector(n);
            double[][] jac = new double[n][4];
            for (int k = 0; k < n; k++) {
                double t = (lo + k - mu) / sg;
                double e = Math.exp(-0.5 * t * t);
                value.setEntry(k, amp * e + bg);
                jac[k][0] = e;
                jac[k][1] = amp * e * t / sg;
                jac[k][2] = amp * e * t * t / sg;
                jac[k][3] = 1;
            }
            return new Pair<>(value, new Array2DRowRealMatrix(jac, false));
        };
        LeastSquaresOptimizer.Optimum opt = new LevenbergMarquardtOptimizer().optimize(new LeastSquaresBuilder()
                .model(model).target(target).start(new double[] {a, c, s, b})
                .maxEvaluations(1000).maxIterations(1000).build());
        return Math.abs(opt.getPoint().getEntry(2));
    }
}
