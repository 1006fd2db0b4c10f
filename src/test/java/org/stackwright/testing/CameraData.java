package org.stackwright.testing;

import org.apache.commons.math3.distribution.GammaDistribution;
import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well44497b;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Invented camera images for the checks of the camera estimates, made independently of {@code model.Camera#record} and
 * of the simulator: its own specimen (smooth blobs on a sloping background, with bright points and lines that are
 * not smooth), its own random numbers (commons-math: Well44497b, and its Poisson and gamma distributions, not the
 * project's {@code model.PoissonSampler}) and three camera types:
 * <ul>
 * <li>CCD-like: gain 1 ADU/e-, read noise 1.5 ADU, offset 100 ADU;</li>
 * <li>sCMOS-like: gain 2.2 ADU/e-, read noise different per pixel (3 ADU times the square root of a gamma variable
 * of mean 1 and shape 4, so the root-mean-square is 3 ADU), offset 100 ADU plus a fixed pattern of 0.5 ADU;</li>
 * <li>EM-like: EM gain 10 ADU/e- applied by a gamma-distributed multiplication register (the output of n electrons
 * is Gamma(n, 10); Basden, Haniff &amp; Mackay, "Photon counting strategies with low-light-level CCDs", MNRAS 345,
 * 2003), read noise 20 ADU, offset 500 ADU. Its excess-noise factor F^2 is 2 (Robbins &amp; Hadwen, IEEE Trans.
 * Electron Devices 50(5), 2003), so the photon-transfer slope is 2 x 10 = 20 ADU/e-.</li>
 * </ul>
 * All values are rounded to whole ADU and clipped to 16 bits, as a camera does.
 */
public final class CameraData {

    /** The three camera types. */
    public enum Kind {
        CCD(1, 1.5, 100, 1), SCMOS(2.2, 3, 100, 1), EM(10, 20, 500, 2);

        public final double gain;
        public final double readNoise;
        public final double offset;
        /** excess-noise factor F^2 */
        public final double excess;

        Kind(double gain, double readNoise, double offset, double excess) {
            this.gain = gain;
            this.readNoise = readNoise;
            this.offset = offset;
            this.excess = excess;
        }

        /** @return the slope of variance against mean level that a photon-transfer fit should find */
        public double transferSlope() {
            return gain * excess;
        }
    }

    private final Kind kind;
    private final RandomGenerator rng;
    private final double[] pixelReadNoise;
    private final double[] pixelOffset;
    private final int w;
    private final int h;

    public CameraData(Kind kind, int w, int h, long seed) {
        this.kind = kind;
        this.w = w;
        this.h = h;
        this.rng = new Well44497b(seed);
        this.pixelReadNoise = new double[w * h];
        this.pixelOffset = new double[w * h];
        GammaDistribution spread = new GammaDistribution(rng, 4, 0.25);
        for (int i = 0; i < w * h; i++) {
            pixelReadNoise[i] = kind == Kind.SCMOS ? kind.readNoise * Math.sqrt(spread.sample()) : kind.readNoise;
            pixelOffset[i] = kind.offset + (kind == Kind.SCMOS ? 0.5 * rng.nextGaussian() : 0);
        }
    }

    /**
     * Expected photo-electrons of the invented specimen: a dark background sloping from 3 to 6 electrons, six smooth
     * blobs in the left 60% of the field (Gaussian, sigma 5 to 10 pixels, peaks 50 to 1500 electrons, for a range of
     * levels; the rest is mostly dark background, where the read noise shows), 20 bright points
     * and 3 thin lines (not smooth; Gaussian sigma 1 pixel, 1.5 planes: as fine as a microscope sampled at about
     * the Nyquist rate shows anything); from plane to plane the blobs and lines drift slowly.
     */
    public static double[] specimen(int w, int h, int d, double brightness, long seed) {
        RandomGenerator r = new Well44497b(seed);
        double[] mu = new double[w * h * d];
        double[][] blobs = new double[6][];
        for (int b = 0; b < blobs.length; b++) {
            blobs[b] = new double[] {0.6 * r.nextDouble() * w, r.nextDouble() * h, 5 + 5 * r.nextDouble(),
                50 + 1450 * r.nextDouble(), r.nextDouble() - 0.5, r.nextDouble() - 0.5};
        }
        double[][] points = new double[20][];
        for (int p = 0; p < points.length; p++) {
            points[p] = new double[] {r.nextDouble() * w, r.nextDouble() * h, r.nextDouble() * d, 500 + 2000 * r.nextDouble()};
        }
        double[][] lines = new double[3][];
        for (int l = 0; l < lines.length; l++) {
            lines[l] = new double[] {r.nextDouble() * w, r.nextDouble() * h, Math.PI * r.nextDouble(), 300};
        }
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double v = 3 + 3.0 * x / w;
                    for (double[] b : blobs) {
                        double dx = x - b[0] - b[4] * z;
                        double dy = y - b[1] - b[5] * z;
                        v += b[3] * Math.exp(-(dx * dx + dy * dy) / (2 * b[2] * b[2]));
                    }
                    for (double[] p : points) {
                        double dd = sq(x - p[0]) + sq(y - p[1]) + sq((z - p[2]) / 1.5);
                        v += p[3] * Math.exp(-dd / 2);
                    }
                    for (double[] l : lines) {
                        double dist = Math.abs(-(x - l[0] - 0.7 * z) * Math.sin(l[2]) + (y - l[1]) * Math.cos(l[2]));
                        v += l[3] * Math.exp(-dist * dist / 2);
                    }
                    mu[(z * h + y) * w + x] = brightness * v;
                }
            }
        }
        return mu;
    }

    private static double sq(double v) {
        return v * v;
    }

    /** One camera image of the expected electrons (planes of w x h), ADU. */
    public Volume record(double[] electrons, int d) {
        float[] out = new float[electrons.length];
        for (int i = 0; i < out.length; i++) {
            out[i] = adu(electrons[i], i % (w * h));
        }
        return new Volume(w, h, d, out, new VoxelSize(0.1, 0.1, 0.3));
    }

    /** n dark frames (no light). */
    public Volume dark(int n) {
        return record(new double[w * h * n], n);
    }

    /**
     * Flat frames: {@code perLevel} frames at each of the given mean electron levels, in order, with a fixed
     * pixel-to-pixel sensitivity pattern of 1% (which pairs of frames at one level cancel).
     */
    public Volume flats(double[] levels, int perLevel) {
        double[] prnu = new double[w * h];
        for (int i = 0; i < prnu.length; i++) {
            prnu[i] = 1 + 0.01 * rng.nextGaussian();
        }
        int n = levels.length * perLevel;
        double[] mu = new double[w * h * n];
        for (int f = 0; f < n; f++) {
            for (int i = 0; i < w * h; i++) {
                mu[f * w * h + i] = levels[f / perLevel] * prnu[i];
            }
        }
        return record(mu, n);
    }

    private float adu(double electrons, int pixel) {
        long n = electrons > 0 ? poisson(electrons) : 0;
        double signal;
        if (kind == Kind.EM) {
            signal = n > 0 ? gamma(n) * kind.gain : 0;
        } else {
            signal = kind.gain * n;
        }
        double v = signal + pixelOffset[pixel] + pixelReadNoise[pixel] * rng.nextGaussian();
        return (float) Math.min(65535, Math.max(0, Math.rint(v)));
    }

    /** A Poisson count of the given mean (commons-math). */
    private long poisson(double lam) {
        return new PoissonDistribution(rng, lam, PoissonDistribution.DEFAULT_EPSILON,
                PoissonDistribution.DEFAULT_MAX_ITERATIONS).sample();
    }

    /** A gamma variable of integer shape n (at least 1) and scale 1 (commons-math). */
    private double gamma(long n) {
        return new GammaDistribution(rng, n, 1).sample();
    }
}
