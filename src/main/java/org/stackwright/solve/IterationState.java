package org.stackwright.solve;

/**
 * What a solver knows after one iteration, for listeners that need more than the objective (stop policies, tests
 * that compare each estimate with a known truth).
 *
 * @param iteration iterations done (1-based)
 * @param maxIterations the maximum
 * @param objective the solver's objective of this iteration
 * @param meanFit mean Kullback-Leibler divergence per trusted pixel of the estimate that entered this iteration
 * @param expectedFit its expected value when the model is right (1/2)
 * @param heldOutFit the same divergence over held-out pixels (cross-validation), NaN when the problem has none
 * @param change relative change (or primal-dual gap) of this iteration, NaN when not computed
 * @param estimate the estimate after this iteration, on the problem's grid (photo-electrons); shared with the
 *     solver: read it during the call only, do not modify
 */
public record IterationState(int iteration, int maxIterations, double objective, double meanFit, double expectedFit,
        double heldOutFit, double change, float[] estimate) {
}
