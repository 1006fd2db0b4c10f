package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;
import java.util.stream.Stream;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;
import org.stackwright.op.RunContext;
import org.stackwright.testing.IndependentStacks;
import org.stackwright.volume.Volume;

/**
 * A property-based pass over every solver: random invented stacks (fixed seeds) across 10^-1 to 10^6 photons per
 * voxel, backgrounds, camera offsets, gains and read noise, PSF widths and sizes, sparse (beads) and dense (cells)
 * objects, 2D and 3D. The data come from an independent generator written here (its own Gaussian PSF, its own
 * Poisson and Gaussian samplers), not from the project's simulator. For every case and method:
 * <ul>
 * <li>every value of the result is finite (or the run stops with the numerical guard's message, which is then a
 * failure of this test);</li>
 * <li>richardson-lucy, richardson-lucy-tv and total-variation give no negative value (their update keeps the
 * estimate non-negative; wiener does not promise it);</li>
 * <li>the flux of the fitted model (gain H x + background, summed over the image) lies within the method's stated
 * tolerance of the flux of the data above the offset: {@link #FLUX_TOLERANCE} (see there).</li>
 * </ul>
 * {@value #DEFAULT_CASES} cases run in CI; {@code -Dstackwright.fuzz.count=N} runs N (e.g. 2000 for a long pass).
 */
class SolverPropertyTest {

    static final int DEFAULT_CASES = 24;

    /**
     * Relative flux tolerance per method, stated in README ("Deconvolution", property pass): the flux of the model
     * (gain H x + background) against the flux of the data as the likelihood sees them (shifted-Poisson units,
     * clamped at 0, back in ADU), relative to that flux plus three Poisson standard deviations of it. A model
     * brighter than the data is allowed up to the background term N b for the Poisson methods: where the
     * non-negativity constraint holds the object at zero, the model cannot go below b. Richardson-Lucy conserves
     * flux in every update up to that term (sum(H^T w x_k+1) = sum(w y H x_k / (H x_k + b)); Shepp &amp; Vardi,
     * IEEE TMI 1, 1982); RL-TV leaves the regularisation's pull; total variation (primal-dual) conserves flux only
     * at convergence and is checked after at most {@link #TV_ITERATIONS} iterations or a relative gap of 1e-4;
     * Wiener scales the mean by 1 / (1 + lambda) and sees the image mirrored at its edges.
     */
    static final double[] FLUX_TOLERANCE = {0.01, 0.02, 0.10, 0.05};
    static final int ITERATIONS = 15;
    static final int TV_ITERATIONS = 400;
    static final String[] METHODS = {"richardson-lucy", "richardson-lucy-tv", "total-variation", "wiener"};

    private static final List<String> REPORT = new ArrayList<>();
    private static final double[] WORST = new double[METHODS.length];

    /** One random case: what the generator drew. */
    record Case(long seed, int w, int h, int d, double photons, boolean sparse, double backgroundPhotons,
            double offset, double gain, double readNoise, double sigmaXy, double sigmaZ, int pw, int pd,
            boolean accelerated) {
        @Override
        public String toString() {
            return String.format(Locale.ROOT, "seed %d: %dx%dx%d, %.3g photons/voxel (%s), bg %.3g, offset %.0f,"
                    + " gain %.2f, rn %.2f, psf sigma %.2f/%.2f size %dx%dx%d", seed, w, h, d, photons,
                    sparse ? "beads" : "cells", backgroundPhotons, offset, gain, readNoise, sigmaXy, sigmaZ, pw, pw, pd);
        }
    }

    static Stream<Case> cases() {
        int n = Integer.getInteger("stackwright.fuzz.count", DEFAULT_CASES);
        List<Case> out = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            long seed = 1000 + i;
            SplittableRandom r = new SplittableRandom(seed);
            // the first cases pin the ends of the photon range; the others draw it log-uniformly
            double photons = i == 0 ? 0.1 : i == 1 ? 1e6 : i == 2 ? 5e4 : Math.pow(10, r.nextDouble(-1, 6));
            boolean sparse = i < 3 || r.nextBoolean();
            int d = r.nextInt(4) == 0 ? 1 : r.nextInt(3, 13);
            int w = r.nextInt(10, 41);
            int h = r.nextInt(10, 41);
            double sxy = r.nextDouble(0.6, 3.0);
            double sz = d == 1 ? 0 : r.nextDouble(0.6, 3.0);
            int pw = Math.min(odd(2 * (int) Math.ceil(3 * sxy) + 1), oddBelow(Math.min(w, h)));
            int pd = d == 1 ? 1 : Math.min(odd(2 * (int) Math.ceil(3 * sz) + 1), oddBelow(d));
            double bg = r.nextInt(3) == 0 ? 0 : photons * r.nextDouble(0.01, 0.5);
            double offset = r.nextInt(3) == 0 ? 0 : r.nextDouble(50, 2000);
            double gain = r.nextDouble(0.25, 4);
            double rn = r.nextInt(3) == 0 ? 0 : r.nextDouble(0.5, 4);
            out.add(new Case(seed, w, h, d, photons, sparse, bg, offset, gain, rn, sxy, sz, pw, pd, r.nextBoolean()));
        }
        return out.stream();
    }

    private static int odd(int n) {
        return n % 2 == 1 ? n : n + 1;
    }

    private static int oddBelow(int n) {
        return n % 2 == 1 ? n : n - 1;
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void everySolverStaysFiniteNonNegativeAndKeepsTheFlux(Case c) {
        Volume[] made = IndependentStacks.generate(new IndependentStacks.Spec(c.seed(), c.w(), c.h(), c.d(),
                c.photons(), c.sparse(), c.backgroundPhotons(), c.offset(), c.gain(), c.readNoise(), c.sigmaXy(),
                c.sigmaZ(), c.pw(), c.pd()));
        Volume data = made[0];
        Volume psf = made[1];
        // the data as the likelihood sees them: shifted-Poisson photo-electrons clamped at 0, back in ADU
        double shift = c.readNoise() * c.readNoise() / (c.gain() * c.gain());
        double dataFlux = 0;
        for (float v : data.data()) {
            dataFlux += c.gain() * (Math.max(0, (v - c.offset()) / c.gain() + shift) - shift);
        }
        StringBuilder line = new StringBuilder(c.toString());
        for (int m = 0; m < METHODS.length; m++) {
            String method = METHODS[m];
            // total variation conserves flux only near convergence of its primal-dual iterations
            Stopping stop = method.equals("total-variation") ? new Stopping(StopRule.CHANGE, TV_ITERATIONS, 1e-4)
                    : new Stopping(StopRule.FIXED, ITERATIONS, 1e-3);
            DeconvolutionSettings s = new DeconvolutionSettings(method, stop,
                    c.offset(), c.backgroundPhotons() * c.gain(), c.gain(), c.readNoise(),
                    // each method's fixed starting lambda, not the automatic choice (NaN): the flux bounds below
                    // are for a weak prior; a stronger one, as the choice may pick on a tiny image, trades flux for
                    // smoothness by design
                    DeconvolutionSettings.defaultRegularization(method), "extended",
                    c.accelerated(), "poisson");
            Deconvolution.Outcome o = Deconvolution.run(data, psf, "generated", null, s, RunContext.quiet(2),
                    IterationListener.NONE, true);
            float[] x = o.result().data();
            int bad = 0;
            int negative = 0;
            for (float v : x) {
                if (!Float.isFinite(v)) {
                    bad++;
                } else if (v < 0) {
                    negative++;
                }
            }
            assertTrue(bad == 0, method + ": " + bad + " non-finite values; " + c);
            if (!method.equals("wiener")) {
                assertTrue(negative == 0, method + ": " + negative + " negative values; " + c);
            }
            double modelFlux = o.model().sum();
            // Poisson noise of the total (photo-electrons) and, for the Poisson methods, the background allowance:
            // where the object is held at zero the model cannot fall below b, so it may exceed the data by up to N b
            // (for Richardson-Lucy exactly: sum(H x_k+1) + N b - sum(y) = N b - b sum(y / (H x_k + b)) <= N b)
            double sigma = c.gain() * Math.sqrt(Math.max(dataFlux / c.gain(), 1));
            double allowance = method.equals("wiener") ? 0 : data.size() * (c.backgroundPhotons() + shift) * c.gain();
            double excess = modelFlux - dataFlux;
            double rel = (excess > 0 ? Math.max(0, excess - allowance) : -excess) / (Math.abs(dataFlux) + 3 * sigma);
            synchronized (WORST) {
                WORST[m] = Math.max(WORST[m], rel);
            }
            line.append(String.format(Locale.ROOT, "; %s flux %.2e", method, rel));
            assertTrue(rel <= FLUX_TOLERANCE[m], method + ": model flux " + modelFlux + " vs data flux " + dataFlux
                    + " (relative " + rel + ", allowed " + FLUX_TOLERANCE[m] + "); " + c);
        }
        synchronized (REPORT) {
            REPORT.add(line.toString());
        }
    }

    @AfterAll
    static void report() {
        if (Boolean.getBoolean("stackwright.property.report")) {
            REPORT.forEach(System.out::println);
        }
        StringBuilder sb = new StringBuilder("largest relative flux error:");
        for (int m = 0; m < METHODS.length; m++) {
            sb.append(String.format(Locale.ROOT, " %s %.3g (allowed %.2g)", METHODS[m], WORST[m], FLUX_TOLERANCE[m]));
        }
        System.out.println(sb);
    }
}
