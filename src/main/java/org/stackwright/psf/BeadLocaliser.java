package org.stackwright.psf;

import org.apache.commons.math3.exception.ConvergenceException;
import org.apache.commons.math3.exception.TooManyEvaluationsException;
import org.apache.commons.math3.exception.TooManyIterationsException;
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
 * Sub-voxel position of a bead: a 3D Gaussian (one lateral sigma, one axial sigma) plus a constant background is
 * fitted by least squares (commons-math3 Levenberg-Marquardt) to a window around the brightest voxel. The window
 * is sized from the FWHMs of the profiles through the peak. The fitted centre is a consistent reference point for
 * beads of one PSF even when the PSF is not Gaussian (the same shape gives the same offset).
 */
final class BeadLocaliser {

    /**
     * The fit.
     *
     * @param x centre column, voxels
     * @param y centre row
     * @param z centre plane
     * @param amplitude Gaussian height above the background
     * @param background the constant
     */
    record Fit(double x, double y, double z, double amplitude, double background) {
    }

    private BeadLocaliser() {
    }

    /**
     * @param stack the bead stack, not modified
     * @param bead a detected bead (integer position of its peak)
     * @return the fit, or null when it fails or wanders more than two voxels from the peak
     */
    static Fit fit(Volume stack, Bead bead) {
        int px = (int) bead.x();
        int py = (int) bead.y();
        int pz = (int) bead.z();
        Fwhm.Widths w = Fwhm.measureAt(stack.withVoxel(org.stackwright.volume.VoxelSize.UNIT), px, py, pz);
        double sxy = finiteOr(0.5 * (w.xUm() + w.yUm()) / Fwhm.FWHM_PER_SIGMA, 1.5);
        double sz = stack.depth() == 1 ? 1 : finiteOr(w.zUm() / Fwhm.FWHM_PER_SIGMA, 2);
        int rx = clamp((int) Math.ceil(1.5 * sxy) + 1, 2, 8);
        int rz = stack.depth() == 1 ? 0 : clamp((int) Math.ceil(1.5 * sz) + 1, 2, 8);
        int x0 = Math.max(0, px - rx);
        int x1 = Math.min(stack.width() - 1, px + rx);
        int y0 = Math.max(0, py - rx);
        int y1 = Math.min(stack.height() - 1, py + rx);
        int z0 = Math.max(0, pz - rz);
        int z1 = Math.min(stack.depth() - 1, pz + rz);
        int wx = x1 - x0 + 1;
        int wy = y1 - y0 + 1;
        int wz = z1 - z0 + 1;
        int n = wx * wy * wz;
        double[] target = new double[n];
        double low = Double.MAX_VALUE;
        for (int z = z0, i = 0; z <= z1; z++) {
            for (int y = y0; y <= y1; y++) {
                for (int x = x0; x <= x1; x++, i++) {
                    target[i] = stack.get(x, y, z);
                    low = Math.min(low, target[i]);
                }
            }
        }
        MultivariateJacobianFunction model = p -> {
            double a = p.getEntry(0);
            double cx = p.getEntry(1);
            double cy = p.getEntry(2);
            double cz = p.getEntry(3);
            double s = p.getEntry(4);
            double t = p.getEntry(5);
            double b = p.getEntry(6);
            RealVector value = new ArrayRealVector(n);
            double[][] jac = new double[n][7];
            int i = 0;
            for (int z = z0; z <= z1; z++) {
                double dz = (z - cz) / t;
                for (int y = y0; y <= y1; y++) {
                    double dy = (y - cy) / s;
                    for (int x = x0; x <= x1; x++, i++) {
                        double dx = (x - cx) / s;
                        double e = Math.exp(-0.5 * (dx * dx + dy * dy + dz * dz));
                        value.setEntry(i, a * e + b);
                        jac[i][0] = e;
                        jac[i][1] = a * e * dx / s;
                        jac[i][2] = a * e * dy / s;
                        jac[i][3] = a * e * dz / t;
                        jac[i][4] = a * e * (dx * dx + dy * dy) / s;
                        jac[i][5] = a * e * dz * dz / t;
                        jac[i][6] = 1;
                    }
                }
            }
            return new Pair<>(value, new Array2DRowRealMatrix(jac, false));
        };
        double[] start = {stack.get(px, py, pz) - low, px, py, pz, sxy, sz, low};
        RealVector p;
        try {
            LeastSquaresOptimizer.Optimum opt = new LevenbergMarquardtOptimizer().optimize(new LeastSquaresBuilder()
                    .model(model).target(target).start(start).maxEvaluations(500).maxIterations(500).build());
            p = opt.getPoint();
        } catch (TooManyEvaluationsException | TooManyIterationsException | ConvergenceException e) {
            return null;
        }
        double fx = p.getEntry(1);
        double fy = p.getEntry(2);
        double fz = stack.depth() == 1 ? 0 : p.getEntry(3);
        if (!(p.getEntry(0) > 0) || Math.abs(fx - px) > 2 || Math.abs(fy - py) > 2 || Math.abs(fz - pz) > 2) {
            return null;
        }
        return new Fit(fx, fy, fz, p.getEntry(0), p.getEntry(6));
    }

    private static double finiteOr(double v, double fallback) {
        return Double.isFinite(v) && v > 0.3 ? v : fallback;
    }

    private static int clamp(int v, int lo, int hi) {
        return Math.max(lo, Math.min(hi, v));
    }
}
