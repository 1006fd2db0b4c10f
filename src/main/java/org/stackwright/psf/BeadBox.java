package org.stackwright.psf;

import org.apache.commons.math3.fitting.leastsquares.LeastSquaresBuilder;
import org.apache.commons.math3.fitting.leastsquares.LeastSquaresOptimizer;
import org.apache.commons.math3.fitting.leastsquares.LeastSquaresProblem;
import org.apache.commons.math3.fitting.leastsquares.LevenbergMarquardtOptimizer;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.util.Pair;
import org.stackwright.model.Camera;
import org.stackwright.model.PoissonNoise;
import org.stackwright.volume.Volume;

/**
 * One bead's box of data and its own five parameters: centre x, y, z (stack voxels; z at the paraxial focus, see
 * {@link FocusTable}), brightness (photo-electrons per plane) and background (photo-electrons per voxel). The data are held
 * in shifted-Poisson units (Snyder, Hammoud &amp; White, JOSA A 10(5), 1993): y = (adu - offset) / gain + s with
 * s = (read noise / gain)^2, modelled as Poisson(m), m = background + brightness * P + s.
 *
 * <p>{@link #fit} maximises the Poisson likelihood over the five parameters for fixed optics with the
 * Levenberg-Marquardt optimiser of commons-math3 on deviance residuals sign(y - m) sqrt(2 d), d = y ln(y/m) - y + m:
 * their sum of squares is twice the negative log-likelihood up to a constant, so the least-squares minimum is
 * the maximum-likelihood estimate (McCullagh &amp; Nelder, Generalized Linear Models, 2nd ed., 1989, sec. 2.4.3).
 * Not safe for two threads at once (owns its parameters and buffers).
 */
final class BeadBox {

    static final int X = 0;
    static final int Y = 1;
    static final int Z = 2;
    static final int BRIGHTNESS = 3;
    static final int BACKGROUND = 4;
    static final int PARAMS = 5;

    private static final PoissonNoise POISSON = new PoissonNoise();

    final int id;
    final int ox;
    final int oy;
    final int oz;
    final int nx;
    final int ny;
    final int nz;
    private final double[] y;
    private final double shift;
    private final double[] p = new double[PARAMS];
    private final double[] model;
    private final double[] unit;
    private final double[][] grad;
    private double deviance = Double.NaN;

    /**
     * Cuts the box around a bead and sets start values: centre at the found peak, background the median of the
     * box faces, brightness from the summed light above it.
     *
     * @param stack camera data (ADU), not modified
     * @param bead the found bead
     * @param hx half width of the box, voxels
     * @param hy half height
     * @param hz half depth
     * @param camera offset, gain, read noise (its full scale is not used)
     */
    BeadBox(Volume stack, Bead bead, int hx, int hy, int hz, Camera camera) {
        this.id = bead.id();
        int bx = (int) Math.round(bead.x());
        int by = (int) Math.round(bead.y());
        int bz = (int) Math.round(bead.z());
        this.ox = Math.max(0, bx - hx);
        this.oy = Math.max(0, by - hy);
        this.oz = Math.max(0, bz - hz);
        this.nx = Math.min(stack.width(), bx + hx + 1) - ox;
        this.ny = Math.min(stack.height(), by + hy + 1) - oy;
        this.nz = Math.min(stack.depth(), bz + hz + 1) - oz;
        int n = nx * ny * nz;
        this.y = new double[n];
        this.shift = camera.readNoiseShift();
        for (int z = 0; z < nz; z++) {
            for (int yy = 0; yy < ny; yy++) {
                for (int x = 0; x < nx; x++) {
                    double adu = stack.get(ox + x, oy + yy, oz + z);
                    y[(z * ny + yy) * nx + x] = Math.max(0, (adu - camera.offset()) / camera.gain() + shift);
                }
            }
        }
        this.model = new double[n];
        this.unit = new double[n];
        this.grad = new double[3][n];
        double bg = faceMedian() - shift;
        double light = 0;
        for (double v : y) {
            light += v - shift - bg;
        }
        p[X] = bx;
        p[Y] = by;
        p[Z] = bz;
        p[BACKGROUND] = Math.max(bg, 0);
        // a plane carries the brightness when the bead is in focus; the box holds about its planes' share
        p[BRIGHTNESS] = Math.max(light / Math.max(1, nz), 1);
    }

    /** @return the median of the voxels on the box faces (shifted units) */
    private double faceMedian() {
        java.util.List<Double> face = new java.util.ArrayList<>();
        for (int z = 0; z < nz; z++) {
            for (int yy = 0; yy < ny; yy++) {
                for (int x = 0; x < nx; x++) {
                    if (x == 0 || yy == 0 || z == 0 || x == nx - 1 || yy == ny - 1 || z == nz - 1) {
                        face.add(y[(z * ny + yy) * nx + x]);
                    }
                }
            }
        }
        face.sort(null);
        return face.get(face.size() / 2);
    }

    /** @return a copy of the five parameters */
    double[] parameters() {
        return p.clone();
    }

    /** Sets the five parameters (for warm starts). */
    void setParameters(double[] q) {
        System.arraycopy(q, 0, p, 0, PARAMS);
    }

    /** @return the summed deviance of the last fit */
    double deviance() {
        return deviance;
    }

    /** @return number of voxels */
    int size() {
        return y.length;
    }

    /** @return the data in shifted-Poisson units; do not modify */
    double[] data() {
        return y;
    }

    /**
     * Fits the five parameters for fixed optics, starting from the current ones.
     *
     * @param rough looser tolerances (for a coarse scan that only ranks candidate optics)
     * @return the summed deviance at the optimum (half the deviance statistic)
     */
    double fit(FocusTable table, boolean rough) {
        double[] work = new double[table.workLength()];
        LeastSquaresProblem problem = new LeastSquaresBuilder()
                .start(p.clone())
                .model(point -> residuals(table, point.toArray(), work))
                .target(new double[y.length])
                .parameterValidator(this::valid)
                .lazyEvaluation(false)
                .maxEvaluations(400)
                .maxIterations(200)
                .build();
        LeastSquaresOptimizer.Optimum best = new LevenbergMarquardtOptimizer()
                .withCostRelativeTolerance(rough ? 1e-7 : 1e-12)
                .withParameterRelativeTolerance(rough ? 1e-5 : 1e-10)
                .optimize(problem);
        double[] q = valid(best.getPoint()).toArray();
        System.arraycopy(q, 0, p, 0, PARAMS);
        deviance = deviance(table);
        return deviance;
    }

    /** Keeps the bead near its box and the brightness and background physical. */
    private RealVector valid(RealVector v) {
        return new ArrayRealVector(valid(v.toArray()), false);
    }

    /** @return a copy of the five parameters moved into their allowed ranges */
    double[] valid(double[] in) {
        double[] q = in.clone();
        q[X] = Math.max(ox - 2, Math.min(ox + nx + 1, q[X]));
        q[Y] = Math.max(oy - 2, Math.min(oy + ny + 1, q[Y]));
        q[Z] = Math.max(oz - 2, Math.min(oz + nz + 1, q[Z]));
        q[BRIGHTNESS] = Math.max(1e-6, q[BRIGHTNESS]);
        q[BACKGROUND] = Math.max(-shift, q[BACKGROUND]);
        return q;
    }

    /** @return the summed deviance of the data from the model with the current parameters */
    double deviance(FocusTable table) {
        double[] work = new double[table.workLength()];
        mean(table, p, work, false);
        double d = 0;
        for (int i = 0; i < y.length; i++) {
            d += POISSON.deviance(y[i], model[i]);
        }
        return d;
    }

    /**
     * The expected counts m (shifted units) and, when asked, the derivatives of the unit bead for the centre
     * into {@link #grad}: fills {@link #model} and {@link #unit}.
     */
    private void mean(FocusTable table, double[] q, double[] work, boolean withGrad) {
        table.render(q[X] - ox, q[Y] - oy, q[Z] - oz, nx, ny, nz, unit, withGrad ? grad : null, work);
        double base = q[BACKGROUND] + shift;
        for (int i = 0; i < y.length; i++) {
            model[i] = base + q[BRIGHTNESS] * unit[i];
        }
    }

    /**
     * The derivatives of m with respect to the five parameters at the current parameters.
     *
     * @return five arrays of {@link #size()} values (new)
     */
    double[][] jacobian(FocusTable table) {
        double[] work = new double[table.workLength()];
        mean(table, p, work, true);
        double[][] j = new double[PARAMS][y.length];
        for (int i = 0; i < y.length; i++) {
            j[X][i] = p[BRIGHTNESS] * grad[0][i];
            j[Y][i] = p[BRIGHTNESS] * grad[1][i];
            j[Z][i] = p[BRIGHTNESS] * grad[2][i];
            j[BRIGHTNESS][i] = unit[i];
            j[BACKGROUND][i] = 1;
        }
        return j;
    }

    /** @return the expected counts (shifted units) at the current parameters (new array) */
    double[] expected(FocusTable table) {
        mean(table, p, new double[table.workLength()], false);
        return model.clone();
    }

    /** Deviance residuals and their Jacobian for the optimiser. */
    private Pair<RealVector, org.apache.commons.math3.linear.RealMatrix> residuals(FocusTable table, double[] q,
            double[] work) {
        double[] v = valid(new ArrayRealVector(q, false)).toArray();
        mean(table, v, work, true);
        int n = y.length;
        double[] r = new double[n];
        double[][] jac = new double[n][PARAMS];
        for (int i = 0; i < n; i++) {
            double m = Math.max(model[i], 1e-12);
            double yi = y[i];
            double d = POISSON.deviance(yi, m);
            double ri = Math.copySign(Math.sqrt(2 * Math.max(d, 0)), yi - m);
            r[i] = ri;
            // dr/dm = (dd/dm) / r = (1 - y/m) / r; near r = 0 its limit is -1/sqrt(m)
            double drdm = Math.abs(ri) > 1e-6 ? POISSON.gradient(yi, m) / ri : -1 / Math.sqrt(m);
            jac[i][X] = drdm * v[BRIGHTNESS] * grad[0][i];
            jac[i][Y] = drdm * v[BRIGHTNESS] * grad[1][i];
            jac[i][Z] = drdm * v[BRIGHTNESS] * grad[2][i];
            jac[i][BRIGHTNESS] = drdm * unit[i];
            jac[i][BACKGROUND] = drdm;
        }
        return new Pair<>(new ArrayRealVector(r, false), new Array2DRowRealMatrix(jac, false));
    }
}
