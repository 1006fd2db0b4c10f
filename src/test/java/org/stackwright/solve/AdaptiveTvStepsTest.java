package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.HashMap;
import java.util.Locale;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.testing.IndependentAcquisition;
import org.stackwright.volume.Volume;

/**
 * {@code deconvolve --method total-variation} with the steps adapted by residual balancing (Goldstein, Li, Yuan,
 * Esser &amp; Baraniuk, "Adaptive Primal-Dual Splitting Methods for Statistical Learning and Image Processing", NIPS
 * 2015) against the constant step balance, on the bright stack (peak 20000 photons) of an acquisition simulator
 * independent of {@code simulate} and of the condition stacks' generators ({@link IndependentAcquisition}: its own
 * widening-beam PSF with Lorentzian axial light, direct-sum blur, its own camera), the stack of
 * {@link AcceleratedTvBrightStopTest}. Camera values and background are the simulator's, lambda 3.16e-6 (the one
 * the automatic choice takes there), 500 iterations each.
 *
 * <p>Measured (2026-12-05): error against the truth 0.3603 adapted, 0.4723 constant (ratio 0.763); after 2000
 * iterations with all settings automatic 0.3086 against 0.3797. The bound 0.85 leaves room for the FFT engine and
 * the thread count (the fourth digit) and fails if the adaptation stops taking effect (ratio 1). What this does NOT
 * show: with defaults the run still reaches the maximum of 2000 iterations on this stack before its objective
 * settles (README, "Known limit of total-variation's stop"); the faster steps bring the error closer to where the
 * rule would end, not all the way.
 */
class AdaptiveTvStepsTest {

    @Test
    void adaptedStepsReachALowerErrorInTheSameIterationsOnABrightStack() {
        IndependentAcquisition.Sensor sensor = IndependentAcquisition.Sensor.camera();
        IndependentAcquisition.Acquisition a = IndependentAcquisition.brightCrossing();
        Volume truth = a.truthAdu();
        double[] error = new double[2];
        String[] reason = new String[2];
        for (int k = 0; k < 2; k++) {
            Map<String, String> raw = new HashMap<>();
            raw.put("offset", Double.toString(sensor.offset()));
            raw.put("gain", Double.toString(sensor.gain()));
            raw.put("read-noise", Double.toString(sensor.readNoise()));
            raw.put("background", Double.toString(a.backgroundAdu()));
            raw.put("regularization", "3.16e-6");
            raw.put("method", "total-variation");
            raw.put("iterations", "500");
            raw.put("stop", "fixed");
            raw.put("acceleration", k == 0 ? "on" : "off");
            DeconvolutionSettings s = DeconvolveOperation.settings(Values.parse("deconvolve",
                    new DeconvolveOperation().params(), raw));
            Deconvolution.Outcome o = Deconvolution.run(a.data(), a.psf(), "psf", null, s, RunContext.quiet(2),
                    IterationListener.NONE);
            error[k] = ConditionStacks.error(o.result().data(), truth.data());
            reason[k] = o.solution().stopReason();
            for (float v : o.result().data()) {
                assertTrue(v >= 0, "negative value " + v);
            }
        }
        String line = String.format(Locale.ROOT, "adapted %.4f, constant %.4f, ratio %.3f; %s", error[0], error[1],
                error[0] / error[1], reason[0]);
        System.out.println("total-variation bright, 500 iterations: " + line);
        assertTrue(reason[0].contains("steps adapted"), line);
        assertFalse(reason[1].contains("steps adapted"), line);
        assertTrue(error[0] <= 0.85 * error[1], line);
    }
}
