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
 * The table of conditions for the automatic settings, on invented widefield stacks made by two generators independent
 * of {@code simulate} and of each other: {@link #ALL} from {@code tools/reference/make_deconvolution_conditions.py}
 * (its own pupil-function PSF by numpy FFT, specimen and camera noise; files in
 * {@code src/test/resources/reference/conditions/}), {@link #SECOND} from
 * {@code tools/reference/make_born_wolf_conditions.py} (the paraxial Born &amp; Wolf integral by quadrature, another
 * specimen, an sCMOS-like camera with per-pixel gain, read noise and offset; files in
 * {@code src/test/resources/reference/born-wolf-conditions/}). For each condition it runs
 * {@code deconvolve} with its defaults and only the offset given, and the oracle: the same method (accelerated
 * Richardson-Lucy) with the true camera values and background, followed iteration by iteration against the truth
 * (through an iteration listener) for its smallest error. Error: NRMSE after the best scalar gain,
 * min_a ||a x - t|| / ||t|| (common practice; an estimate from a PSF that is not normalised like the truth differs by
 * a scale).
 */
final class ConditionStacks {

    /** One condition: the folder of its generator, a data file, the PSF file given to the deconvolution. */
    record Condition(String set, String name, String data, String psf, String what) {

        /** A condition of the first generator's folder. */
        Condition(String name, String data, String psf, String what) {
            this(FIRST, name, data, psf, what);
        }
    }

    /** What the default run and the oracle gave. */
    record Row(Condition condition, int iterations, double error, String reason, int oracleIterations,
            double oracleError, double seconds, DeconvolutionSettings used, Map<String, Object> record) {

        double ratio() {
            return error / oracleError;
        }

        String line() {
            return String.format(Locale.ROOT, "%-28s default %3d iterations, error %.4f; oracle %3d iterations, error"
                    + " %.4f; ratio %.3f; %.1f s; gain %.3f, read noise %.2f, background %.1f ADU; trial fit excess at"
                    + " the held-out best %.4f, structured %.4f; %s", condition.what(), iterations, error,
                    oracleIterations, oracleError, ratio(), seconds, used.gain(), used.readNoise(), used.background(),
                    fitExcess(), structuredExcess(), reason);
        }

        /** The trial's own fit at the held-out best over what noise explains, minus 1 (NaN when not recorded). */
        double fitExcess() {
            return trialValue("fit_excess_at_best");
        }

        /** The spatially structured part of the trial's misfit ({@link ResidualStructure}; NaN when not recorded). */
        double structuredExcess() {
            return trialValue("structured_excess");
        }

        /** @return a number of the record's stop trial, NaN when it is not there */
        private double trialValue(String key) {
            Object e = trial() == null ? null : trial().get(key);
            return e instanceof Number n ? n.doubleValue() : Double.NaN;
        }

        @SuppressWarnings("unchecked")
        private Map<String, Object> trial() {
            return (Map<String, Object>) ((Map<String, Object>) record.get("settings")).get("stop_trial");
        }

        /** True when the automatic stop took the fit's excess as model error. */
        boolean modelErrorStop() {
            return Boolean.TRUE.equals(trial().get("model_error_stop"));
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

    /** Folder of the first generator's files (under {@code reference/}). */
    static final String FIRST = "conditions";
    /** Folder of the second generator's files. */
    static final String BORN_WOLF = "born-wolf-conditions";

    /**
     * The conditions of the second generator: NA 1.0 water, 600 nm, 52 x 44 x 18 voxels of 0.1 x 0.1 x 0.3 um, gain
     * 1.6 ADU/e- (2% spread), read noise 2.2 ADU rms over pixels, offset 100 ADU (0.7 ADU spread).
     */
    static final List<Condition> SECOND = List.of(
            new Condition(BORN_WOLF, "exact", "base", "true", "exact model"),
            new Condition(BORN_WOLF, "cropped", "base", "cropped60", "PSF cropped to 61% energy"),
            new Condition(BORN_WOLF, "wide", "base", "wide10", "PSF 10% too wide"),
            new Condition(BORN_WOLF, "narrow", "base", "narrow10", "PSF 10% too narrow"),
            new Condition(BORN_WOLF, "gradient", "gradient", "true", "background gradient 4-72 ph"),
            new Condition(BORN_WOLF, "dim", "dim", "true", "dim, peak 25 photons"),
            new Condition(BORN_WOLF, "bright", "bright", "true", "bright, peak 16000 photons"));

    private ConditionStacks() {
    }

    /** @return the condition of that name in the list */
    static Condition named(List<Condition> list, String name) {
        return list.stream().filter(c -> c.name().equals(name)).findFirst().orElseThrow();
    }

    /** Reads a file of the first generator. */
    static Volume read(String name) {
        return read(FIRST, name);
    }

    /** Reads a file of a generator's folder. */
    static Volume read(String set, String name) {
        String dir = "reference/" + set + "/";
        Path p;
        try {
            p = Paths.get(ConditionStacks.class.getResource("/" + dir + name + ".tif").toURI());
        } catch (java.net.URISyntaxException | NullPointerException e) {
            throw new IllegalStateException("missing reference file " + dir + name + ".tif (regenerate with tools/reference/)", e);
        }
        return TiffFiles.read(p, name);
    }

    /** @return the camera truth of a data file of the first generator */
    static double[] truth(String data) {
        return truth(FIRST, data);
    }

    /** @return the camera truth of a data file: gain, read noise, offset, background photons (oracle) */
    static double[] truth(String set, String data) {
        for (String[] row : ReferenceFiles.table(set + "/conditions.txt")) {
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
        Volume data = read(c.set(), c.data());
        Volume psf = read(c.set(), "psf-" + c.psf());
        double[] cam = truth(c.set(), c.data());
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
     * The oracle of a method with the settings a default run used (camera values, background, lambda, acceleration):
     * the smallest error against the truth over a fixed run of max iterations, every iteration compared.
     *
     * @return {best iteration count, its error}
     */
    static double[] methodOracle(Volume data, Volume psf0, DeconvolutionSettings used, Volume truth, int max,
            int threads) {
        return bestIteration(data, psf0, used.camera(), used.background(), used.withStopping(Stopping.fixed(max)).solver(),
                truth, threads);
    }

    /**
     * The oracle: accelerated Richardson-Lucy with the true camera values and background (for the gradient the
     * ramp's minimum: the rest is light the object can take), the same PSF as the default run, every iteration
     * compared with the truth. When the best is at the last iteration the search is run again twice as long (up to
     * 1000 iterations).
     *
     * @return {best iteration count, its error}
     */
    static double[] oracle(Volume data, Volume psf, double[] cam, Volume truth, int max, int threads) {
        double[] best = bestIteration(data, psf, Camera.of(cam[0], cam[2], cam[1]), cam[3] * cam[0],
                new RichardsonLucy(Stopping.fixed(max), true), truth, threads);
        if (best[0] >= max) {
            if (max < 1000) {
                return oracle(data, psf, cam, truth, Math.min(1000, 2 * max), threads);
            }
            throw new IllegalStateException("the oracle's best is at its last iteration " + max + "; search further");
        }
        return best;
    }

    /** @return {iteration, error} of the smallest error against the truth over the solver's run (every iteration) */
    private static double[] bestIteration(Volume data, Volume psf0, Camera camera, double background, Solver solver,
            Volume truth, int threads) {
        Volume psf = PsfChecks.prepare("psf", psf0, data, true, RunContext.quiet(threads)).psf();
        double[] best = {0, Double.POSITIVE_INFINITY};
        try (Workers w = new Workers(threads)) {
            DeconvolutionProblem p = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                    camera, background, w);
            solver.solve(p, RunContext.quiet(threads), new IterationListener() {
                @Override
                public void iteration(int iteration, int maxIterations, double objective, double change) {
                }

                @Override
                public void state(IterationState st) {
                    double e = error(p.toVolume(st.estimate()).data(), truth.data());
                    if (e < best[1]) {
                        best[0] = st.iteration();
                        best[1] = e;
                    }
                }
            });
        }
        return best;
    }
}
