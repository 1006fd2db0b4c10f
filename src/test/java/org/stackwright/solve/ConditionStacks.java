package org.stackwright.solve;

import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.PsfChecks;
import org.stackwright.testing.ReferenceFiles;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * The table of conditions for the automatic settings, on invented widefield stacks made by an independent generator
 * ({@code tools/reference/make_deconvolution_conditions.py}: its own pupil-function PSF by numpy FFT, specimen and
 * camera noise; files in {@code src/test/resources/reference/conditions/}). For each condition it runs
 * {@code deconvolve} with its defaults and only the offset given, and the oracle: the same method (accelerated
 * Richardson-Lucy) with the true camera values and background, followed iteration by iteration against the truth
 * (through an iteration listener) for its smallest error. Error: NRMSE after the best scalar gain,
 * min_a ||a x - t|| / ||t|| (common practice; an estimate from a PSF that is not normalised like the truth differs by
 * a scale).
 */
final class ConditionStacks {

    /** One condition: a data file, the PSF file given to the deconvolution. */
    record Condition(String name, String data, String psf, String what) {
    }

    /** What the default run and the oracle gave. */
    record Row(Condition condition, int iterations, double error, String reason, int oracleIterations,
            double oracleError, double seconds, DeconvolutionSettings used, Map<String, Object> record) {

        double ratio() {
            return error / oracleError;
        }

        String line() {
            return String.format(Locale.ROOT, "%-28s default %3d iterations, error %.4f; oracle %3d iterations, error"
                    + " %.4f; ratio %.3f; %.1f s; gain %.3f, read noise %.2f, background %.1f ADU; %s",
                    condition.what(), iterations, error, oracleIterations, oracleError, ratio(), seconds, used.gain(),
                    used.readNoise(), used.background(), reason);
        }
    }

    static final List<Condition> ALL = List.of(
            new Condition("exact", "base", "true", "exact model"),
            new Condition("cropped", "base", "cropped60", "PSF cropped to 61% energy"),
            new Condition("wide", "base", "wide10", "PSF 10% too wide"),
            new Condition("narrow", "base", "narrow10", "PSF 10% too narrow"),
            new Condition("read-noise", "readnoise", "true", "read noise not given (6 ADU)"),
            new Condition("gradient", "gradient", "true", "background gradient 5-90 ph"),
            new Condition("dim", "dim", "true", "dim, peak 30 photons"),
            new Condition("bright", "bright", "true", "bright, peak 20000 photons"));

    private static final String DIR = "reference/conditions/";

    private ConditionStacks() {
    }

    static Volume read(String name) {
        Path p;
        try {
            p = Paths.get(ConditionStacks.class.getResource("/" + DIR + name + ".tif").toURI());
        } catch (java.net.URISyntaxException | NullPointerException e) {
            throw new IllegalStateException("missing reference file " + DIR + name + ".tif (regenerate with tools/reference/)", e);
        }
        return TiffFiles.read(p, name);
    }

    /** @return the camera truth of a data file: gain, read noise, offset, background photons (oracle) */
    static double[] truth(String data) {
        for (String[] row : ReferenceFiles.table("conditions/conditions.txt")) {
            if (row[0].equals(data)) {
                return new double[] {Double.parseDouble(row[1]), Double.parseDouble(row[2]), Double.parseDouble(row[3]),
                    Double.parseDouble(row[4])};
            }
        }
        throw new IllegalStateException("no condition " + data + " in conditions.txt");
    }

    /** NRMSE after the best scalar gain. */
    static double error(float[] x, float[] t) {
        double xt = 0;
        double xx = 0;
        double tt = 0;
        for (int i = 0; i < x.length; i++) {
            xt += (double) x[i] * t[i];
            xx += (double) x[i] * x[i];
            tt += (double) t[i] * t[i];
        }
        double a = xx > 0 ? xt / xx : 0;
        return Math.sqrt(Math.max(0, tt - 2 * a * xt + a * a * xx) / tt);
    }

    /** The deconvolve operation's defaults with only the offset given. */
    static DeconvolutionSettings defaults(double offset) {
        Map<String, String> raw = new HashMap<>();
        raw.put("offset", Double.toString(offset));
        return DeconvolveOperation.settings(Values.parse("deconvolve", new DeconvolveOperation().params(), raw));
    }

    /** Runs the default and the oracle for one condition. */
    static Row run(Condition c, Volume truth, int threads) {
        Volume data = read(c.data());
        Volume psf = read("psf-" + c.psf());
        double[] cam = truth(c.data());
        long t0 = System.nanoTime();
        Deconvolution.Outcome o = Deconvolution.run(data, psf, c.psf(), null, defaults(cam[2]), RunContext.quiet(threads),
                IterationListener.NONE);
        double seconds = (System.nanoTime() - t0) * 1e-9;
        int k = o.solution().iterations();
        double[] oracle = oracle(data, psf, cam, truth, Math.min(700, 2 * k + 20), threads);
        return new Row(c, k, error(o.result().data(), truth.data()), o.solution().stopReason(), (int) oracle[0],
                oracle[1], seconds, o.settings(), o.record());
    }

    /**
     * The oracle: accelerated Richardson-Lucy with the true camera values and background (for the gradient the
     * ramp's minimum: the rest is light the object can take), the same PSF as the default run, every iteration
     * compared with the truth.
     *
     * @return {best iteration count, its error}
     */
    static double[] oracle(Volume data, Volume psf, double[] cam, Volume truth, int max, int threads) {
        Volume p = PsfChecks.prepare("psf", psf, data, true, RunContext.quiet(threads)).psf();
        double[] best = {0, Double.POSITIVE_INFINITY};
        try (Workers w = new Workers(threads)) {
            DeconvolutionProblem problem = new DeconvolutionProblem(data, p, null, DeconvolutionProblem.Boundary.EXTENDED,
                    Camera.of(cam[0], cam[2], cam[1]), cam[3] * cam[0], w);
            new RichardsonLucy(Stopping.fixed(max), true).solve(problem, RunContext.quiet(threads), new IterationListener() {
                @Override
                public void iteration(int iteration, int maxIterations, double objective, double change) {
                }

                @Override
                public void state(IterationState s) {
                    double e = error(problem.toVolume(s.estimate()).data(), truth.data());
                    if (e < best[1]) {
                        best[0] = s.iteration();
                        best[1] = e;
                    }
                }
            });
        }
        if (best[0] >= max) {
            throw new IllegalStateException("the oracle's best is at its last iteration " + max + "; search further");
        }
        return best;
    }
}
