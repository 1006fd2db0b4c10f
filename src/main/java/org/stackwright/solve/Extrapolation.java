package org.stackwright.solve;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.fft.WorkGrid;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.parallel.Workers;

/**
 * Vector extrapolation of a multiplicative Richardson-Lucy step psi (Biggs &amp; Andrews, "Acceleration of iterative
 * image restoration algorithms", Applied Optics 36(8), 1997), shared by accelerated Richardson-Lucy and accelerated
 * Richardson-Lucy-TV: Biggs &amp; Andrews apply it to any fixed-point iteration x = psi(x), and the one-step-late
 * RL-TV update (Dey et al. 2006) is one. With g_k = psi(y_k) - y_k the last step,
 * alpha_k = sum(g_k g_{k-1}) / sum(g_{k-1} g_{k-1}) and x_{k+1} = psi(y_k), the next point is
 * y_{k+1} = x_{k+1} + alpha_k (x_{k+1} - x_k).
 *
 * <p>Safeguards (Biggs &amp; Andrews sec. 3, and common practice): alpha = 0 for the first two iterations, alpha
 * clamped to [0, {@link #MAX_ALPHA}] (a negative alpha restarts), alpha reset to 0 after an iteration whose objective
 * at the extrapolated point got worse, and voxels that the extrapolation would make negative keep their value
 * x_{k+1}.
 *
 * <p>Memory: x_k (a float grid) and the last step g (16 bits per voxel, {@link #toHalf}). With the extrapolation
 * steps given ({@link #Extrapolation(DeconvolutionProblem, float[], double[])}), g is not kept.
 */
final class Extrapolation {

    /** Largest extrapolation step (Biggs &amp; Andrews keep alpha below 1). */
    static final double MAX_ALPHA = 0.95;

    private final Workers workers;
    private final float[] norm;
    private final float[] xOld;
    /** the last step, for alpha only, in 16 bits; null when the steps are given */
    private final short[] gPrev;
    /** extrapolation steps fixed beforehand (index k-1 for iteration k), or null to compute them */
    private final double[] fixedSteps;
    private final Sums sums = new Sums(4);
    private final List<Double> steps = new ArrayList<>();
    private double lastObjective = Double.POSITIVE_INFINITY;
    private double alpha;

    /**
     * @param p the problem (workers, normalisation H^T w)
     * @param start the start estimate, copied as x_0; not modified
     * @param fixedSteps alpha per iteration (index k-1 for iteration k; 0 past the end), or null to compute them;
     *     not modified
     */
    Extrapolation(DeconvolutionProblem p, float[] start, double[] fixedSteps) {
        this.workers = p.workers();
        this.norm = p.normalisation();
        this.xOld = start.clone();
        this.fixedSteps = fixedSteps == null ? null : fixedSteps.clone();
        this.gPrev = fixedSteps == null ? new short[start.length] : null;
    }

    /**
     * The step x_{k+1} = psi(y) in the grid, which holds the correction H^T( w y / (H y + b) ) on entry: the
     * multiplicative update y max(correction, 0) / d with d = H^T w, or, with a curvature, the Richardson-Lucy-TV
     * denominator max(H^T w - lambda curv, H^T w / 2) ({@link CorrectionStep#next}); then alpha for the next
     * {@link #extrapolate}.
     *
     * @param grid the work grid: the correction on entry, x_{k+1} on return
     * @param y the point that entered the iteration, not modified
     * @param curv the total variation's curvature at y, or null for Richardson-Lucy
     * @param lam the regularisation weight (unused without curvature)
     * @param objective the objective at y (alpha restarts at 0 when it got worse)
     * @return the relative change ||x_{k+1} - x_k|| / ||x_k||
     */
    double step(WorkGrid grid, float[] y, float[] curv, float lam, double objective) {
        final short[] g = gPrev;
        double[] s = sums.run(workers, y.length, (from, to, acc) -> grid.update(from, to, (a, at, index, count) -> {
            double gg = acc[0];
            double pp = acc[1];
            double dd = acc[2];
            double xx = acc[3];
            for (int j = 0; j < count; j++) {
                int i = index + j;
                float yi = y[i];
                float xn = CorrectionStep.next(yi, a[at + j], norm, curv, lam, i);
                a[at + j] = xn;
                if (g != null) {
                    float gi = xn - yi;
                    float gp = fromHalf(g[i]);
                    gg += (double) gi * gp;
                    pp += (double) gp * gp;
                    g[i] = toHalf(gi);
                }
                double diff = xn - xOld[i];
                dd += diff * diff;
                xx += (double) xOld[i] * xOld[i];
            }
            acc[0] = gg;
            acc[1] = pp;
            acc[2] = dd;
            acc[3] = xx;
        }));
        int k = steps.size() + 1;
        alpha = 0;
        if (fixedSteps != null) {
            alpha = k <= fixedSteps.length ? fixedSteps[k - 1] : 0;
        } else if (k >= 3 && s[1] > 0 && objective <= lastObjective) {
            alpha = Math.max(0, Math.min(MAX_ALPHA, s[0] / s[1]));
        }
        steps.add(alpha);
        lastObjective = objective;
        return Math.sqrt(s[2] / Math.max(s[3], 1e-300));
    }

    /**
     * y &lt;- x_{k+1} + alpha (x_{k+1} - x_k), where that is non-negative (else x_{k+1}), also left in the grid as the
     * next iteration's input; x_k &lt;- x_{k+1}.
     *
     * @param grid holds x_{k+1} from {@link #step}; holds the new y on return
     * @param y overwritten with the next point
     */
    void extrapolate(WorkGrid grid, float[] y) {
        final float a = (float) alpha;
        workers.forRange(y.length, (from, to) -> grid.update(from, to, (w, at, index, count) -> {
            for (int j = 0; j < count; j++) {
                int i = index + j;
                float xn = w[at + j];
                float next = xn + a * (xn - xOld[i]);
                float yn = next >= 0 ? next : xn;
                y[i] = yn;
                w[at + j] = yn;
                xOld[i] = xn;
            }
        }));
    }

    /** @return x_{k+1} after {@link #extrapolate}: the estimate (an internal array) */
    float[] estimate() {
        return xOld;
    }

    /** @return the extrapolation step of each iteration so far (index k-1 for iteration k) */
    double[] steps() {
        return steps.stream().mapToDouble(Double::doubleValue).toArray();
    }

    /**
     * A float rounded to its upper 16 bits (sign, the float's 8-bit exponent and 7 stored mantissa bits, the
     * "bfloat16" format; round to nearest, ties to even): half the memory of a float, with a relative rounding
     * error of at most 2^-8. The previous step serves only the extrapolation's step alpha, a ratio of two sums
     * over the whole grid clamped to [0, 0.95], where these errors average out; keeping it in 16 bits brings
     * accelerated RL to 5.5 grids of floats plus the transfer function (README, Deconvolution).
     */
    static short toHalf(float f) {
        int b = Float.floatToRawIntBits(f);
        return (short) ((b + 0x7FFF + ((b >>> 16) & 1)) >>> 16);
    }

    /** @return the float a {@link #toHalf} value stands for */
    static float fromHalf(short h) {
        return Float.intBitsToFloat(h << 16);
    }
}
