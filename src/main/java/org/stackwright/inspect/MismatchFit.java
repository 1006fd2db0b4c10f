package org.stackwright.inspect;

import org.stackwright.volume.Volume;

/**
 * Explains the residual by the two commonest model errors, by weighted least squares on the raw residual:
 * y - mu ~ a + c_xy lap_xy(Hx) + c_z lap_z(Hx) + f t(z) Hx, weights 1 / var(mu), with t(z) = (z - zc) / (nz - 1)
 * running from -1/2 at the first slice to +1/2 at the last.
 *
 * <p>Why these terms. A background or offset set wrong by a shifts every voxel by a. A PSF of the wrong width
 * blurs by the wrong amount; for Gaussian-like PSFs, widening the blur by an extra variance delta (voxel^2) adds
 * (delta / 2) times the Laplacian of the blurred image to first order (the heat equation: d G / d(sigma^2) =
 * (1/2) lap G). So c > 0 means the data are more blurred than the prediction (the PSF is too narrow, extra
 * variance about 2c voxel^2), c < 0 means it is too wide. Lateral and axial widths are fitted apart. Bleaching
 * (or a lamp that dims) scales the signal slice by slice while the estimate holds the time average: the signal
 * changes by the fraction f from the first to the last slice (f < 0: fading). Stacks with fewer than 3 slices have
 * no axial and no fading term.
 *
 * <p>The chi^2 per voxel each model explains (the drop of the weighted sum of squares when fitted, divided by the
 * voxel count) ranks the causes. Voxels in listed residual regions (saturation, defects) are left out, so a few
 * saturated beads do not pose as a PSF error. The residual left after the full fit is returned for the per-slice
 * trend analysis.
 *
 * @param offsetShift a: how far the data lie above the prediction, ADU
 * @param curvatureXy c_xy, voxel^2 / 2
 * @param curvatureZ c_z (0 for a 2D image)
 * @param fading f: relative change of the signal from the first to the last slice
 * @param explainedByBackground chi^2 per voxel explained by a alone
 * @param explainedByPsf chi^2 per voxel explained by c_xy and c_z alone
 * @param explainedByFading chi^2 per voxel explained by f alone
 * @param explainedByBoth chi^2 per voxel explained by the full model
 * @param usedVoxels voxels that took part
 * @param unexplained normalised residual after subtracting the full fit (at every voxel, excluded ones too)
 */
public record MismatchFit(double offsetShift, double curvatureXy, double curvatureZ, double fading,
        double explainedByBackground, double explainedByPsf, double explainedByFading, double explainedByBoth,
        long usedVoxels, float[] unexplained) {

    /**
     * @param maps the residual maps
     * @param model the forward model used for them
     * @param exclude per voxel: true to leave out (listed regions); may be null
     */
    public static MismatchFit fit(ResidualMaps maps, ResidualModel model, boolean[] exclude) {
        Volume[] lap = laplacians(maps.blurred());
        return fit(maps, lap[0], lap[1], model, exclude);
    }

    /**
     * @param maps the residual maps (of a box of the image); untrusted voxels are left out
     * @param lapXy lateral Laplacian of the blurred estimate at the same voxels (see {@link #laplacians}), computed
     *     on the whole image so that voxels at the box faces use their true neighbours
     * @param lapZ axial Laplacian at the same voxels
     * @param model the forward model used for them
     * @param exclude per voxel: true to leave out (listed regions); may be null
     */
    public static MismatchFit fit(ResidualMaps maps, Volume lapXy, Volume lapZ, ResidualModel model,
            boolean[] exclude) {
        Volume p = maps.blurred();
        int w = p.width();
        int h = p.height();
        int d = p.depth();
        float[] pd = p.data();
        float[] lx = lapXy.data();
        float[] lz = lapZ.data();
        float[] r = maps.normalised().data();
        int k = d >= 3 ? 4 : 2;
        double[][] g = new double[k][k];
        double[] b = new double[k];
        double[] u = new double[k];
        long used = 0;
        for (int i = 0; i < r.length; i++) {
            if ((exclude != null && exclude[i]) || !maps.isTrusted(i)) {
                continue;
            }
            regressors(pd, lx, lz, w * h, d, i, model, u);
            for (int a = 0; a < k; a++) {
                b[a] += u[a] * r[i];
                for (int c = 0; c < k; c++) {
                    g[a][c] += u[a] * u[c];
                }
            }
            used++;
        }
        double nTotal = Math.max(1, maps.trusted());
        double[] cBg = solve(g, b, new int[] {0});
        double[] cPsf = solve(g, b, k == 4 ? new int[] {1, 2} : new int[] {1});
        double[] cFade = k == 4 ? solve(g, b, new int[] {3}) : new double[k];
        int[] allIdx = k == 4 ? new int[] {0, 1, 2, 3} : new int[] {0, 1};
        double[] cAll = solve(g, b, allIdx);
        double eBg = explained(cBg, b) / nTotal;
        double ePsf = explained(cPsf, b) / nTotal;
        double eFade = explained(cFade, b) / nTotal;
        double eAll = explained(cAll, b) / nTotal;
        float[] left = new float[r.length];
        for (int i = 0; i < r.length; i++) {
            if (!maps.isTrusted(i)) {
                continue;
            }
            regressors(pd, lx, lz, w * h, d, i, model, u);
            double f = 0;
            for (int a = 0; a < k; a++) {
                f += cAll[a] * u[a];
            }
            left[i] = (float) (r[i] - f);
        }
        return new MismatchFit(cAll[0], cAll[1], k == 4 ? cAll[2] : 0, k == 4 ? cAll[3] : 0, eBg, ePsf, eFade, eAll,
                used, left);
    }

    /**
     * The lateral and axial Laplacians of a blurred estimate, with neighbours clamped at the faces (zero flux,
     * like a mirror continuation).
     *
     * @param p the blurred estimate, not modified
     * @return {lap_xy, lap_z}; lap_z is 0 for fewer than 3 planes
     */
    public static Volume[] laplacians(Volume p) {
        int w = p.width();
        int h = p.height();
        int d = p.depth();
        float[] v = p.data();
        float[] lx = new float[v.length];
        float[] lz = new float[v.length];
        int pl = w * h;
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    int i = (z * h + y) * w + x;
                    double c = v[i];
                    double xm = v[i - (x > 0 ? 1 : 0)];
                    double xp = v[i + (x < w - 1 ? 1 : 0)];
                    double ym = v[i - (y > 0 ? w : 0)];
                    double yp = v[i + (y < h - 1 ? w : 0)];
                    lx[i] = (float) (xm + xp + ym + yp - 4 * c);
                    if (d >= 3) {
                        double zm = v[i - (z > 0 ? pl : 0)];
                        double zp = v[i + (z < d - 1 ? pl : 0)];
                        lz[i] = (float) (zm + zp - 2 * c);
                    }
                }
            }
        }
        return new Volume[] {p.withData(lx), p.withData(lz)};
    }

    /** The regressors divided by the noise standard deviation: 1/s, lap_xy(p)/s, lap_z(p)/s, t(z) p / s. */
    private static void regressors(float[] p, float[] lx, float[] lz, int plane, int d, int i, ResidualModel m,
            double[] u) {
        double c = p[i];
        double s = Math.sqrt(m.noise().variance(m.background() + c));
        u[0] = 1 / s;
        u[1] = lx[i] / s;
        if (u.length > 2) {
            int z = i / plane;
            u[2] = lz[i] / s;
            u[3] = (z - 0.5 * (d - 1)) / (d - 1) * c / s;
        }
    }

    /**
     * Solves the normal equations restricted to the given regressors (others get 0). Regressors with no weight
     * (all zero, e.g. a flat image's Laplacian) are dropped.
     */
    static double[] solve(double[][] g, double[] b, int[] idx) {
        int m = idx.length;
        double[][] a = new double[m][m + 1];
        for (int i = 0; i < m; i++) {
            for (int j = 0; j < m; j++) {
                a[i][j] = g[idx[i]][idx[j]];
            }
            a[i][m] = b[idx[i]];
        }
        double[] x = new double[m];
        boolean[] live = new boolean[m];
        for (int i = 0; i < m; i++) {
            live[i] = a[i][i] > 1e-300;
        }
        // Gaussian elimination with the dropped rows left out
        for (int c = 0; c < m; c++) {
            if (!live[c]) {
                continue;
            }
            int piv = c;
            double pv = a[c][c];
            if (Math.abs(pv) < 1e-12 * Math.abs(g[idx[c]][idx[c]]) || pv == 0) {
                live[c] = false;
                continue;
            }
            for (int r = c + 1; r < m; r++) {
                if (!live[r]) {
                    continue;
                }
                double f = a[r][c] / pv;
                for (int j = c; j <= m; j++) {
                    a[r][j] -= f * a[piv][j];
                }
            }
        }
        for (int i = m - 1; i >= 0; i--) {
            if (!live[i]) {
                continue;
            }
            double s = a[i][m];
            for (int j = i + 1; j < m; j++) {
                if (live[j]) {
                    s -= a[i][j] * x[j];
                }
            }
            x[i] = s / a[i][i];
        }
        double[] out = new double[g.length];
        for (int i = 0; i < m; i++) {
            out[idx[i]] = x[i];
        }
        return out;
    }

    /** @return the drop of the weighted sum of squares for coefficients solving the normal equations: c . b */
    private static double explained(double[] c, double[] b) {
        double s = 0;
        for (int i = 0; i < c.length; i++) {
            s += c[i] * b[i];
        }
        return Math.max(0, s);
    }

    /**
     * @param factor (nz - 1) of the whole stack over (nz - 1) of the slices fitted
     * @return the same fit with the fading extrapolated linearly from the fitted slices to the whole stack
     */
    public MismatchFit withFadingOver(double factor) {
        return new MismatchFit(offsetShift, curvatureXy, curvatureZ, fading * factor, explainedByBackground,
                explainedByPsf, explainedByFading, explainedByBoth, usedVoxels, unexplained);
    }

    /** @return extra lateral blur variance the data show over the prediction, voxel^2 (2 c_xy) */
    public double extraVarianceXy() {
        return 2 * curvatureXy;
    }

    /**
     * The fitted size of a PSF-width mismatch as a ratio of widths: the data look as if blurred by the PSF and an
     * extra Gaussian of variance delta (negative: less blurred), so, for a PSF of Gaussian-equivalent variance s2
     * along that axis, the data's width over the PSF's is sqrt(1 + delta / s2). First order (the heat-equation
     * term of the fit), so it understates large mismatches somewhat.
     *
     * @param delta extra blur variance, voxel^2
     * @param s2 Gaussian-equivalent variance of the PSF along the axis, voxel^2 (FWHM / 2.3548, squared)
     * @return the ratio; NaN when s2 is not positive or the ratio would fall below 0.5 (a first-order fit cannot
     *     size so large a mismatch)
     */
    public static double widthRatio(double delta, double s2) {
        if (!(s2 > 0) || !Double.isFinite(delta) || 1 + delta / s2 < 0.25) {
            return Double.NaN;
        }
        return Math.sqrt(1 + delta / s2);
    }

    /** @return extra axial blur variance, voxel^2 (2 c_z) */
    public double extraVarianceZ() {
        return 2 * curvatureZ;
    }
}
