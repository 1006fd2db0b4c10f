package org.stackwright.solve;

import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;

/** A deconvolution method: configured in its constructor, run on a problem. */
public interface Solver {

    /** @return the method's CLI name, e.g. "richardson-lucy" */
    String method();

    /** @return a description of the objective stored per iteration, for the run record */
    String objectiveName();

    /** @return float arrays of the grid's size this solver allocates (for the memory check) */
    double gridArrays();

    /**
     * Runs the method.
     *
     * @param problem the problem (not modified)
     * @param context cancel (checked every iteration) and progress
     * @param listener told about each iteration
     * @throws org.stackwright.parallel.CancelledException when cancelled
     */
    Solution solve(DeconvolutionProblem problem, RunContext context, IterationListener listener);
}
