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

    /** The caller has left its next iterate in the grid. */
    void holdsNext() {
        holds = grid.generation();
    }
}
