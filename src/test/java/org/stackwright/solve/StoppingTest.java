package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * The automatic rule's decisions on held-out histories written out by hand (no solver): the best iteration with its
 * patience, and the levelling-off of a regularised method, whose threshold is the standard error of a mean of
 * per-pixel divergences, sqrt(1/2 / n) (2 KL about chi-square with one degree of freedom: McCullagh &amp; Nelder,
 * "Generalized Linear Models", 1989, sec. 2.3).
 */
class StoppingTest {

    private static final Stopping AUTO = new Stopping(StopRule.AUTO, 1000, 1e-3);

    /** A held-out fit that falls to its best after 40 iterations and rises after: stops 12 after the best (30%). */
    @Test
    void autoStopsAPatienceAfterTheBest() {
        double[] h = new double[200];
        for (int k = 0; k < h.length; k++) {
            h[k] = 0.5 + 1e-4 * (k - 40) * (k - 40);
        }
        String reason = null;
        int stopped = 0;
        for (int n = 1; n <= h.length && reason == null; n++) {
            reason = AUTO.check(n, 0.6, 0.5, 1, java.util.Arrays.copyOf(h, n));
            stopped = n;
        }
        assertEquals(40, Stopping.bestHeldOut(h));
        assertEquals(40 + 1 + Stopping.patience(40), stopped, reason);
        assertTrue(reason.startsWith("auto: the held-out fit was best after 40 iterations"), reason);
    }

    /**
     * A held-out fit that keeps falling as 0.5 + 1/k (a regularised method converging): with n held-out pixels it
     * has levelled off once the gain over the last 0.3 k iterations, 1/(0.7 k) - 1/k = 0.43 / k, is below sqrt(0.5 / n).
     */
    @Test
    void aRegularisedMethodStopsWhenTheGainIsBelowTheFluctuation() {
        int pixels = 20000;
        double fluctuation = Math.sqrt(0.5 / pixels);
        double[] h = new double[1000];
        for (int k = 0; k < h.length; k++) {
            h[k] = 0.5 + 1.0 / (k + 1);
        }
        int stopped = -1;
        String reason = null;
        for (int n = 1; n <= h.length && reason == null; n++) {
            reason = Stopping.levelledOff(java.util.Arrays.copyOf(h, n), pixels);
            stopped = n;
        }
        assertNotNull(reason);
        assertTrue(reason.startsWith("auto: the held-out fit levelled off"), reason);
        int window = Stopping.patience(stopped);
        double gain = h[stopped - window - 1] - h[stopped - 1];
        double gainBefore = h[stopped - 1 - Stopping.patience(stopped - 1) - 1] - h[stopped - 2];
        assertTrue(gain < fluctuation && gainBefore >= fluctuation, reason + " at " + stopped);
        // never for a problem without held-out pixels, nor while the fit still falls steeply
        assertNull(Stopping.levelledOff(h, 0));
        assertNull(Stopping.levelledOff(java.util.Arrays.copyOf(h, 20), pixels));
    }

    /**
     * The settled rule of total-variation on an objective that falls exactly at the O(1/k) rate of the primal-dual
     * method (Chambolle &amp; Pock, J Math Imaging Vis 40, 2011, Theorem 1): P_k = P* + C / k. Its estimate of the
     * distance left, range (k - w) / w, is then exactly C / k, so it stops at the first k with C / k below the
     * fluctuation: k = 1000 for C = 1 and fluctuation 0.001. A plateau early on never stops it before the
     * 100-iteration window.
     */
    @Test
    void settledStopsWhereTheOneOverKRemainderFallsBelowTheFluctuation() {
        double[] p = new double[3000];
        int stop = -1;
        for (int k = 1; k <= p.length && stop < 0; k++) {
            p[k - 1] = 0.5 + 1.0 / k;
            if (Stopping.settled(java.util.Arrays.copyOf(p, k), 0.001) != null) {
                stop = k;
            }
        }
        assertTrue(Math.abs(stop - 1000) <= 10, "stopped at " + stop);
        assertTrue(Stopping.settled(java.util.Arrays.copyOf(p, stop), 0.001).startsWith("auto: the objective settled"));
        double[] flat = new double[99];
        java.util.Arrays.fill(flat, 0.7);
        assertNull(Stopping.settled(flat, 0.001));
        double[] settledFlat = new double[101];
        java.util.Arrays.fill(settledFlat, 0.7);
        assertNotNull(Stopping.settled(settledFlat, 0.001));
        assertNull(Stopping.settled(p, 0));
    }
}
