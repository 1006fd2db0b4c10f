package org.stackwright.solve;

/** Told about every iteration of a solver (progress bars, convergence plots, logs). Called on the solver's thread. */
@FunctionalInterface
public interface IterationListener {

    /** Does nothing. */
    IterationListener NONE = (k, max, objective, change) -> { };

    /**
     * @param iteration iterations done (1-based)
     * @param maxIterations the maximum
     * @param objective the objective of this iteration (see the solver's Javadoc)
     * @param change relative change or primal-dual gap of this iteration, NaN when not computed
     */
    void iteration(int iteration, int maxIterations, double objective, double change);

    /**
     * Called after {@link #iteration} with everything the solver knows, the current estimate included (for stop
     * policies and truth comparisons in tests). Does nothing unless overridden.
     */
    default void state(IterationState state) {
    }
}
