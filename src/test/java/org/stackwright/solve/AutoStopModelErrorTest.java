package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * The decision of {@link AutoStop#choice} on a made-up trial history: the model-error stop (generalized discrepancy
 * principle, Tikhonov, Goncharsky, Stepanov &amp; Yagola, 1995) needs a fit excess above {@link AutoStop#MODEL_ERROR}
 * AND most of it spatially structured ({@link AutoStop#STRUCTURED_SHARE}); otherwise the held-out best stands.
 */
class AutoStopModelErrorTest {

    /** Held-out fit best after 20 iterations; own fit 0.5 (1 + 1 / k) falling to 0.525 there; noise explains 0.5. */
    private static AutoStop.Choice decide(double structured) {
        int n = 30;
        double[] heldOut = new double[n];
        double[] fits = new double[n];
        for (int k = 0; k < n; k++) {
            heldOut[k] = 0.6 + 1e-4 * (k - 20) * (k - 20);
            fits[k] = 0.5 * (1 + 1.0 / Math.max(k, 1));
        }
        Solution sol = new Solution(new float[1], n, "auto: the held-out fit was best after 20 iterations", new double[n],
                new double[n], 0);
        return AutoStop.choice(sol, heldOut, 500, fits, 0.5, structured);
    }

    @Test
    void structuredExcessStopsAtNoisePlusModelError() {
        // excess at the best 1/20 = 5%: mu = 0.025, target 0.5 + 0.025 + 2 sqrt(0.0125) = 0.7486; first k with
        // 0.5 (1 + 1/k) <= 0.7486 is k = 3 (0.6667; k = 2 gives 0.75)
        AutoStop.Choice c = decide(0.04);
        assertTrue(c.modelErrorStop(), c.reason());
        assertEquals(3, c.iterations(), c.reason());
        assertEquals(0.05, c.fitExcess(), 1e-12);
        assertTrue(c.reason().contains("smooth across neighbouring pixels"), c.reason());
    }

    @Test
    void unstructuredExcessKeepsTheHeldOutBest() {
        for (double structured : new double[] {0.02, 0.0, -0.03, Double.NaN}) {
            AutoStop.Choice c = decide(structured);
            assertFalse(c.modelErrorStop(), c.reason());
            assertEquals(20, c.iterations(), c.reason());
        }
    }
}
