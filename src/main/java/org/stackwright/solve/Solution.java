package org.stackwright.solve;

/**
 * What a solver returns.
 *
 * @param estimate the object on the problem's grid (photo-electrons); see
 *     {@link org.stackwright.model.DeconvolutionProblem#toVolume}
 * @param iterations iterations done
 * @param stopReason which rule stopped the run and why
 * @param objective objective per iteration (index 0 = iteration 1); see the solver for its meaning
 * @param change relative change (or gap) per iteration
 * @param seconds wall time of the iterations
 */
public record Solution(float[] estimate, int iterations, String stopReason, double[] objective, double[] change,
        double seconds) {
}
