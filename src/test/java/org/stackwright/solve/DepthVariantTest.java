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
}
