package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.Test;
import org.stackwright.blocks.BlockRun;
import org.stackwright.model.Camera;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.simulate.Simulation;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * Deconvolution in blocks against the whole volume at once, on an invented cell stack (camera offset, read noise,
 * background), after a fixed number of iterations.
 */
class DeconvolveBlocksTest {

    private static final DeconvolveOperation OP = new DeconvolveOperation();

    private static Simulation.Outcome sim() {
        return TestSpecimens.cells(64, 60, 16, 1, 10, new Camera(1, 100, 2, 65535), 77);
    }

    private static Values values(Simulation.Outcome sim, Map<String, String> extra) {
        Map<String, String> raw = new LinkedHashMap<>();
        raw.put("iterations", "20");
        raw.put("stop", "fixed");
        // the camera of the simulation, given: these tests are about the block mechanism, not the camera estimate
        raw.put("offset", "100");
        raw.put("gain", "1");
        raw.put("read-noise", "2");
        raw.putAll(extra);
        Values v = Values.parse("deconvolve", OP.params(), raw);
        v.withImage("input", ImagePlusAdapter.toImagePlus(sim.data(), "cells"));
        v.withImage("psf", ImagePlusAdapter.toImagePlus(TestSpecimens.psf(), "psf"));
        return v;
    }

    private static Volume whole(Simulation.Outcome sim, Map<String, String> extra) {
        Result r = OP.run(values(sim, extra), RunContext.quiet(2));
        return ImagePlusAdapter.toVolume(r.images().get("output"));
    }

    private static Volume blocks(Simulation.Outcome sim, Map<String, String> extra, double haloFactor) {
        Values v = values(sim, extra);
        Result r = BlockRun.inMemory(OP, new DeconvolveBlocks(haloFactor), v, RunContext.quiet(2));
        return ImagePlusAdapter.toVolume(r.images().get("output"));
    }

    private static double relativeMaxDifference(Volume a, Volume b) {
        double diff = 0;
        double max = 0;
        for (int i = 0; i < a.size(); i++) {
            diff = Math.max(diff, Math.abs(a.data()[i] - b.data()[i]));
            max = Math.max(max, Math.abs(a.data()[i]));
        }
        return diff / max;
    }

    @Test
    void oneBlockIsTheWholeVolumeRunBitForBit() {
        Simulation.Outcome sim = sim();
        Map<String, String> extra = Map.of("background", "auto");
        Volume w = whole(sim, extra);
        Volume b = blocks(sim, Map.of("background", "auto", "block-size", "64x60x16"), 1);
        assertArrayEquals(w.data(), b.data());
    }

    /**
     * The check of the block mechanism: after 20 plain Richardson-Lucy iterations the block result is within 1e-2
     * of the maximum of the whole-volume result with a halo of one PSF size (11x11x9), and the difference falls
     * as the halo grows (measured on 96x90x20 in 32x30x10 blocks: 1.1e-2 at half a PSF, 9.8e-4 at one, 5.7e-6 at
     * two; the figures of this smaller stack are printed). Each block is an extended-object problem of its own (Bertero &amp; Boccacci, "A simple method for the
     * reduction of boundary effects in the Richardson-Lucy approach to image deconvolution", A&amp;A 437, 2005):
     * the halo's outer faces carry no likelihood, so an error starts there and travels inward by about one PSF
     * half-width per iteration, damped at each step.
     */
    @Test
    void blocksAgreeWithTheWholeVolumeAndBetterWithALargerHalo() {
        Simulation.Outcome sim = sim();
        Map<String, String> plain = Map.of("background", "10", "acceleration", "off");
        Volume w = whole(sim, plain);
        Map<String, String> cut = new LinkedHashMap<>(plain);
        cut.put("block-size", "32x30x8");
        double[] factors = {0.5, 1, 2};
        double[] diff = new double[factors.length];
        for (int i = 0; i < factors.length; i++) {
            diff[i] = relativeMaxDifference(w, blocks(sim, cut, factors[i]));
            System.out.printf(Locale.ROOT, "plain RL, halo %.1f PSF: max difference %.3g of the maximum%n", factors[i], diff[i]);
        }
        assertTrue(diff[1] < 1e-2, "halo of one PSF: " + diff[1]);
        assertTrue(diff[2] < diff[1] && diff[1] < diff[0], java.util.Arrays.toString(diff));
    }

    /**
     * The other methods with their default halo: their whole-volume choices (extrapolation steps of accelerated
     * Richardson-Lucy, Biggs &amp; Andrews 1997; the primal-dual step balance) are fixed once for every block. The
     * accelerated block run is compared with the whole volume run with the same steps (with its own steps the
     * whole volume differs by about 2e-2 of the maximum: the steps are a choice, not a property of the data).
     */
    @Test
    void everyMethodAgreesWithTheWholeVolumeWithTheDefaultHalo() {
        Simulation.Outcome sim = sim();
        for (String m : new String[] {"richardson-lucy-tv", "total-variation"}) {
            // a fixed lambda: an automatic one is chosen on the whole stack here and on one block there
            // (richardson-lucy-tv without acceleration here; accelerated, it takes the steps of one block, below)
            Map<String, String> one = Map.of("background", "10", "method", m, "iterations", "10", "regularization",
                    Double.toString(DeconvolutionSettings.defaultRegularization(m)), "acceleration", "off");
            Map<String, String> cut = new LinkedHashMap<>(one);
            cut.put("block-size", "32x30x8");
            double d = relativeMaxDifference(whole(sim, one), blocks(sim, cut, Double.NaN));
            System.out.printf(Locale.ROOT, "%s, default halo: max difference %.3g of the maximum%n", m, d);
            assertTrue(d < 1e-2, m + ": " + d);
        }
        Map<String, String> acc = Map.of("background", "10", "acceleration", "on", "block-size", "32x30x8");
        Result r = BlockRun.inMemory(OP, new DeconvolveBlocks(), values(sim, acc), RunContext.quiet(2));
        Volume b = ImagePlusAdapter.toVolume(r.images().get("output"));
        double same = relativeMaxDifference(wholeWithSteps(sim, r, steps -> new RichardsonLucy(Stopping.fixed(20), steps)), b);
        System.out.printf(Locale.ROOT, "accelerated RL, default halo (1.5 PSF): max difference %.3g of the maximum%n", same);
        assertTrue(same < 1e-2, "accelerated with the same steps: " + same);
        double lambda = DeconvolutionSettings.defaultRegularization("richardson-lucy-tv");
        Map<String, String> tv = Map.of("background", "10", "method", "richardson-lucy-tv", "regularization",
                Double.toString(lambda), "acceleration", "on", "block-size", "32x30x8");
        Result rt = BlockRun.inMemory(OP, new DeconvolveBlocks(), values(sim, tv), RunContext.quiet(2));
        Volume bt = ImagePlusAdapter.toVolume(rt.images().get("output"));
        double sameTv = relativeMaxDifference(wholeWithSteps(sim, rt,
                steps -> new RichardsonLucyTv(Stopping.fixed(20), lambda, steps)), bt);
        System.out.printf(Locale.ROOT, "accelerated RL-TV, default halo: max difference %.3g of the maximum%n", sameTv);
        assertTrue(sameTv < 1e-2, "accelerated RL-TV with the same steps: " + sameTv);
    }

    /**
     * The whole volume deconvolved with the global choices of a block run: its background, start value and
     * extrapolation steps (Biggs &amp; Andrews 1997 take alpha as a sum over the whole grid; the block run fixes
     * the steps of one representative block for every block).
     */
    private static Volume wholeWithSteps(Simulation.Outcome sim, Result blockRun,
            java.util.function.Function<double[], Solver> solver) {
        @SuppressWarnings("unchecked")
        Map<String, Object> g = (Map<String, Object>) blockRun.record().get("global_settings");
        double[] steps = (double[]) g.get("extrapolation_steps");
        double start = (Double) g.get("start_photoelectrons");
        assertEquals(20, steps.length);
        RunContext ctx = RunContext.quiet(2);
        Volume psf = org.stackwright.psf.PsfChecks.prepare("psf", TestSpecimens.psf(), sim.data(), ctx);
        try (org.stackwright.parallel.Workers w = new org.stackwright.parallel.Workers(2)) {
            org.stackwright.model.DeconvolutionProblem p = new org.stackwright.model.DeconvolutionProblem(sim.data(),
                    psf, null, org.stackwright.model.DeconvolutionProblem.Boundary.EXTENDED, Camera.of(1, 100, 2), 10, w,
                    org.stackwright.fft.FftEngines.standard(), (float) start);
            Solution sol = solver.apply(steps).solve(p, ctx, IterationListener.NONE);
            return p.toVolume(sol.estimate());
        }
    }

    @Test
    void wienerIsRefusedInBlocks() {
        Values v = values(sim(), Map.of("method", "wiener", "block-size", "32x30x8"));
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> BlockRun.inMemory(OP, new DeconvolveBlocks(), v, RunContext.quiet(1)));
        assertTrue(e.getMessage().startsWith("method = wiener is one filter over the whole stack"), e.getMessage());
    }

    @Test
    void theNoiseRuleIsRunOnceOnTheBrightestBlockAndEveryBlockUsesItsCount() {
        Simulation.Outcome sim = sim();
        Values v = values(sim, Map.of("stop", "noise", "iterations", "200", "block-size", "32x30x16"));
        Result r = BlockRun.inMemory(OP, new DeconvolveBlocks(), v, RunContext.quiet(2));
        @SuppressWarnings("unchecked")
        Map<String, Object> g = (Map<String, Object>) r.record().get("global_settings");
        int n = (Integer) g.get("iterations");
        assertTrue(n > 1 && n < 200, "iterations " + n);
        assertTrue(g.get("iterations_from").toString().startsWith("found by the noise rule on block"), g.toString());
        assertEquals(n, r.record().get("iterations"));
        ImagePlus out = r.images().get("output");
        assertEquals(16, out.getNSlices());
    }

    /**
     * Automatic values in blocks are found once for the whole stack, never per block: the camera values on the
     * brightest block (in ADU), the background over the whole stack, the automatic stop's iteration count on the
     * representative block; every block then runs that count, and the record says where each value came from.
     */
    @Test
    void automaticValuesAreFoundOnceAndEveryBlockUsesThem() {
        Simulation.Outcome sim = sim();
        Map<String, String> raw = new LinkedHashMap<>();
        raw.put("iterations", "200");
        raw.put("block-size", "32x30x16");
        raw.put("acceleration", "off");
        Values v = Values.parse("deconvolve", OP.params(), raw);
        v.withImage("input", ImagePlusAdapter.toImagePlus(sim.data(), "cells"));
        v.withImage("psf", ImagePlusAdapter.toImagePlus(TestSpecimens.psf(), "psf"));
        Result r = BlockRun.inMemory(OP, new DeconvolveBlocks(), v, RunContext.quiet(2));
        @SuppressWarnings("unchecked")
        Map<String, Object> set = (Map<String, Object>) r.record().get("settings");
        assertEquals("auto", set.get("stop"));
        assertTrue(set.get("camera_values_from").toString().startsWith("block "), set.toString());
        assertTrue(set.containsKey("stop_trial"), set.toString());
        assertEquals(Boolean.TRUE, set.get("background_estimated"));
        @SuppressWarnings("unchecked")
        Map<String, Object> g = (Map<String, Object>) r.record().get("global_settings");
        int n = (Integer) g.get("iterations");
        assertTrue(n >= 1 && n <= 200, "iterations " + n);
        assertEquals(n, r.record().get("iterations"));
        // the simulated camera: gain 1 ADU/e-, offset 100 ADU, read noise 2 ADU (Camera above); the estimate
        // from one block of an image is rough (photon transfer on the image itself): within a factor of 2 here
        double gain = ((Number) set.get("gain")).doubleValue();
        assertTrue(gain > 0.5 && gain < 2, "gain " + gain);
    }

    @Test
    void darkFramesAreRefusedInBlocks() {
        Values v = values(sim(), Map.of("block-size", "32x30x8"));
        v.withImage("dark", ImagePlusAdapter.toImagePlus(sim().data(), "dark"));
        IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
                () -> BlockRun.inMemory(OP, new DeconvolveBlocks(), v, RunContext.quiet(1)));
        assertTrue(e.getMessage().startsWith("dark: calibration frames are not used in blocks"), e.getMessage());
    }
}
