package org.stackwright.solve;

import org.stackwright.fft.WorkGrid;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.model.OperatorWork;

/**
 * The part of an iteration every Richardson-Lucy variant shares: from the iterate x, the correction
 * H^T( w y / (H x + b) ) in the operator's work grid ({@link OperatorWork}), with the data fit of x (and of the
 * held-out pixels) read on the way. The variant's update then reads the correction from {@link #grid()} and, if it
 * writes its next iterate there as well, says so with {@link #holdsNext()}: the next step then starts without loading
 * it (unless someone used the grid meanwhile, which its generation count shows).
 */
final class CorrectionStep {

    private final DeconvolutionProblem p;
    private final OperatorWork h;
    private final WorkGrid grid;
    private long holds = -1;
    private double held;
    private double fit;
    private final Sums sums = new Sums(2);

    CorrectionStep(DeconvolutionProblem p) {
        this.p = p;
        this.h = p.forwardWork();
        this.grid = h.grid();
    }

    /** @return the work grid: the correction after {@link #run} */
    WorkGrid grid() {
        return grid;
    }

    /**
     * grid = H^T( w y / (H x + b) ).
     *
     * @param x the iterate, not modified
     */
    void run(float[] x) {
        if (grid.generation() != holds) {
            p.workers().forRange(x.length, (from, to) -> grid.load(x, from, to));
        }
        h.apply();
        held = p.heldOutFit(grid);
        fit = p.ratioAndFit(grid) / p.trustedPixels();
        h.applyAdjoint();
    }

    /** @return the mean data fit per trusted pixel of the x of the last {@link #run} */
    double fit() {
        return fit;
    }

    /** @return the mean fit of the held-out pixels for that x, NaN when the problem has none */
    double held() {
        return held;
    }

    /**
     * The multiplicative update x &lt;- x max(correction, 0) / d with d = H^T w, or, with a curvature, the
     * Richardson-Lucy-TV denominator max(H^T w - lambda curv, H^T w / 2) (Dey et al. 2006); where H^T w is 0, x = 0.
     * The new x is also left in the grid as the next step's input ({@link #holdsNext()}).
     *
     * @param x the iterate, overwritten
     * @param curv the total variation's curvature at x, or null for plain Richardson-Lucy
     * @param lam the regularisation weight (unused without curvature)
     * @return the relative change ||x_new - x|| / ||x||
     */
    double update(float[] x, float[] curv, float lam) {
        float[] norm = p.normalisation();
        double[] s = sums.run(p.workers(), x.length, (from, to, acc) -> grid.update(from, to, (a, at, index, count) -> {
            double dd = acc[0];
            double xx = acc[1];
            for (int j = 0; j < count; j++) {
                int i = index + j;
                float old = x[i];
                float nv = next(old, a[at + j], norm, curv, lam, i);
                x[i] = nv;
                a[at + j] = nv;
                double diff = nv - old;
                dd += diff * diff;
                xx += (double) old * old;
            }
            acc[0] = dd;
            acc[1] = xx;
        }));
        holdsNext();
        return Math.sqrt(s[0] / Math.max(s[1], 1e-300));
    }

    /**
     * The multiplicative step of voxel i (the formula of {@link #update}, also used by the accelerated variants'
     * {@link Extrapolation}): x max(correction, 0) / d, with d = H^T w, or the RL-TV denominator when curv is given;
     * 0 where H^T w is 0.
     */
    static float next(float x, float correction, float[] norm, float[] curv, float lam, int i) {
        if (!(norm[i] > 0)) {
            return 0f;
        }
        float den = curv == null ? norm[i] : Math.max(norm[i] - lam * curv[i], 0.5f * norm[i]);
        return x * Math.max(correction, 0f) / den;
    }

    /** The caller has left its next iterate in the grid. */
    void holdsNext() {
        holds = grid.generation();
    }
}
