package org.stackwright.psf;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.SingularValueDecomposition_F64;

/**
 * Standard errors and identifiability of fitted optical parameters from the Fisher information of all fitted
 * parameters (the optics first, then the nuisance parameters such as each bead's position, brightness and
 * background). The covariance of the maximum-likelihood estimate is approximated by the inverse Fisher matrix
 * (the Cramer-Rao bound; Kay, Fundamentals of Statistical Signal Processing: Estimation Theory, 1993, ch. 3 and
 * 7), so the errors of the optics include what the nuisance parameters cost.
 *
 * <p>Identifiability is judged on the optics' block of the covariance: a parameter with (almost) no information
 * does not change the data; two parameters whose estimates correlate beyond {@link #TRADE_OFF} trade off against
 * each other (the data constrain a combination, not each); a parameter whose standard error exceeds a quarter of
 * its search range is barely constrained. The thresholds are common practice, no source.
 */
public final class FisherSummary {

    /** Absolute correlation above which two parameters are reported as trading off. */
    static final double TRADE_OFF = 0.95;

    private final List<OpticsParameter> free;
    private final double[] standardErrors;
    private final double[][] correlation;
    private final double conditionNumber;
    private final boolean[] identifiable;
    private final List<String> notes = new ArrayList<>();

    /**
     * @param fisher the Fisher information, (G + nuisance) square, optics first; not modified
     * @param free the G optical parameters
     * @param bounds their search ranges
     * @param estimate their fitted values
     */
    public FisherSummary(double[][] fisher, List<OpticsParameter> free, double[][] bounds, double[] estimate) {
        this.free = List.copyOf(free);
        int g = free.size();
        int n = fisher.length;
        identifiable = new boolean[g];
        standardErrors = new double[g];
        correlation = new double[g][g];
        // a parameter whose information is nil relative to its scale changes nothing: leave it out of the inverse
        boolean[] keep = new boolean[n];
        for (int i = 0; i < n; i++) {
            double scale = i < g ? free.get(i).scale() : 1;
            keep[i] = fisher[i][i] * scale * scale > 1e-6 || i >= g;
        }
        int m = 0;
        int[] index = new int[n];
        for (int i = 0; i < n; i++) {
            index[i] = keep[i] ? m++ : -1;
        }
        DMatrixRMaj f = new DMatrixRMaj(m, m);
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < n; j++) {
                if (keep[i] && keep[j]) {
                    f.set(index[i], index[j], fisher[i][j]);
                }
            }
        }
        // invert the matrix scaled to unit diagonal (the parameters' units differ by orders of magnitude), then
        // scale back
        double[] d = new double[m];
        for (int i = 0; i < m; i++) {
            d[i] = 1 / Math.sqrt(f.get(i, i));
        }
        for (int i = 0; i < m; i++) {
            for (int j = 0; j < m; j++) {
                f.set(i, j, f.get(i, j) * d[i] * d[j]);
            }
        }
        DMatrixRMaj cov = new DMatrixRMaj(m, m);
        boolean ok = CommonOps_DDRM.invert(f, cov) && !hasNaN(cov);
        for (int i = 0; i < m; i++) {
            for (int j = 0; j < m; j++) {
                cov.set(i, j, cov.get(i, j) * d[i] * d[j]);
            }
        }
        for (int a = 0; a < g; a++) {
            OpticsParameter p = free.get(a);
            if (!keep[a] || !ok) {
                standardErrors[a] = Double.POSITIVE_INFINITY;
                notes.add(p.key() + " does not change the expected data (no information)"
                        + (p == OpticsParameter.COVERSLIP_THICKNESS ? ": with coverslip-index equal to immersion-index "
                        + "the coverslip thickness has no effect on the PSF" : "") + "; leave it out of --fit");
                continue;
            }
            standardErrors[a] = Math.sqrt(Math.max(0, cov.get(index[a], index[a])));
            identifiable[a] = true;
        }
        for (int a = 0; a < g; a++) {
            for (int b = 0; b < g; b++) {
                correlation[a][b] = a == b ? 1 : (identifiable[a] && identifiable[b]
                        ? cov.get(index[a], index[b]) / (standardErrors[a] * standardErrors[b]) : Double.NaN);
            }
        }
        for (int a = 0; a < g; a++) {
            for (int b = a + 1; b < g; b++) {
                double c = correlation[a][b];
                if (Math.abs(c) > TRADE_OFF) {
                    identifiable[a] = false;
                    identifiable[b] = false;
                    notes.add(String.format(Locale.ROOT, "%s and %s trade off against each other (correlation %.3f): "
                            + "the data fix a combination of them, not each one, so neither fitted value can be trusted; "
                            + "fit one and give the other from the objective's specification or the sample",
                            free.get(a).key(), free.get(b).key(), c));
                }
            }
        }
        for (int a = 0; a < g; a++) {
            double range = bounds[a][1] - bounds[a][0];
            if (identifiable[a] && standardErrors[a] > 0.25 * range) {
                identifiable[a] = false;
                notes.add(String.format(Locale.ROOT, "%s is barely constrained by the data (standard error %.3g over a "
                        + "search range of %.3g)", free.get(a).key(), standardErrors[a], range));
            }
            double edge = 1e-3 * range;
            if (estimate[a] <= bounds[a][0] + edge || estimate[a] >= bounds[a][1] - edge) {
                notes.add(String.format(Locale.ROOT, "%s = %.4g lies at the end of its search range [%.4g, %.4g]: the "
                        + "best value may lie outside it; check the nominal optics", free.get(a).key(), estimate[a],
                        bounds[a][0], bounds[a][1]));
            }
        }
        conditionNumber = condition(g);
    }

    private static boolean hasNaN(DMatrixRMaj m) {
        for (int i = 0; i < m.getNumElements(); i++) {
            if (!Double.isFinite(m.get(i))) {
                return true;
            }
        }
        return false;
    }

    /** @return the condition number of the optics' correlation matrix (1 = independent; large = trade-off) */
    private double condition(int g) {
        DMatrixRMaj c = new DMatrixRMaj(g, g);
        for (int a = 0; a < g; a++) {
            for (int b = 0; b < g; b++) {
                double v = correlation[a][b];
                if (Double.isNaN(v)) {
                    return Double.POSITIVE_INFINITY;
                }
                c.set(a, b, v);
            }
        }
        SingularValueDecomposition_F64<DMatrixRMaj> svd = DecompositionFactory_DDRM.svd(g, g, false, false, true);
        if (!svd.decompose(c)) {
            return Double.POSITIVE_INFINITY;
        }
        double[] s = svd.getSingularValues();
        double max = 0;
        double min = Double.POSITIVE_INFINITY;
        for (double v : s) {
            max = Math.max(max, v);
            min = Math.min(min, v);
        }
        return min > 0 ? max / min : Double.POSITIVE_INFINITY;
    }

    /** @return standard error per parameter (infinite when it carries no information) */
    public double[] standardErrors() {
        return standardErrors.clone();
    }

    /** @return whether each parameter is determined by the data on its own */
    public boolean[] identifiable() {
        return identifiable.clone();
    }

    /** @return correlation matrix of the optics' estimates */
    public double[][] correlation() {
        return correlation;
    }

    /** @return plain-word notes on identifiability, empty when every parameter is determined */
    public List<String> notes() {
        return List.copyOf(notes);
    }

    /** @return correlations as a map "a/b" to value, for the record */
    public Map<String, Object> correlationRecord() {
        Map<String, Object> m = new LinkedHashMap<>();
        for (int a = 0; a < free.size(); a++) {
            for (int b = a + 1; b < free.size(); b++) {
                m.put(free.get(a).key() + "/" + free.get(b).key(), correlation[a][b]);
            }
        }
        return m;
    }

    /** @return condition number of the correlation matrix */
    public double conditionNumber() {
        return conditionNumber;
    }
}
