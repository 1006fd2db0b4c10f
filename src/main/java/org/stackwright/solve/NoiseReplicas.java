package org.stackwright.solve;

import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;

import org.apache.commons.math3.random.Well19937c;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.model.Camera;
import org.stackwright.volume.Volume;

/**
 * How much the deconvolved estimate would change under new noise: a parametric bootstrap (Efron &amp;
 * Tibshirani, "An Introduction to the Bootstrap", Chapman &amp; Hall, 1993, sec. 6.5, the parametric bootstrap; section number from memory).
 *
 * <p>After a deconvolution with estimate x^, R new data sets are drawn from the fitted forward model
 * mu = A x^ + background (+ offset) through the same noise model, and each is deconvolved with the same settings:
 * the same method, lambda, camera, boundary and mask, and exactly the number of iterations the original run used
 * (a fixed count, not the stopping rule again, so that the spread reflects noise rather than a different stop).
 * With {@code background auto} each replica estimates its own background, as the original run did; the model
 * uses the background the original run used.
 * Per voxel, the sample standard deviation across the R replica estimates (divisor R - 1) is the spread; the
 * replica mean minus x^ is a bias indicator (how far the method pulls its answer from the model it started from).
 *
 * <p>Noise models: {@link Noise#CAMERA} draws gain * Poisson(mu / gain) + offset + N(0, read noise^2) through
 * {@link Camera#record} (Poisson for gain 1 and read noise 0); {@link Noise#GAUSSIAN} draws mu + offset +
 * N(0, read noise^2), additive Gaussian noise of constant standard deviation.
 *
 * <p><b>What it does not capture.</b> The spread is the variability due to photon and camera noise at this
 * estimate, under this model. It says nothing about a wrong PSF, a wrong camera or background model, or other
 * model error, and nothing about the bias of the method (regularisation, early stopping): a small spread does not
 * mean the estimate is right. Use the residual view ({@code residuals}) for model error.
 *
 * <p>Cost: R more deconvolutions. Deterministic: replica r uses the seed {@code seed + r}; the accumulation runs
 * in replica order, so results are bit-identical for a seed and any thread count (as are the solvers).
 */
public final class NoiseReplicas {

    /** Largest number of replicas allowed. */
    public static final int MAX_REPLICAS = 100;

    /** Voxels count as bright for {@code spread_relative_median} where the estimate is at least this fraction of its maximum. */
    static final double BRIGHT_FRACTION = 0.1;

    /** How replica data are drawn from the fitted model. */
    public enum Noise {
        /** Poisson photon noise with gain, plus Gaussian read noise (Poisson-Gaussian camera) */
        CAMERA,
        /** additive Gaussian noise with the read noise as standard deviation */
        GAUSSIAN
    }

    /**
     * @param spread per-voxel standard deviation across replicas, ADU, same calibration as the data
     * @param bias per-voxel replica mean minus the estimate, ADU
     * @param replicas R
     * @param spreadMedian median of the spread over all voxels
     * @param relativeMedian median of spread / estimate over bright voxels (estimate at least 10% of its maximum)
     */
    public record Spread(Volume spread, Volume bias, int replicas, double spreadMedian, double relativeMedian) {

        /** @return the run-record entries: replicas, spread_median, spread_relative_median, ... */
        public Map<String, Object> record(Noise noise, long seed) {
            Map<String, Object> r = new LinkedHashMap<>();
            r.put("replicas", replicas);
            r.put("replica_noise", noise.name().toLowerCase(java.util.Locale.ROOT));
            r.put("replica_seed", seed);
            r.put("spread_median", spreadMedian);
            r.put("spread_relative_median", relativeMedian);
            r.put("spread_note", "standard deviation over noise replicas of the fitted model (parametric bootstrap):"
                    + " photon and camera noise only, not PSF or model error, not bias");
            return r;
        }
    }

    private NoiseReplicas() {
    }

    /**
     * Runs R replicas of a finished deconvolution.
     *
     * @param data the data the original run saw (for the mask union with non-finite pixels and the calibration), not modified
     * @param psf the PSF as given to the original run, not modified
     * @param mask the mask given to the original run, or null
     * @param s the settings the original run used, resolved ({@link Deconvolution.Outcome#settings})
     * @param original the original outcome, with its forward model ({@link #deconvolveWithModel})
     * @param replicas R, at least 2 (the door allows up to {@link #MAX_REPLICAS})
     * @param noise how replica data are drawn
     * @param seed random seed
     * @param ctx threads, progress, cancel (replica runs' own warnings are not repeated)
     */
    public static Spread run(Volume data, Volume psf, byte[] mask, DeconvolutionSettings s,
            Deconvolution.Outcome original, int replicas, Noise noise, long seed, RunContext ctx) {
        if (replicas < 2) {
            throw new IllegalArgumentException(countMessage(replicas));
        }
        checkNoise(noise, s);
        if (original.model() == null) {
            throw new IllegalArgumentException("the original run has no forward model; run it with deconvolveWithModel");
        }
        int n = data.size();
        // Welford sums (2 doubles), replica data, model photons, spread and bias outputs
        MemoryCheck.require("noise replicas of " + data.shape(), (long) n * (2L * Double.BYTES + 4L * Float.BYTES));
        DeconvolutionSettings fixed = s.withStopping(Stopping.fixed(Math.max(1, original.solution().iterations())));
        Volume model = original.model();
        float[] est = original.result().data();
        double[] mean = new double[n];
        double[] m2 = new double[n];
        Volume photons = model.withData(scaled(model.data(), 1.0 / s.gain()));
        Camera camera = s.camera();
        RunContext quiet = new RunContext(ctx.threads(), null, null, ctx::isCancelled).withFft(ctx.fft());
        try (Workers workers = new Workers(ctx.threads())) {
            for (int r = 0; r < replicas; r++) {
                ctx.checkCancelled();
                ctx.progress((double) r / replicas, "noise replica " + (r + 1) + " of " + replicas);
                Volume replica = noise == Noise.CAMERA ? camera.record(photons, seed + r)
                        : gaussian(model, s.offset(), s.readNoise(), seed + r);
                keepNonFinite(data.data(), replica.data());
                float[] x = Deconvolution.run(replica, psf, "replica", mask, fixed, quiet,
                        IterationListener.NONE).result().data();
                final int count = r + 1;
                workers.forRange(n, (from, to) -> {
                    for (int i = from; i < to; i++) {
                        double delta = x[i] - mean[i];
                        mean[i] += delta / count;
                        m2[i] += delta * (x[i] - mean[i]);
                    }
                });
            }
        }
        ctx.progress(1, "noise replicas done");
        float[] sd = new float[n];
        float[] bias = new float[n];
        for (int i = 0; i < n; i++) {
            sd[i] = (float) Math.sqrt(m2[i] / (replicas - 1));
            bias[i] = (float) (mean[i] - est[i]);
        }
        return new Spread(data.withData(sd), data.withData(bias), replicas, median(sd, n), relativeMedian(sd, est));
    }

    /**
     * Deconvolves and keeps the fitted forward model, for {@link #run}. Same as {@link Deconvolution#run} otherwise.
     */
    public static Deconvolution.Outcome deconvolveWithModel(Volume data, Volume psf, String psfName, byte[] mask,
            DeconvolutionSettings s, RunContext ctx, IterationListener listener) {
        return deconvolveWithModel(data, psf, psfName, mask, s, null, null, ctx, listener);
    }

    /** As above, with dark and/or flat frames for the camera values (each may be null). */
    public static Deconvolution.Outcome deconvolveWithModel(Volume data, Volume psf, String psfName, byte[] mask,
            DeconvolutionSettings s, Volume dark, Volume flat, RunContext ctx, IterationListener listener) {
        return Deconvolution.run(data, psf, psfName, mask, s, dark, flat, ctx, listener, true);
    }

    /**
     * Checks the number of replicas (2 to {@link #MAX_REPLICAS}, the door's range) and the noise model before any work.
     *
     * @throws IllegalArgumentException naming {@code replicas} or {@code read-noise}
     */
    public static void check(int replicas, Noise noise, DeconvolutionSettings s) {
        if (replicas < 2 || replicas > MAX_REPLICAS) {
            throw new IllegalArgumentException(countMessage(replicas));
        }
        checkNoise(noise, s);
    }

    private static String countMessage(int replicas) {
        return "replicas = " + replicas + " is not allowed; give 0 (off) or 2 to " + MAX_REPLICAS
                + " (a standard deviation needs at least 2)";
    }

    /** A read noise still to be estimated (NaN) is checked again by {@link #run} with the resolved settings. */
    private static void checkNoise(Noise noise, DeconvolutionSettings s) {
        if (noise == Noise.GAUSSIAN && !(s.readNoise() > 0) && !Double.isNaN(s.readNoise())) {
            throw new IllegalArgumentException("read-noise = " + s.readNoise() + " is not allowed with likelihood gaussian and "
                    + "replicas: the replicas' Gaussian noise has the read noise as standard deviation; give a positive read-noise");
        }
    }

    private static Volume gaussian(Volume model, double offset, double sigma, long seed) {
        Well19937c rng = new Well19937c(seed);
        float[] m = model.data();
        float[] out = new float[m.length];
        for (int i = 0; i < m.length; i++) {
            out[i] = (float) (m[i] + offset + sigma * rng.nextGaussian());
        }
        return model.withData(out);
    }

    private static float[] scaled(float[] a, double f) {
        float[] o = new float[a.length];
        for (int i = 0; i < a.length; i++) {
            o[i] = (float) (a[i] * f);
        }
        return o;
    }

    /** Median of spread / estimate over voxels whose estimate is at least {@link #BRIGHT_FRACTION} of its maximum. */
    static double relativeMedian(float[] sd, float[] est) {
        float max = 0;
        for (float e : est) {
            max = Math.max(max, e);
        }
        if (!(max > 0)) {
            return Double.NaN;
        }
        float[] rel = new float[sd.length];
        int k = 0;
        for (int i = 0; i < sd.length; i++) {
            if (est[i] >= BRIGHT_FRACTION * max) {
                rel[k++] = sd[i] / est[i];
            }
        }
        return median(rel, k);
    }

    /**
     * Pixels the original run masked because they were NaN or infinite stay so in the replicas, so that every
     * replica run masks the same pixels.
     */
    private static void keepNonFinite(float[] data, float[] replica) {
        for (int i = 0; i < data.length; i++) {
            if (!Float.isFinite(data[i])) {
                replica[i] = Float.NaN;
            }
        }
    }

    /** @return the median of the first {@code len} values, NaN when len is 0 */
    private static double median(float[] v, int len) {
        if (len == 0) {
            return Double.NaN;
        }
        float[] c = Arrays.copyOf(v, len);
        Arrays.sort(c);
        return len % 2 == 1 ? c[len / 2] : 0.5 * (c[len / 2 - 1] + c[len / 2]);
    }
}
