package org.stackwright.solve;

import java.util.Locale;

import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.Volume;

/**
 * For the deconvolution benchmark (not a test): the error after each of the first iterations of accelerated
 * Richardson-Lucy on the demo stack from three first estimates: the flat mean of (y - b) over the object's support
 * (ours, {@link DeconvolutionProblem#initialEstimate}), the data themselves (y - b, at least 1e-3, on the image
 * window; the flat mean in the padding), and the data blurred once by the PSF (one blur more). Fewer iterations to a
 * given error would shorten a short run; the blur of the third costs about half an iteration.
 */
final class DemoStarts {

    private DemoStarts() {
    }

    /** Prints the NRMSE after 1 to {@code iterations} iterations from each start. */
    static void print(Volume data, Volume psf, Volume truth, Camera camera, double background, int iterations,
            int threads) {
        RunContext ctx = RunContext.quiet(threads);
        Volume p = PsfChecks.prepare("psf", psf, data, true, ctx).psf();
        try (Workers w = new Workers(threads)) {
            DeconvolutionProblem problem = new DeconvolutionProblem(data, p, null, DeconvolutionProblem.Boundary.EXTENDED,
                    camera, background, w, ctx.fft());
            for (String start : new String[] {"flat mean (ours)", "the data", "the data blurred once"}) {
                StringBuilder b = new StringBuilder();
                for (int k = 1; k <= iterations; k++) {
                    float[] x = start(problem, start);
                    Solution s = new RichardsonLucy(Stopping.fixed(k), true).solve(problem, x, ctx, IterationListener.NONE);
                    b.append(String.format(Locale.ROOT, " %d:%.4f", k, Nrmse.of(problem.toVolume(s.estimate()).data(),
                            truth.data())));
                }
                System.out.printf(Locale.ROOT, "  start %-22s NRMSE after k iterations:%s%n", start, b);
            }
        }
    }

    private static float[] start(DeconvolutionProblem problem, String start) {
        float[] x = new float[problem.gridLength()];
        problem.initialEstimate(x);
        if (start.startsWith("flat")) {
            return x;
        }
        float[] y = problem.dataOnGrid();
        float[] norm = problem.normalisation();
        float bg = problem.background();
        for (int i = 0; i < x.length; i++) {
            if (norm[i] > 0 && y[i] >= 0) {
                x[i] = Math.max(y[i] - bg, 1e-3f);
            }
        }
        if (start.endsWith("blurred once")) {
            float[] blurred = new float[x.length];
            problem.blur().apply(x, blurred);
            for (int i = 0; i < x.length; i++) {
                if (norm[i] > 0 && y[i] >= 0) {
                    x[i] = Math.max(blurred[i], 1e-3f);
                }
            }
        }
        return x;
    }
}
