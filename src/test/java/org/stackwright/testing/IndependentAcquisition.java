package org.stackwright.testing;

import java.util.HashMap;
import java.util.Map;
import java.util.SplittableRandom;

import org.apache.commons.math3.random.MersenneTwister;
import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.special.Gamma;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * An invented acquisition made apart from the project's own {@code simulate} package, so that automatic decisions
 * (the residual verdict) are tested on data they were not made with. Nothing here calls the project's PSF models,
 * FFT, padding, specimen drawer or camera:
 * <ul>
 * <li><b>PSF formula</b> (our own invention, a widening beam): at defocus k planes the lateral profile is a
 * point-sampled Gaussian of standard deviation s(k) = s0 sqrt(1 + (k / zR)^2) voxels, and the plane holds the
 * share A(k) ~ 1 / (1 + (k / zR)^2)^q of the light: q = 2 (a squared Lorentzian, heavier axial tails than a
 * Gaussian) or q = 1 (a Lorentzian: the slowly fading out-of-focus light of a widefield microscope).
 * The array holds |dx|, |dy| &lt;= halfX and |k| &lt;= halfZ, normalised to unit sum.</li>
 * <li><b>Blur</b>: a direct sum over the PSF planes with separable lateral passes, on a specimen field larger than
 * the view by the PSF half-sizes, so the view receives all the light its PSF reach gives, including light from
 * objects outside the view (exact linear convolution; no FFT).</li>
 * <li><b>Specimens</b>: points, rods and solid ellipsoids placed by {@link SplittableRandom} in one of three
 * layouts ({@link Layout}); a dense layout also has a uniform slab.</li>
 * <li><b>Noise</b>: Poisson counts by inversion from the mode (Devroye, "Non-Uniform Random Variate Generation",
 * Springer 1986, ch. X: the sequential search started at the mode; CDF there from the regularised incomplete
 * gamma function of commons-math3; section from memory), then for a camera gain, Gaussian read noise (Mersenne
 * Twister) and offset. Camera values are not rounded to whole ADU, so the data follow the Poisson-Gaussian model
 * exactly (rounding would add a variance of 1/12 ADU^2 that the model does not hold).</li>
 * </ul>
 */
public final class IndependentAcquisition {

    /** Where the specimen lies relative to the view. */
    public enum Layout {
        /** objects everywhere in the field, so many run past the view's faces (as in every real stack) */
        CROSSING,
        /** a cell inside the view: a dim body with dense objects, at least 2 voxels from every face, zeros around */
        INSIDE,
        /** a dense field of objects on a uniform slab that fills the view and runs past every face */
        FILLING
    }

    /**
     * @param sigma0 lateral standard deviation at focus, voxels
     * @param rayleigh axial range zR, planes
     * @param halfX lateral half-size of the PSF array
     * @param halfZ axial half-size of the PSF array
     * @param axialPower q of the axial share, 1 or 2
     */
    public record Optics(double sigma0, double rayleigh, int halfX, int halfZ, int axialPower) {
        /** @return the same optics with every width scaled (a wrong PSF: NA, wavelength or voxel size off) */
        public Optics scaled(double lateral, double axial) {
            return new Optics(sigma0 * lateral, rayleigh * axial, halfX, halfZ, axialPower);
        }
    }

    /**
     * @param gain ADU per photo-electron
     * @param offset ADU
     * @param readNoise ADU
     * @param counting true for a photon-counting detector: data are the counts (no gain, offset, read noise or
     *     rounding)
     */
    public record Sensor(double gain, double offset, double readNoise, boolean counting) {
        public static Sensor photonCounting() {
            return new Sensor(1, 0, 0, true);
        }

        /** A camera unlike the project's default one: 2.5 ADU per electron, offset 90, read noise 4 ADU. */
        public static Sensor camera() {
            return new Sensor(2.5, 90, 4, false);
        }
    }

    /**
     * @param nx view width
     * @param ny view height
     * @param nz view depth
     * @param layout where the specimen lies
     * @param peakPhotons the brightest blurred specimen voxel in the view, photons (background apart)
     * @param backgroundPhotons uniform background, photons per voxel
     */
    public record Plan(int nx, int ny, int nz, Layout layout, double peakPhotons, double backgroundPhotons,
            Optics optics, Sensor sensor, long seed) {
    }

    /**
     * @param truth the specimen in the view, photons per voxel before blur
     * @param expected blurred specimen in the view, photons, without background
     * @param data camera values, ADU
     * @param psf the PSF array the data were made with
     */
    public record Acquisition(Plan plan, Volume truth, Volume expected, Volume data, Volume psf) {
        /** @return the background in ADU above the offset */
        public double backgroundAdu() {
            return plan.backgroundPhotons() * plan.sensor().gain();
        }

        /** @return the truth in ADU above the offset (what a deconvolution returns) */
        public Volume truthAdu() {
            Volume t = truth.copy();
            float[] d = t.data();
            for (int i = 0; i < d.length; i++) {
                d[i] = (float) (d[i] * plan.sensor().gain());
            }
            return t;
        }
    }

    /** Voxel size given to the volumes (only the calibration; the formulas work in voxels). */
    public static final VoxelSize VOXEL = new VoxelSize(0.1, 0.1, 0.25);

    private IndependentAcquisition() {
    }

    /** @return the PSF array of the optics, unit sum, peak on the centre voxel */
    public static Volume psf(Optics o) {
        int nx = 2 * o.halfX() + 1;
        int nz = 2 * o.halfZ() + 1;
        double[][] lateral = new double[o.halfZ() + 1][];
        double[] share = new double[o.halfZ() + 1];
        double total = 0;
        for (int k = 0; k <= o.halfZ(); k++) {
            lateral[k] = lateral(o, k);
            share[k] = axialShare(o, k);
            total += k == 0 ? share[k] : 2 * share[k];
        }
        float[] p = new float[nx * nx * nz];
        for (int z = 0; z < nz; z++) {
            int k = Math.abs(z - o.halfZ());
            double[] g = lateral[k];
            for (int y = 0; y < nx; y++) {
                for (int x = 0; x < nx; x++) {
                    p[(z * nx + y) * nx + x] = (float) (share[k] / total * g[x] * g[y]);
                }
            }
        }
        return new Volume(nx, nx, nz, p, VOXEL);
    }

    /** @return the point-sampled lateral Gaussian at defocus k, unit sum, length 2 halfX + 1 */
    static double[] lateral(Optics o, int k) {
        double t = k / o.rayleigh();
        double s = o.sigma0() * Math.sqrt(1 + t * t);
        double[] g = new double[2 * o.halfX() + 1];
        double sum = 0;
        for (int i = 0; i < g.length; i++) {
            double d = i - o.halfX();
            g[i] = Math.exp(-d * d / (2 * s * s));
            sum += g[i];
        }
        for (int i = 0; i < g.length; i++) {
            g[i] /= sum;
        }
        return g;
    }

    static double axialShare(Optics o, int k) {
        double t = k / o.rayleigh();
        return Math.pow(1 + t * t, -o.axialPower());
    }

    /**
     * The bright stack the total-variation stop and step tests share: 32 x 32 x 12 crossing filaments, 20000 photons
     * at the peak over 40 of background, the camera sensor, a fixed seed.
     */
    public static Acquisition brightCrossing() {
        return acquire(new Plan(32, 32, 12, Layout.CROSSING, 20000, 40, new Optics(1.3, 2.2, 6, 8, 1),
                Sensor.camera(), 20261205L));
    }

    /** Draws the specimen, blurs it and records it. Deterministic for the plan's seed. */
    public static Acquisition acquire(Plan plan) {
        Optics o = plan.optics();
        int hx = o.halfX();
        int hz = o.halfZ();
        int fx = plan.nx() + 2 * hx;
        int fy = plan.ny() + 2 * hx;
        int fz = plan.nz() + 2 * hz;
        float[] field = specimen(plan, fx, fy, fz);
        double[] blurred = blur(field, fx, fy, fz, plan, o);
        double max = 0;
        for (double v : blurred) {
            max = Math.max(max, v);
        }
        double scale = max > 0 ? plan.peakPhotons() / max : 0;
        int n = plan.nx() * plan.ny() * plan.nz();
        float[] truth = new float[n];
        float[] expected = new float[n];
        for (int z = 0; z < plan.nz(); z++) {
            for (int y = 0; y < plan.ny(); y++) {
                for (int x = 0; x < plan.nx(); x++) {
                    int i = (z * plan.ny() + y) * plan.nx() + x;
                    truth[i] = (float) (scale * field[((z + hz) * fy + y + hx) * fx + x + hx]);
                    expected[i] = (float) (scale * blurred[i]);
                }
            }
        }
        float[] data = record(expected, plan);
        return new Acquisition(plan, new Volume(plan.nx(), plan.ny(), plan.nz(), truth, VOXEL),
                new Volume(plan.nx(), plan.ny(), plan.nz(), expected, VOXEL),
                new Volume(plan.nx(), plan.ny(), plan.nz(), data, VOXEL), psf(o));
    }

    /** Exact linear convolution of the field with the PSF, for the view only. */
    private static double[] blur(float[] f, int fx, int fy, int fz, Plan plan, Optics o) {
        int hx = o.halfX();
        int hz = o.halfZ();
        int nx = plan.nx();
        int ny = plan.ny();
        int nz = plan.nz();
        double total = 0;
        double[] share = new double[hz + 1];
        double[][] g = new double[hz + 1][];
        for (int k = 0; k <= hz; k++) {
            share[k] = axialShare(o, k);
            total += k == 0 ? share[k] : 2 * share[k];
            g[k] = lateral(o, k);
        }
        double[] out = new double[nx * ny * nz];
        Map<Long, double[]> cache = new HashMap<>();
        double[] rows = new double[fy * nx];
        for (int z = 0; z < nz; z++) {
            for (int k = -hz; k <= hz; k++) {
                int zs = z + hz - k;
                int ak = Math.abs(k);
                long key = (long) zs * (hz + 1) + ak;
                double[] plane = cache.get(key);
                if (plane == null) {
                    plane = lateralBlur(f, zs, fx, fy, nx, ny, hx, g[ak], rows);
                    cache.put(key, plane);
                }
                double w = share[ak] / total;
                int o0 = z * nx * ny;
                for (int i = 0; i < plane.length; i++) {
                    out[o0 + i] += w * plane[i];
                }
            }
            // planes that no later output plane needs
            final int zz = z;
            cache.keySet().removeIf(key -> key / (hz + 1) <= zz);
        }
        return out;
    }

    /** Separable lateral blur of field plane zs with kernel g, for the view window only. */
    private static double[] lateralBlur(float[] f, int zs, int fx, int fy, int nx, int ny, int hx, double[] g,
            double[] rows) {
        int base = zs * fx * fy;
        for (int y = 0; y < fy; y++) {
            for (int x = 0; x < nx; x++) {
                double s = 0;
                // output x + hx in the field; taps x + hx - d for d in [-hx, hx]
                for (int t = 0; t < g.length; t++) {
                    s += g[t] * f[base + y * fx + x + 2 * hx - t];
                }
                rows[y * nx + x] = s;
            }
        }
        double[] plane = new double[nx * ny];
        for (int y = 0; y < ny; y++) {
            for (int x = 0; x < nx; x++) {
                double s = 0;
                for (int t = 0; t < g.length; t++) {
                    s += g[t] * rows[(y + 2 * hx - t) * nx + x];
                }
                plane[y * nx + x] = s;
            }
        }
        return plane;
    }

    /** The specimen on the whole field (view plus PSF margins), arbitrary units. */
    static float[] specimen(Plan plan, int fx, int fy, int fz) {
        float[] f = new float[fx * fy * fz];
        SplittableRandom rnd = new SplittableRandom(plan.seed());
        int hx = (fx - plan.nx()) / 2;
        int hz = (fz - plan.nz()) / 2;
        // where objects may be centred: the whole field, or the view less a margin
        double[] lo;
        double[] hi;
        if (plan.layout() == Layout.INSIDE) {
            lo = new double[] {hx + 6, hx + 6, hz + 2};
            hi = new double[] {hx + plan.nx() - 7, hx + plan.ny() - 7, hz + plan.nz() - 3};
        } else {
            lo = new double[] {0, 0, 0};
            hi = new double[] {fx - 1, fy - 1, fz - 1};
        }
        double volume = (hi[0] - lo[0]) * (hi[1] - lo[1]) * Math.max(1, hi[2] - lo[2]);
        int dense = plan.layout() == Layout.CROSSING ? 1 : 3;
        int ellipsoids = dense * Math.max(2, (int) (volume / 9000));
        int rods = dense * Math.max(2, (int) (volume / 7000));
        int points = Math.max(3, (int) (volume / 5000));
        boolean inside = plan.layout() == Layout.INSIDE;
        for (int i = 0; i < ellipsoids; i++) {
            double[] c = at(rnd, lo, hi);
            double rx = 1.5 + 3 * rnd.nextDouble();
            double rz = 1 + 2 * rnd.nextDouble();
            if (inside) {
                rx = Math.min(rx, 4);
                rz = Math.min(rz, 1.5);
            }
            ellipsoid(f, fx, fy, fz, c, rx, rx * (0.7 + 0.6 * rnd.nextDouble()), rz, 0.3 + 0.7 * rnd.nextDouble());
        }
        for (int i = 0; i < rods; i++) {
            double[] a = at(rnd, lo, hi);
            double len = 8 + 20 * rnd.nextDouble();
            double th = Math.PI * rnd.nextDouble();
            double ph = 0.3 * (rnd.nextDouble() - 0.5);
            double[] b = {a[0] + len * Math.cos(th), a[1] + len * Math.sin(th), a[2] + len * ph};
            if (inside) {
                for (int d = 0; d < 3; d++) {
                    b[d] = Math.max(lo[d], Math.min(hi[d], b[d]));
                }
            }
            rod(f, fx, fy, fz, a, b, 0.6 + 0.8 * rnd.nextDouble());
        }
        for (int i = 0; i < points; i++) {
            double[] c = at(rnd, lo, hi);
            int j = index(fx, fy, fz, (int) Math.round(c[0]), (int) Math.round(c[1]), (int) Math.round(c[2]));
            if (j >= 0) {
                f[j] += (float) (3 + 5 * rnd.nextDouble());
            }
        }
        if (plan.layout() == Layout.FILLING) {
            for (int i = 0; i < f.length; i++) {
                f[i] += 0.08f;
            }
        } else if (inside) {
            double[] c = {(lo[0] + hi[0]) / 2, (lo[1] + hi[1]) / 2, (lo[2] + hi[2]) / 2};
            ellipsoid(f, fx, fy, fz, c, (hi[0] - lo[0]) / 2 + 1, (hi[1] - lo[1]) / 2 + 1, (hi[2] - lo[2]) / 2 + 1, 0.08);
        }
        return f;
    }

    private static double[] at(SplittableRandom rnd, double[] lo, double[] hi) {
        return new double[] {lo[0] + (hi[0] - lo[0]) * rnd.nextDouble(), lo[1] + (hi[1] - lo[1]) * rnd.nextDouble(),
            lo[2] + (hi[2] - lo[2]) * rnd.nextDouble()};
    }

    private static int index(int fx, int fy, int fz, int x, int y, int z) {
        return x < 0 || y < 0 || z < 0 || x >= fx || y >= fy || z >= fz ? -1 : (z * fy + y) * fx + x;
    }

    private static void ellipsoid(float[] f, int fx, int fy, int fz, double[] c, double rx, double ry, double rz,
            double level) {
        for (int z = (int) Math.floor(c[2] - rz); z <= Math.ceil(c[2] + rz); z++) {
            for (int y = (int) Math.floor(c[1] - ry); y <= Math.ceil(c[1] + ry); y++) {
                for (int x = (int) Math.floor(c[0] - rx); x <= Math.ceil(c[0] + rx); x++) {
                    double dx = (x - c[0]) / rx;
                    double dy = (y - c[1]) / ry;
                    double dz = (z - c[2]) / rz;
                    int j = index(fx, fy, fz, x, y, z);
                    if (j >= 0 && dx * dx + dy * dy + dz * dz <= 1) {
                        f[j] += (float) level;
                    }
                }
            }
        }
    }

    /** A thin rod from a to b, deposited every quarter voxel with trilinear weights. */
    private static void rod(float[] f, int fx, int fy, int fz, double[] a, double[] b, double level) {
        double len = Math.sqrt(sq(b[0] - a[0]) + sq(b[1] - a[1]) + sq(b[2] - a[2]));
        int steps = Math.max(1, (int) Math.ceil(4 * len));
        for (int s = 0; s <= steps; s++) {
            double t = s / (double) steps;
            double x = a[0] + t * (b[0] - a[0]);
            double y = a[1] + t * (b[1] - a[1]);
            double z = a[2] + t * (b[2] - a[2]);
            int x0 = (int) Math.floor(x);
            int y0 = (int) Math.floor(y);
            int z0 = (int) Math.floor(z);
            for (int c = 0; c < 8; c++) {
                int xi = x0 + (c & 1);
                int yi = y0 + ((c >> 1) & 1);
                int zi = z0 + ((c >> 2) & 1);
                double w = (1 - Math.abs(x - xi)) * (1 - Math.abs(y - yi)) * (1 - Math.abs(z - zi));
                int j = index(fx, fy, fz, xi, yi, zi);
                if (j >= 0) {
                    f[j] += (float) (0.25 * level * w);
                }
            }
        }
    }

    private static double sq(double v) {
        return v * v;
    }

    /** Poisson counts plus the sensor; ADU. */
    private static float[] record(float[] expected, Plan plan) {
        RandomGenerator rng = new MersenneTwister(plan.seed() * 7919 + 13);
        Sensor s = plan.sensor();
        float[] out = new float[expected.length];
        for (int i = 0; i < out.length; i++) {
            double mean = expected[i] + plan.backgroundPhotons();
            long k = poisson(rng, mean);
            if (s.counting()) {
                out[i] = k;
            } else {
                out[i] = (float) (s.gain() * k + s.offset() + s.readNoise() * rng.nextGaussian());
            }
        }
        return out;
    }

    /**
     * Poisson sample by inversion: the CDF at the mode m = floor(mean) from the regularised incomplete gamma
     * function (P(X &lt;= m) = Q(m + 1, mean)), then a walk down or up with p(k - 1) = p(k) k / mean and
     * p(k + 1) = p(k) mean / (k + 1). Exact up to double rounding; about sqrt(mean) steps.
     */
    static long poisson(RandomGenerator rng, double mean) {
        if (!(mean > 0)) {
            return 0;
        }
        long m = (long) Math.floor(mean);
        double pm = Math.exp(-mean + m * Math.log(mean) - Gamma.logGamma(m + 1.0));
        double cdf = Gamma.regularizedGammaQ(m + 1.0, mean);
        double u = rng.nextDouble();
        long k = m;
        double p = pm;
        if (u <= cdf) {
            // walk down: find the smallest k with P(X <= k) >= u
            double c = cdf;
            while (k > 0 && c - p >= u) {
                c -= p;
                p = p * k / mean;
                k--;
            }
            return k;
        }
        double c = cdf;
        while (c < u && p > 0) {
            p = p * mean / (k + 1);
            k++;
            c += p;
        }
        return k;
    }
}
