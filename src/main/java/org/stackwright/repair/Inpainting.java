package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Mask-based inpainting of a 2D image or a stack: fills the masked pixels from the trusted ones by one of four
 * methods, per slice or as one 3D problem with calibrated anisotropy. Trusted pixels are copied unchanged (bit
 * for bit); the outcome also holds the mask of every pixel that was filled, so that measurements can exclude
 * those estimated values.
 */
public final class Inpainting {

    /** Fill methods. */
    public enum Method {
        /** Laplace equation inside the mask ({@link HarmonicFill}) */
        HARMONIC("harmonic"),
        /** bi-Laplace equation ({@link BiharmonicFill}) */
        BIHARMONIC("biharmonic"),
        /** least total variation ({@link TotalVariationFill}) */
        TOTAL_VARIATION("total-variation"),
        /** median of the known neighbours, layer by layer ({@link MedianFill}) */
        MEDIAN("median");

        private final String word;

        Method(String word) {
            this.word = word;
        }

        /** @return the CLI word */
        public String word() {
            return word;
        }

        /** @return the method for a CLI word */
        public static Method of(String word) {
            for (Method m : values()) {
                if (m.word.equals(word)) {
                    return m;
                }
            }
            throw new IllegalArgumentException("method = '" + word + "' is not allowed; choose one of harmonic, "
                    + "biharmonic, total-variation, median");
        }
    }

    /** How a stack is treated: each slice on its own, or as one volume. */
    public enum Mode {
        SLICES, VOLUME;

        /** @return the mode for a CLI word (slices, volume) */
        public static Mode of(String word) {
            return switch (word) {
                case "slices" -> SLICES;
                case "volume" -> VOLUME;
                default -> throw new IllegalArgumentException("mode = '" + word + "' is not allowed; choose slices or volume");
            };
        }
    }

    /**
     * How the harmonic and biharmonic systems are solved: conjugate gradients with a diagonal preconditioner
     * (cheap per iteration, iterations growing with the hole size) or with a multigrid V-cycle ({@link Multigrid}:
     * dearer per iteration, iterations almost independent of the hole size). Both stop at the same relative
     * residual, so they give the same fill to the tolerance.
     */
    public enum Solver {
        /** multigrid when some masked pixel lies deeper than {@link #DEEP} pixels inside the mask */
        AUTO,
        /** diagonal preconditioner (the reference) */
        CONJUGATE_GRADIENT,
        /** multigrid preconditioner */
        MULTIGRID;

        /**
         * Holes deeper than this (pixels from an unknown to the nearest known pixel) are filled with multigrid by
         * {@link #AUTO}. Measured (RepairBenchmark): thin seams and scattered pixels (depth 1 to 3) converge in 5
         * to 100 diagonal-CG iterations that cost less than one V-cycle over the mask's bounding box, while a
         * 64-pixel-deep hole needs thousands.
         */
        public static final int DEEP = 8;

        /** @return whether to use multigrid for a mask whose deepest pixel is depth steps from a known pixel */
        boolean multigrid(int depth) {
            return this == MULTIGRID || (this == AUTO && depth > DEEP);
        }
    }

    /**
     * @param method fill method
     * @param mode slices or volume (ignored for a single plane)
     * @param tolerance conjugate gradient: relative residual; total variation: largest change per iteration
     *     relative to the data range
     * @param maxIterations largest number of solver iterations (per slice in slice mode)
     * @param solver harmonic and biharmonic: the preconditioner of the conjugate gradients
     */
    public record Settings(Method method, Mode mode, double tolerance, int maxIterations, Solver solver) {

        /** Settings with the automatic choice of solver. */
        public Settings(Method method, Mode mode, double tolerance, int maxIterations) {
            this(method, mode, tolerance, maxIterations, Solver.AUTO);
        }

        public Settings {
            if (solver == null) {
                throw new IllegalArgumentException("solver: give AUTO, CONJUGATE_GRADIENT or MULTIGRID");
            }
            if (!(tolerance > 0) || tolerance >= 1) {
                throw new IllegalArgumentException("tolerance = " + tolerance + " is not allowed; give a number in (0, 1)");
            }
            if (maxIterations < 1) {
                throw new IllegalArgumentException("iterations = " + maxIterations + " is not allowed; give at least 1");
            }
        }

        /** Defaults for a method: CG to 1e-7 relative residual; TV to changes below 1e-5 of the range. */
        public static Settings of(Method method, Mode mode) {
            return method == Method.TOTAL_VARIATION ? new Settings(method, mode, 1e-5, 3000)
                    : new Settings(method, mode, 1e-7, 20_000);
        }
    }

    /**
     * @param filled the repaired image: trusted pixels as given, masked pixels estimated
     * @param filledMask 255 at every pixel that was filled (image size), 0 elsewhere
     * @param filledCount number of filled pixels
     * @param iterations largest solver iteration count over the problems solved
     * @param converged whether every solve met its stopping rule
     * @param notes remarks for the user (non-finite pixels added to the mask, solves that did not converge)
     */
    public record Outcome(Volume filled, byte[] filledMask, int filledCount, int iterations, boolean converged,
            List<String> notes) {
    }

    private Inpainting() {
    }

    /**
     * Fills the masked pixels.
     *
     * @param image the image, not modified
     * @param mask nonzero = fill; one plane (used for every slice) or as many slices as the image; not modified
     * @throws IllegalArgumentException naming "mask" when its size does not fit or it leaves nothing to fill from
     */
    public static Outcome run(Volume image, Volume mask, Settings settings, Workers workers) {
        int w = image.width();
        int h = image.height();
        int d = image.depth();
        if (mask.width() != w || mask.height() != h || (mask.depth() != 1 && mask.depth() != d)) {
            throw new IllegalArgumentException("mask is " + mask.shape() + " but the image is " + image.shape()
                    + "; give a mask of the image's width and height with 1 or " + d + " slices");
        }
        float[] f = image.data();
        float[] m = mask.data();
        int plane = w * h;
        boolean[] fill = new boolean[f.length];
        List<String> notes = new ArrayList<>();
        int nonFinite = 0;
        for (int i = 0; i < f.length; i++) {
            boolean masked = m[mask.depth() == 1 ? i % plane : i] != 0;
            if (!masked && !Float.isFinite(f[i])) {
                nonFinite++;
                masked = true;
            }
            fill[i] = masked;
        }
        if (nonFinite > 0) {
            notes.add("input: " + nonFinite + " NaN or infinite pixels outside the mask were treated as untrusted and"
                    + " filled too (they are in the filled mask)");
        }
        boolean volume = settings.mode() == Mode.VOLUME && d > 1;
        checkCoverage(fill, plane, d, volume);
        float[] out = f.clone();
        double[] spacing = {image.voxel().x(), image.voxel().y(), image.voxel().z()};
        int[] iterations = new int[volume ? 1 : d];
        boolean[] ok = new boolean[iterations.length];
        if (volume) {
            solve(f, fill, w, h, d, spacing, settings, workers, out, iterations, ok, 0);
        } else if (d == 1) {
            solve(f, fill, w, h, 1, spacing, settings, workers, out, iterations, ok, 0);
        } else {
            // each slice is solved on one thread; the slices run in parallel
            try (Workers single = new Workers(1)) {
                workers.forRange(d, (z0, z1) -> {
                    for (int z = z0; z < z1; z++) {
                        float[] fz = slice(f, z, plane);
                        boolean[] mz = new boolean[plane];
                        System.arraycopy(fill, z * plane, mz, 0, plane);
                        float[] oz = fz.clone();
                        solve(fz, mz, w, h, 1, spacing, settings, single, oz, iterations, ok, z);
                        for (int p = 0; p < plane; p++) {
                            if (mz[p]) {
                                out[z * plane + p] = oz[p];
                            }
                        }
                    }
                });
            }
        }
        byte[] filledMask = new byte[f.length];
        int count = 0;
        for (int i = 0; i < f.length; i++) {
            if (fill[i]) {
                filledMask[i] = (byte) 255;
                count++;
            }
        }
        int maxIt = 0;
        boolean allOk = true;
        for (int k = 0; k < iterations.length; k++) {
            maxIt = Math.max(maxIt, iterations[k]);
            allOk &= ok[k];
        }
        if (!allOk) {
            notes.add(String.format(Locale.ROOT, "the %s solver stopped at %d iterations before reaching its "
                    + "tolerance; the fill is approximate", settings.method().word(), settings.maxIterations()));
        }
        return new Outcome(image.withData(out), filledMask, count, maxIt, allOk, notes);
    }

    private static float[] slice(float[] f, int z, int plane) {
        float[] s = new float[plane];
        System.arraycopy(f, z * plane, s, 0, plane);
        return s;
    }

    private static void checkCoverage(boolean[] fill, int plane, int d, boolean volume) {
        int[] perSlice = new int[d];
        int total = 0;
        for (int i = 0; i < fill.length; i++) {
            if (fill[i]) {
                perSlice[i / plane]++;
                total++;
            }
        }
        if (total == fill.length) {
            throw new IllegalArgumentException("mask covers every pixel of the image: nothing is left to fill from; "
                    + "give a mask that keeps some pixels trusted (0)");
        }
        if (!volume) {
            for (int z = 0; z < d; z++) {
                if (perSlice[z] == plane) {
                    throw new IllegalArgumentException("mask covers every pixel of slice " + (z + 1) + " of " + d
                            + ": nothing in that slice to fill from; use mode volume or a mask that keeps some "
                            + "pixels of each slice");
                }
            }
        }
    }

    /** Solves one problem (a plane or the volume) and writes filled pixels into out. */
    private static void solve(float[] f, boolean[] fill, int w, int h, int d, double[] spacing, Settings s,
            Workers workers, float[] out, int[] iterations, boolean[] ok, int slot) {
        boolean any = false;
        for (boolean b : fill) {
            if (b) {
                any = true;
                break;
            }
        }
        if (!any) {
            ok[slot] = true;
            return;
        }
        switch (s.method()) {
            case MEDIAN -> {
                iterations[slot] = MedianFill.fill(f, fill, w, h, d, spacing, out);
                ok[slot] = true;
            }
            case HARMONIC, BIHARMONIC -> {
                MaskedGrid g = new MaskedGrid(w, h, d, spacing, fill);
                ConjugateGradient.Outcome o = s.method() == Method.HARMONIC
                        ? HarmonicFill.fill(f, g, s.tolerance(), s.maxIterations(), s.solver(), workers, out)
                        : BiharmonicFill.fill(f, g, s.tolerance(), s.maxIterations(), s.solver(), workers, out);
                iterations[slot] = o.iterations();
                ok[slot] = o.converged();
            }
            case TOTAL_VARIATION -> {
                MaskedGrid g = new MaskedGrid(w, h, d, spacing, fill);
                float[] start = f.clone();
                ConjugateGradient.Outcome o = HarmonicFill.fill(f, g, 1e-6, 20_000, s.solver(), workers, start);
                TotalVariationFill.Outcome t = TotalVariationFill.fill(f, fill, w, h, d, spacing, start,
                        s.tolerance(), s.maxIterations(), out);
                iterations[slot] = t.iterations();
                ok[slot] = t.converged() && o.converged();
            }
            default -> throw new IllegalStateException("unknown method " + s.method());
        }
    }
}
