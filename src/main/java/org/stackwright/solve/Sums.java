package org.stackwright.solve;

import java.util.Arrays;

import org.stackwright.parallel.Workers;

/**
 * Several sums in one parallel pass over an array, deterministic for any thread count: the range is cut into
 * {@link Workers#REDUCTION_BLOCKS} fixed blocks and the block sums are added in block order (as
 * {@link Workers#sum} does for one sum). The partial-sum storage is allocated once, in the constructor.
 */
final class Sums {

    /** A pass over [from, to) that adds its partial sums into acc (acc starts at zero). */
    @FunctionalInterface
    interface Body {
        void run(int from, int to, double[] acc);
    }

    private final double[][] partial;
    private final double[] total;

    /** @param count number of sums per pass */
    Sums(int count) {
        partial = new double[Workers.REDUCTION_BLOCKS][count];
        total = new double[count];
    }

    /**
     * Runs the pass and returns the sums (an internal array, overwritten by the next call).
     */
    double[] run(Workers workers, int n, Body body) {
        int blocks = Math.min(Workers.REDUCTION_BLOCKS, Math.max(n, 1));
        workers.forEachBlock(blocks, b -> {
            Arrays.fill(partial[b], 0);
            body.run((int) ((long) n * b / blocks), (int) ((long) n * (b + 1) / blocks), partial[b]);
        });
        Arrays.fill(total, 0);
        for (int b = 0; b < blocks; b++) {
            for (int j = 0; j < total.length; j++) {
                total[j] += partial[b][j];
            }
        }
        return total;
    }

    /** @return the largest value of x, or 0 when none is positive (the scale of a non-negative estimate) */
    static float maxAtLeastZero(float[] x) {
        float m = 0;
        for (float v : x) {
            m = Math.max(m, v);
        }
        return m;
    }
}
