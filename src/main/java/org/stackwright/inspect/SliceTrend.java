package org.stackwright.inspect;

/**
 * A straight-line trend over z of a per-slice statistic, fitted by weighted least squares: value_z ~ a + s z.
 * Used on the per-slice mean (bleaching: the data fall below a prediction made from a time-averaged estimate) and
 * on the per-slice chi^2 (drift or focus change: the misfit grows over the acquisition).
 *
 * @param slope s, per slice
 * @param change s (nz - 1): the trend's change from the first to the last slice
 * @param t slope over its standard error (from the given per-slice standard errors)
 * @param first fitted value at the first slice
 * @param last fitted value at the last slice
 */
public record SliceTrend(double slope, double change, double t, double first, double last) {

    /**
     * @param values per-slice values, at least 3
     * @param standardErrors per-slice standard errors, positive
     * @return the trend, or null with fewer than 3 slices
     */
    public static SliceTrend fit(double[] values, double[] standardErrors) {
        int n = values.length;
        if (n < 3) {
            return null;
        }
        double sw = 0;
        double sz = 0;
        double sv = 0;
        double szz = 0;
        double szv = 0;
        for (int z = 0; z < n; z++) {
            double w = 1 / (standardErrors[z] * standardErrors[z]);
            sw += w;
            sz += w * z;
            sv += w * values[z];
            szz += w * z * z;
            szv += w * z * values[z];
        }
        double det = sw * szz - sz * sz;
        double slope = (sw * szv - sz * sv) / det;
        double a = (sv - slope * sz) / sw;
        double se = Math.sqrt(sw / det);
        return new SliceTrend(slope, slope * (n - 1), slope / se, a, a + slope * (n - 1));
    }
}
