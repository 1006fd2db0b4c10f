package org.stackwright.solve;

import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * What the kept posterior states say per voxel: the mean, the standard deviation and the equal-tailed credible
 * interval that holds a chosen share of the states (quantiles (1 - level) / 2 and (1 + level) / 2, interpolated
 * between order statistics as numpy's default "linear" method: Hyndman &amp; Fan, "Sample quantiles in statistical
 * packages", The American Statistician 50(4), 1996, definition 7), plus the convergence diagnostics of
 * {@link ChainDiagnostics} over a fixed set of tracked voxels.
 *
 * @param mean posterior mean, ADU above the offset
 * @param spread posterior standard deviation, ADU
 * @param lower lower end of the interval, ADU
 * @param upper upper end of the interval, ADU
 * @param level the share of states the interval holds
 * @param essMedian median effective sample size over the tracked voxels
 * @param essMinimum smallest effective sample size over the tracked voxels
 * @param rhatMedian median split R-hat over the tracked voxels
 * @param rhatHigh 95th percentile of the split R-hat over the tracked voxels (the convergence flag uses it: with
 *     many voxels and few draws the largest value is mostly sampling noise)
 * @param rhatMaximum largest split R-hat over the tracked voxels
 * @param tracked number of tracked voxels
 */
public record PosteriorSummary(Volume mean, Volume spread, Volume lower, Volume upper, double level, double essMedian,
        double essMinimum, double rhatMedian, double rhatHigh, double rhatMaximum, int tracked) {

    /** Voxels whose chains are checked for convergence and efficiency (evenly spaced over the image). */
    static final int TRACKED = 1000;

    /**
     * @param draws the kept states, not modified
     * @param like a volume with the image's shape and voxel size (not modified; its data are not read)
     * @param level share of states inside the interval, in (0, 1)
     * @param workers the threads (not closed here)
     */
    public static PosteriorSummary of(PosteriorSampler.Draws draws, Volume like, double level, Workers workers) {
        if (!(level > 0 && level < 1)) {
            throw new IllegalArgumentException("level = " + level + " is not allowed; give a share between 0 and 1, e.g. 0.9");
        }
        float[][] st = draws.states();
        int k = st.length;
        int n = like.size();
        float[] mean = new float[n];
        float[] sd = new float[n];
        float[] lo = new float[n];
        float[] hi = new float[n];
        double pLo = (1 - level) / 2;
        double pHi = (1 + level) / 2;
        workers.forRange(n, (from, to) -> {
            double[] v = new double[k];
            for (int i = from; i < to; i++) {
                double s = 0;
                for (int j = 0; j < k; j++) {
                    v[j] = st[j][i];
                    s += v[j];
                }
                double m = s / k;
                double ss = 0;
                for (int j = 0; j < k; j++) {
                    ss += (v[j] - m) * (v[j] - m);
                }
                mean[i] = (float) m;
                sd[i] = (float) Math.sqrt(ss / (k - 1));
                Arrays.sort(v);
                lo[i] = (float) quantile(v, pLo);
                hi[i] = (float) quantile(v, pHi);
            }
        });
        int tracked = Math.min(TRACKED, n);
        double[] rhat = new double[tracked];
        double[] ess = new double[tracked];
        int valid = 0;
        for (int t = 0; t < tracked; t++) {
            int voxel = (int) ((long) n * t / tracked + n / (2L * tracked));
            double[][] chains = new double[draws.chains()][draws.perChain()];
            for (int c = 0; c < draws.chains(); c++) {
                for (int j = 0; j < draws.perChain(); j++) {
                    chains[c][j] = st[c * draws.perChain() + j][voxel];
                }
            }
            if (draws.perChain() >= 4) {
                ChainDiagnostics.Scalar d = ChainDiagnostics.of(chains);
                if (!Double.isNaN(d.rhat())) {
                    rhat[valid] = d.rhat();
                    ess[valid] = d.ess();
                    valid++;
                }
            }
        }
        double[] r = Arrays.copyOf(rhat, valid);
        double[] e = Arrays.copyOf(ess, valid);
        Arrays.sort(r);
        Arrays.sort(e);
        return new PosteriorSummary(like.withData(mean), like.withData(sd), like.withData(lo), like.withData(hi), level,
                valid > 0 ? quantile(e, 0.5) : Double.NaN, valid > 0 ? e[0] : Double.NaN,
                valid > 0 ? quantile(r, 0.5) : Double.NaN, valid > 0 ? quantile(r, 0.95) : Double.NaN,
                valid > 0 ? r[valid - 1] : Double.NaN, valid);
    }

    /** @return the p-quantile of sorted values, Hyndman and Fan definition 7 */
    static double quantile(double[] sorted, double p) {
        double h = (sorted.length - 1) * p;
        int lo = (int) Math.floor(h);
        int hi = Math.min(lo + 1, sorted.length - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }

    /** @return the interval width upper - lower, ADU */
    public Volume width() {
        float[] a = upper.data();
        float[] b = lower.data();
        float[] w = new float[a.length];
        for (int i = 0; i < w.length; i++) {
            w[i] = a[i] - b[i];
        }
        return upper.withData(w);
    }

    /** @return the diagnostics for the run record */
    public Map<String, Object> record() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("level", level);
        m.put("tracked_voxels", tracked);
        m.put("ess_median", essMedian);
        m.put("ess_minimum", essMinimum);
        m.put("rhat_median", rhatMedian);
        m.put("rhat_95th_percentile", rhatHigh);
        m.put("rhat_maximum", rhatMaximum);
        m.put("converged", rhatHigh < 1.1);
        return m;
    }
}
