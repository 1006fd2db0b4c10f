package org.stackwright.model;

import org.stackwright.parallel.Workers;

/**
 * Isotropic total variation TV(x) = sum_i |D x|_i with |D x|_i = sqrt(dx^2 + dy^2 + (r dz)^2): forward
 * differences along x, y and z (zero past the last voxel: Neumann boundary), and the z difference weighted by
 * r = voxel width / voxel depth so that a step counts per micrometre, not per plane (anisotropic voxels; Rudin,
 * Osher &amp; Fatemi, "Nonlinear total variation based noise removal algorithms", Physica D 60, 1992).
 *
 * <p>Gives the value, the linear map D and its adjoint D^T = -div (for primal-dual methods), and the smoothed
 * curvature div(D x / |D x|_eps) used by Richardson-Lucy with TV. All methods are parallel over z planes and do
 * not allocate.
 */
public final class TotalVariation {

    private final int nx;
    private final int ny;
    private final int nz;
    private final int plane;
    private final float r;
    private final Workers workers;

    /**
     * @param nx grid width
     * @param ny grid height
     * @param nz grid depth
     * @param zWeight r = voxel width / voxel depth
     */
    public TotalVariation(int nx, int ny, int nz, double zWeight, Workers workers) {
        this.nx = nx;
        this.ny = ny;
        this.nz = nz;
        this.plane = nx * ny;
        this.r = (float) zWeight;
        this.workers = workers;
    }

    /** @return the squared norm bound ||D||^2 <= 4 (1 + 1 + r^2) used for primal-dual step sizes */
    public double normSquaredBound() {
        double s = (nx > 1 ? 4 : 0) + (ny > 1 ? 4 : 0) + (nz > 1 ? 4 * r * r : 0);
        return Math.max(s, 1e-12);
    }

    private float dx(float[] x, int i, int ix) {
        return ix + 1 < nx ? x[i + 1] - x[i] : 0f;
    }

    private float dy(float[] x, int i, int iy) {
        return iy + 1 < ny ? x[i + nx] - x[i] : 0f;
    }

    private float dz(float[] x, int i, int iz) {
        return iz + 1 < nz ? r * (x[i + plane] - x[i]) : 0f;
    }

    /** @return TV(x); x not modified */
    public double value(float[] x) {
        return workers.sum(nz * ny, (from, to) -> {
            double s = 0;
            for (int row = from; row < to; row++) {
                int iz = row / ny;
                int iy = row % ny;
                for (int ix = 0, i = row * nx; ix < nx; ix++, i++) {
                    float a = dx(x, i, ix);
                    float b = dy(x, i, iy);
                    float c = dz(x, i, iz);
                    s += norm(a, b, c);
                }
            }
            return s;
        });
    }

    /**
     * (gx, gy, gz) = D x.
     *
     * @param x not modified
     * @param gx overwritten
     * @param gy overwritten
     * @param gz overwritten
     */
    public void gradient(float[] x, float[] gx, float[] gy, float[] gz) {
        workers.forRange(nz * ny, (from, to) -> {
            for (int row = from; row < to; row++) {
                int iz = row / ny;
                int iy = row % ny;
                for (int ix = 0, i = row * nx; ix < nx; ix++, i++) {
                    gx[i] = dx(x, i, ix);
                    gy[i] = dy(x, i, iy);
                    gz[i] = dz(x, i, iz);
                }
            }
        });
    }

    /**
     * out = D^T (px, py, pz) = -div p, the exact adjoint of {@link #gradient}.
     *
     * @param out overwritten (must not be one of the inputs)
     */
    public void adjoint(float[] px, float[] py, float[] pz, float[] out) {
        adjoint(px, py, pz, out, false);
    }

    /**
     * out (+)= D^T (px, py, pz).
     *
     * @param add true to add to out, false to overwrite it
     */
    public void adjoint(float[] px, float[] py, float[] pz, float[] out, boolean add) {
        workers.forRange(nz * ny, (from, to) -> {
            for (int row = from; row < to; row++) {
                int iz = row / ny;
                int iy = row % ny;
                for (int ix = 0, i = row * nx; ix < nx; ix++, i++) {
                    float v = 0;
                    if (ix + 1 < nx) {
                        v -= px[i];
                    }
                    if (ix > 0) {
                        v += px[i - 1];
                    }
                    if (iy + 1 < ny) {
                        v -= py[i];
                    }
                    if (iy > 0) {
                        v += py[i - nx];
                    }
                    if (iz + 1 < nz) {
                        v -= r * pz[i];
                    }
                    if (iz > 0) {
                        v += r * pz[i - plane];
                    }
                    out[i] = add ? out[i] + v : v;
                }
            }
        });
    }

    /**
     * The dual step of a primal-dual method for lambda TV: p <- projection of p + sigma D xbar onto the balls
     * |p_i| <= lambda (the proximal map of the convex conjugate of lambda |.|_{2,1}).
     *
     * @param xbar not modified
     * @param px modified
     * @param py modified
     * @param pz modified
     */
    public void dualStep(float[] xbar, float sigma, float lambda, float[] px, float[] py, float[] pz) {
        dualStepResidual(xbar, null, sigma, lambda, px, py, pz);
    }

    /**
     * {@link #dualStep} that also returns the l1 norm of the TV part of the dual residual of adaptive primal-dual
     * splitting (Goldstein, Li, Yuan, Esser &amp; Baraniuk, "Adaptive Primal-Dual Splitting Methods for Statistical
     * Learning and Image Processing", NIPS 2015): sum over components of |(p_old - p_new) / sigma + D xbar - D x|,
     * where x is the iterate that xbar = 2 x - x_previous extrapolates. {@link #dualStep} is this step without the
     * residual.
     *
     * @param xbar not modified
     * @param x not modified; null for the step alone ({@link #dualStep})
     * @return the l1 norm of the residual (0 when x is null)
     */
    public double dualStepResidual(float[] xbar, float[] x, float sigma, float lambda, float[] px, float[] py,
            float[] pz) {
        final double inv = 1.0 / sigma;
        return workers.sum(nz * ny, (from, to) -> {
            double s = 0;
            for (int row = from; row < to; row++) {
                int iz = row / ny;
                int iy = row % ny;
                for (int ix = 0, i = row * nx; ix < nx; ix++, i++) {
                    float gx = dx(xbar, i, ix);
                    float gy = dy(xbar, i, iy);
                    float gz = dz(xbar, i, iz);
                    float a = px[i] + sigma * gx;
                    float b = py[i] + sigma * gy;
                    float c = pz[i] + sigma * gz;
                    float len = (float) norm(a, b, c);
                    float f = len > lambda ? lambda / len : 1f;
                    float na = a * f;
                    float nb = b * f;
                    float nc = c * f;
                    if (x != null) {
                        s += Math.abs((px[i] - na) * inv + gx - dx(x, i, ix))
                                + Math.abs((py[i] - nb) * inv + gy - dy(x, i, iy))
                                + Math.abs((pz[i] - nc) * inv + gz - dz(x, i, iz));
                    }
                    px[i] = na;
                    py[i] = nb;
                    pz[i] = nc;
                }
            }
            return s;
        });
    }

    /**
     * out = div(D x / sqrt(|D x|^2 + eps^2)) = -D^T (D x / |D x|_eps), the curvature term whose negative is the
     * gradient of the smoothed TV.
     *
     * @param x not modified
     * @param eps smoothing, in the units of x, positive
     * @param out overwritten (must not be x)
     */
    public void curvature(float[] x, double eps, float[] out) {
        final double e2 = eps * eps;
        workers.forRange(nz * ny, (from, to) -> {
            for (int row = from; row < to; row++) {
                int iz = row / ny;
                int iy = row % ny;
                for (int ix = 0, i = row * nx; ix < nx; ix++, i++) {
                    float v = 0;
                    float a = dx(x, i, ix);
                    float b = dy(x, i, iy);
                    float c = dz(x, i, iz);
                    float inv = (float) (1 / Math.sqrt(squares(a, b, c) + e2));
                    v += (a + b + r * c) * inv;
                    if (ix > 0) {
                        v -= dx(x, i - 1, ix - 1) * invNorm(x, i - 1, ix - 1, iy, iz, e2);
                    }
                    if (iy > 0) {
                        v -= dy(x, i - nx, iy - 1) * invNorm(x, i - nx, ix, iy - 1, iz, e2);
                    }
                    if (iz > 0) {
                        v -= r * dz(x, i - plane, iz - 1) * invNorm(x, i - plane, ix, iy, iz - 1, e2);
                    }
                    out[i] = v;
                }
            }
        });
    }

    private float invNorm(float[] x, int i, int ix, int iy, int iz, double e2) {
        float a = dx(x, i, ix);
        float b = dy(x, i, iy);
        float c = dz(x, i, iz);
        return (float) (1 / Math.sqrt(squares(a, b, c) + e2));
    }

    /**
     * a^2 + b^2 + c^2 in double: in float the squares overflow once a difference passes 1.8e19 (bright data in
     * photo-electrons with a small gain), and the norm would turn infinite.
     */
    private static double squares(float a, float b, float c) {
        return (double) a * a + (double) b * b + (double) c * c;
    }

    private static double norm(float a, float b, float c) {
        return Math.sqrt(squares(a, b, c));
    }
}
