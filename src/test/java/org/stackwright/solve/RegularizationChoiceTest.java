package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;

import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.stackwright.fft.Convolution;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * {@code --regularization auto} against the best lambda of a grid of 12, on a noisy piecewise-smooth specimen made
 * here independently of the simulator: 14 overlapping ellipses, each with a constant plus a linear ramp (peak 20
 * photons), blurred by a PSF of its own formula (a Moffat profile, I(r) = (1 + r^2 / (2 s^2))^-2.5, s = 1.6 pixels,
 * 15 x 15) and recorded with Poisson noise over a background of 2 photons (commons-math Poisson distribution).
 * Error: NRMSE against the truth (common practice). For total-variation each lambda is solved to its gap
 * tolerance; for richardson-lucy-tv each lambda runs with the automatic stop, so the comparison is of the lambda
 * choice given that stop. Requirement (the project's): the automatic lambda's error within 10% of the grid's best.
 * Source of the held-out choice: Stone, "Cross-validatory choice and assessment of statistical predictions",
 * J. R. Stat. Soc. B 36, 1974.
 */
class RegularizationChoiceTest {

    private static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.25);

    @ParameterizedTest
    @CsvSource({"total-variation, -1.5", "richardson-lucy-tv, 0"})
    void automaticLambdaIsWithinTenPercentOfTheBestOfTwelve(String method, double firstDecade) {
        Volume truth = specimen(96, 96, 20, 3);
        Volume psf = moffat(15, 1.6);
        Volume data = record(truth, psf, 2, 5);
        DeconvolutionSettings s = new DeconvolutionSettings(method, new Stopping(StopRule.AUTO, 500, 1e-3), 0, 2, 1, 0,
                Double.NaN, "extended", true, "poisson");
        Deconvolution.Outcome auto = Deconvolution.run(data, psf, "moffat", null, s, RunContext.quiet(2),
                IterationListener.NONE);
        double autoError = Nrmse.of(auto.result().data(), truth.data());
        double best = Double.POSITIVE_INFINITY;
        double bestLambda = 0;
        StringBuilder grid = new StringBuilder();
        for (int i = 0; i < 12; i++) {
            double lambda = DeconvolutionSettings.defaultRegularization(method) * Math.pow(10, firstDecade + 0.25 * i);
            Deconvolution.Outcome o = Deconvolution.run(data, psf, "moffat", null, s.withLambda(lambda),
                    RunContext.quiet(2), IterationListener.NONE);
            double e = Nrmse.of(o.result().data(), truth.data());
            grid.append(String.format(Locale.ROOT, " %.3g:%.4f", lambda, e));
            if (e < best) {
                best = e;
                bestLambda = lambda;
            }
        }
        String what = String.format(Locale.ROOT, "%s: automatic lambda %.4g error %.4f; best of the grid %.4g error %.4f;"
                + " grid%s", method, auto.settings().lambda(), autoError, bestLambda, best, grid);
        System.out.println("regularization: " + what);
        assertTrue(autoError <= 1.10 * best, what);
        // the automatic stop ends for its own reason (richardson-lucy-tv: where the held-out fit levels off)
        assertFalse(auto.solution().stopReason().startsWith("maximum"), auto.solution().stopReason());
        @SuppressWarnings("unchecked")
        Map<String, Object> settings = (Map<String, Object>) auto.record().get("settings");
        assertTrue(settings.get("regularization_choice").toString().contains("held-out likelihood"), settings.toString());
    }

    /** Ellipses, each a constant plus a linear ramp, the brightest value at each pixel kept. */
    static Volume specimen(int nx, int ny, double peak, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        Volume t = Volume.zeros(nx, ny, 1, VOXEL);
        for (int k = 0; k < 14; k++) {
            double cx = r.nextDouble(0, nx);
            double cy = r.nextDouble(0, ny);
            double ax = r.nextDouble(5, 14);
            double ay = r.nextDouble(5, 14);
            double v = r.nextDouble(0.3, 1);
            double gx = r.nextDouble(-0.03, 0.03);
            double gy = r.nextDouble(-0.03, 0.03);
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    double q = (x - cx) * (x - cx) / (ax * ax) + (y - cy) * (y - cy) / (ay * ay);
                    if (q <= 1) {
                        double value = peak * Math.max(0.05, v + gx * (x - cx) + gy * (y - cy));
                        t.set(x, y, 0, (float) Math.max(t.get(x, y, 0), value));
                    }
                }
            }
        }
        return t;
    }

    /** A 2D Moffat profile of exponent 2.5, normalised to unit sum. */
    static Volume moffat(int n, double s) {
        Volume p = Volume.zeros(n, n, 1, VOXEL);
        double sum = 0;
        for (int y = 0; y < n; y++) {
            for (int x = 0; x < n; x++) {
                double r2 = (x - n / 2) * (x - n / 2) + (y - n / 2) * (y - n / 2);
                double v = Math.pow(1 + r2 / (2 * s * s), -2.5);
                p.set(x, y, 0, (float) v);
                sum += v;
            }
        }
        for (int i = 0; i < p.size(); i++) {
            p.data()[i] /= (float) sum;
        }
        return p;
    }

    /** Poisson counts of the blurred truth plus a background. */
    static Volume record(Volume truth, Volume psf, double background, long seed) {
        try (Workers w = new Workers(1)) {
            Volume blurred = Convolution.convolve(truth, psf, w);
            Volume data = blurred.copy();
            Well19937c rng = new Well19937c(seed);
            for (int i = 0; i < data.size(); i++) {
                data.data()[i] = new PoissonDistribution(rng, Math.max(blurred.data()[i], 0) + background, 1e-12, 10000)
                        .sample();
            }
            return data;
        }
    }
}
