package org.stackwright.refine;

import java.util.List;
import java.util.Locale;

import org.stackwright.model.Camera;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.BeadRefinement;
import org.stackwright.psf.DiffractionPsf;
import org.stackwright.psf.OpticsParameter;
import org.stackwright.psf.PsfSettings;
import org.stackwright.psf.Refinement;
import org.stackwright.solve.Deconvolution;
import org.stackwright.solve.DeconvolutionSettings;
import org.stackwright.solve.IterationListener;
import org.stackwright.solve.StopRule;
import org.stackwright.solve.Stopping;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Benchmark (not a test) of issue 17's parts: psf-refine of the depth on a 6-bead stack (oil into water, 15 um),
 * and depth-variant Richardson-Lucy with 4 and 8 strata against plain Richardson-Lucy with one PSF on the same
 * stack (wall-clock times and their ratios; on a loaded machine compare the ratios). Run:
 * {@code tools/benchmark.sh org.stackwright.refine.RefineBenchmark [threads]}.
 */
public final class RefineBenchmark {

    private RefineBenchmark() {
    }

    public static void main(String[] args) {
        int threads = args.length > 0 ? Integer.parseInt(args[0]) : 2;
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.2);
        PsfSettings truth = PsfSettings.matched(1.3, 520, 1.518, voxel, 41, 41, 45).withSample(1.33, 15);
        Volume beads;
        try (Workers w = new Workers(threads)) {
            beads = sixBeads(truth, w);
        }
        PsfSettings nominal = truth.withSample(1.33, 0).withGrid(voxel, 21, 21, 25);
        long t0 = System.nanoTime();
        Refinement r = BeadRefinement.run(beads, nominal, List.of(OpticsParameter.DEPTH), 50, 100, 2, 1.5,
                BeadRefinement.box(nominal), RunContext.quiet(threads));
        double refine = (System.nanoTime() - t0) / 1e9;
        System.out.printf(Locale.ROOT, "psf-refine, 6 beads %s, fit depth: %.2f s (depth %.3f +/- %.3f um)%n",
                beads.shape(), refine, r.values()[0], r.standardErrors()[0]);

        VoxelSize v = new VoxelSize(0.1, 0.1, 0.3);
        Volume stack = specimen(96, 96, 48, v);
        PsfSettings optics = PsfSettings.matched(1.3, 520, 1.518, v, 1, 1, 1).withSample(1.33, 0);
        DeconvolutionSettings s = DeconvolutionSettings.richardsonLucy(new Stopping(StopRule.FIXED, 20, 1e-3), true)
                .withCamera(0, 5, 1, 0);
        Volume psf;
        try (Workers w = new Workers(threads)) {
            psf = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI).compute(optics.withGrid(v, 33, 33, 27)
                    .withSample(1.33, 7), w);
        }
        RunContext ctx = RunContext.quiet(threads);
        t0 = System.nanoTime();
        Deconvolution.Outcome one = Deconvolution.run(stack, psf, "one depth", null, s, ctx, IterationListener.NONE);
        double plain = (System.nanoTime() - t0) / 1e9;
        System.out.printf(Locale.ROOT, "RL, one PSF 33x33x27 (the size depth-variant chooses), %s, grid %s, %d accelerated "
                + "iterations: %.2f s (solver %.2f s)%n", stack.shape(), one.record().get("grid_shape"),
                one.solution().iterations(), plain, one.solution().seconds());
        for (int k : new int[] {4, 8}) {
            t0 = System.nanoTime();
            Deconvolution.Outcome o = Deconvolution.runDepthVariant(stack, null, s, new Deconvolution.DepthVariant(optics, k),
                    ctx, IterationListener.NONE);
            double t = (System.nanoTime() - t0) / 1e9;
            System.out.printf(Locale.ROOT, "depth-variant RL, %d strata (PSF %s, grid %s), %d iterations: %.2f s (solver "
                    + "%.2f s), %.2f x one PSF (solver %.2f x); memory estimate %.0f MB (one PSF %.0f MB)%n", k,
                    ((java.util.Map<?, ?>) o.record().get("depth_variant")).get("psf_shape"), o.record().get("grid_shape"),
                    o.solution().iterations(), t, o.solution().seconds(), t / plain,
                    o.solution().seconds() / one.solution().seconds(),
                    ((Number) o.record().get("peak_memory_estimate_bytes")).doubleValue() / 1e6,
                    ((Number) one.record().get("peak_memory_estimate_bytes")).doubleValue() / 1e6);
        }
        System.out.println("load average: " + loadAverage());
    }

    private static Volume sixBeads(PsfSettings truth, Workers w) {
        Volume psf = new DiffractionPsf(DiffractionPsf.Kind.GIBSON_LANNI).compute(truth, w);
        int nx = 100;
        int ny = 70;
        int nz = 40;
        float[] mu = new float[nx * ny * nz];
        java.util.Arrays.fill(mu, 20f);
        for (int b = 0; b < 6; b++) {
            int bx = 20 + (b % 3) * 30;
            int by = 20 + (b / 3) * 30;
            for (int z = 0; z < psf.depth(); z++) {
                for (int y = 0; y < psf.height(); y++) {
                    for (int x = 0; x < psf.width(); x++) {
                        int gx = bx + x - psf.width() / 2;
                        int gy = by + y - psf.height() / 2;
                        int gz = 20 + z - psf.depth() / 2;
                        if (gx >= 0 && gy >= 0 && gz >= 0 && gx < nx && gy < ny && gz < nz) {
                            mu[(gz * ny + gy) * nx + gx] += 40000f * psf.get(x, y, z);
                        }
                    }
                }
            }
        }
        return Camera.of(2, 100, 1.5).record(new Volume(nx, ny, nz, mu, truth.voxel()), 5);
    }

    private static Volume specimen(int w, int h, int d, VoxelSize v) {
        float[] t = new float[w * h * d];
        java.util.SplittableRandom r = new java.util.SplittableRandom(4);
        java.util.Arrays.fill(t, 5f);
        for (int b = 0; b < 300; b++) {
            int x = r.nextInt(w);
            int y = r.nextInt(h);
            int z = r.nextInt(d);
            t[(z * h + y) * w + x] += 500f;
        }
        return Camera.photonCounting().record(new Volume(w, h, d, t, v), 3);
    }

    private static String loadAverage() {
        try {
            return java.nio.file.Files.readString(java.nio.file.Path.of("/proc/loadavg")).trim();
        } catch (java.io.IOException e) {
            return "unknown";
        }
    }
}
