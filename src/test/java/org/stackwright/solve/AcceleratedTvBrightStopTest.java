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
 * {@code deconvolve --method richardson-lucy-tv} with its defaults (acceleration on, automatic camera values,
 * background, lambda and stop; only the offset given) on a bright stack (peak 20000 photons) of an acquisition
 * simulator independent of {@code simulate} and of the condition stacks' generators ({@link IndependentAcquisition}:
 * its own widening-beam PSF with Lorentzian axial light, direct-sum blur, Poisson counts by inversion, a camera of
 * its own). Where photon counts are high the automatic lambda is small and the unaccelerated update needs thousands
 * of iterations (it ran to the maximum of 2000 on both condition generators' bright stacks); with the vector
 * extrapolation of Biggs &amp; Andrews (Applied Optics 36(8), 1997) applied to the RL-TV step (Dey et al.,
 * Microscopy Research and Technique 69, 2006) the run must end by its own rule (the held-out fit levelled off or
 * passed its best; cross-validation, Stone, J. R. Stat. Soc. B 36, 1974) and land within 10% of its oracle: the best
 * error over iteration counts of the same method with the same settings, found with the truth (the project's goal
 * for automatic settings, common practice, no source).
 */
class AcceleratedTvBrightStopTest {

    @Test
    void brightStackEndsByTheRuleNearItsOracle() {
        IndependentAcquisition.Sensor sensor = IndependentAcquisition.Sensor.camera();
        IndependentAcquisition.Acquisition a = IndependentAcquisition.brightCrossing();
        Volume truth = a.truthAdu();
        Map<String, String> raw = new HashMap<>();
        raw.put("offset", Double.toString(sensor.offset()));
        raw.put("method", "richardson-lucy-tv");
        DeconvolutionSettings s = DeconvolveOperation.settings(Values.parse("deconvolve", new DeconvolveOperation().params(),
                raw));
        long t0 = System.nanoTime();
        Deconvolution.Outcome o = Deconvolution.run(a.data(), a.psf(), "psf", null, s, RunContext.quiet(2),
                IterationListener.NONE);
        double seconds = (System.nanoTime() - t0) * 1e-9;
        int k = o.solution().iterations();
        double error = ConditionStacks.error(o.result().data(), truth.data());
        int max = Math.max(3 * k, k + 200);
        double[] best = ConditionStacks.methodOracle(a.data(), a.psf(), o.settings(), truth, max, 2);
        @SuppressWarnings("unchecked")
        Map<String, Object> settings = (Map<String, Object>) o.record().get("settings");
        String line = String.format(Locale.ROOT, "default: %d iterations, error %.4f, lambda %.3g, %.1f s; oracle %d"
                + " of %d, %.4f; ratio %.3f; acceleration %s; %s", k, error, o.settings().lambda(), seconds,
                (int) best[0], max, best[1], error / best[1], settings.get("acceleration"),
                o.solution().stopReason());
        System.out.println("richardson-lucy-tv bright default: " + line);
        @SuppressWarnings("unchecked")
        Map<String, Object> trial = (Map<String, Object>) settings.get("stop_trial");
        // the stop came from the rule: the trial met it before the maximum
        assertTrue((Boolean) trial.get("met"), line);
        assertTrue(k < s.stopping().maxIterations(), line);
        assertFalse(o.solution().stopReason().startsWith("maximum"), line);
        assertTrue((Boolean) settings.get("acceleration"), line);
        // within 10% of the oracle (the automatic settings' goal; common practice, no source)
        assertTrue(error <= 1.10 * best[1], line);
    }
}
