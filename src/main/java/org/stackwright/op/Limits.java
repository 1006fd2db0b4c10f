package org.stackwright.op;

/**
 * Limits shared by all operations, so a typo (an extra zero) cannot start a run that never ends.
 */
public final class Limits {

    /**
     * The largest iteration count any iterative method accepts. Richardson-Lucy and its relatives are usually run
     * for tens to a few hundred iterations (common practice); ten thousand leaves ample room while still ending.
     */
    public static final int MAX_ITERATIONS = 10_000;

    private Limits() {
    }

    /**
     * The iteration-count setting every iterative operation uses: a whole number from 1 to
     * {@link #MAX_ITERATIONS}, so 0, negative and too-large counts are refused by {@link Values} naming the key.
     */
    public static Param iterations(String key, int defaultValue, String help) {
        return Param.integer(key, defaultValue, 1, MAX_ITERATIONS, help);
    }
}
