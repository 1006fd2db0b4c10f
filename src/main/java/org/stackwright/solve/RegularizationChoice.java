package org.stackwright.solve;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * The automatic regularisation weight ({@code --regularization auto}) of richardson-lucy-tv and total-variation, by
 * the held-out likelihood: for a candidate lambda the method runs on half of the pixels (the trial problem of
 * {@link AutoStop}) and the score is how well its estimate predicts the other half, the mean Kullback-Leibler
 * divergence of the held-out data (cross-validation: Stone, J. R. Stat. Soc. B 36, 1974). total-variation is solved
 * until its objective settles ({@link Stopping#settled}); richardson-lucy-tv scores the best iteration of its trial, which also gives its iteration
 * count. The search starts at the method's default, walks by factors of sqrt(10) downhill until the score rises,
 * then puts a parabola through the best three points in log lambda (one more trial at its vertex).
 *
 * <p>Why not the discrepancy principle (the lambda whose fit equals what noise explains; Bertero, Boccacci,
 * Talenti, Zanella &amp; Zanni, Inverse Problems 26, 2010): on the invented piecewise-smooth test specimen it chose a
 * lambda 3 times too small (error 22% above the best of a grid), while the held-out likelihood chose within a factor
 * of 2 of the best (measured; see the regularisation test).
 */
public final class RegularizationChoice {

    /** Factor between neighbouring candidates. */
    private static final double STEP = Math.sqrt(10);
    /** Most trials before the parabola (the walk stops earlier when the score rises). */
    private static final int MAX_WALK = 7;

    /**
     * The chosen lambda and how it was found.
     *
     * @param lambda the weight
     * @param how in words
     * @param tried the lambdas tried, in order
     * @param scores their held-out fits
     * @param iterations for richardson-lucy-tv the best iteration count of the chosen lambda's trial, else 0
     */
    public record Choice(double lambda, String how, double[] tried, double[] scores, int iterations) {
        /** @return the run-record entry */
        public Map<String, Object> record() {
            Map<String, Object> m = new LinkedHashMap<>();
            m.put("lambda", lambda);
            m.put("how", how);
            m.put("lambdas_tried", tried);
            m.put("held_out_fits", scores);
            return m;
        }
    }

    private RegularizationChoice() {
    }

    /**
     * Chooses lambda for resolved camera values and background.
     *
     * @param data camera data, not modified
     * @param psf the prepared PSF, not modified
     * @param mask untrusted pixels or null
     * @param s settings with concrete camera values and background (method richardson-lucy-tv or total-variation)
     * @param ctx threads, progress, cancel
     */
    public static Choice choose(Volume data, Volume psf, byte[] mask, DeconvolutionSettings s, RunContext ctx) {
        if (s.method().equals("wiener")) {
            double l = DeconvolutionSettings.defaultRegularization("wiener");
            return new Choice(l, "wiener: the default (no automatic choice)", new double[] {l}, new double[] {Double.NaN}, 0);
        }
        List<double[]> tried = new ArrayList<>();
        try (Workers workers = new Workers(ctx.threads())) {
            DeconvolutionProblem half = DeconvolutionProblem.withHeldOut(data, psf, mask, AutomaticSettings.boundary(s),
                    s.camera(), s.background(), workers, ctx.fft(), AutoStop.HELD_OUT_SHARE, AutoStop.SEED);
            double start = DeconvolutionSettings.defaultRegularization(s.method());
            double[] here = score(half, s, start, ctx, tried);
            double[] up = score(half, s, start * STEP, ctx, tried);
            double dir = up[1] < here[1] ? STEP : 1 / STEP;
            double[] best = up[1] < here[1] ? up : here;
            double lambda = best[0];
            for (int k = 0; k < MAX_WALK; k++) {
                lambda *= dir;
                double[] next = tried(tried, lambda);
                if (next == null) {
                    next = score(half, s, lambda, ctx, tried);
                }
                if (next[1] >= best[1]) {
                    break;
                }
                best = next;
            }
            double vertex = parabola(tried, best[0]);
            if (vertex > 0 && tried(tried, vertex) == null) {
                double[] v = score(half, s, vertex, ctx, tried);
                if (v[1] < best[1]) {
                    best = v;
                }
            }
            double[] l = new double[tried.size()];
            double[] f = new double[tried.size()];
            for (int i = 0; i < l.length; i++) {
                l[i] = tried.get(i)[0];
                f[i] = tried.get(i)[1];
            }
            String how = String.format(Locale.ROOT, "held-out likelihood: the best of %d trials on half of the pixels"
                    + " (fit to the held-out half %.4f per pixel)", tried.size(), best[1]);
            return new Choice(best[0], how, l, f, (int) best[2]);
        }
    }

    /** @return {lambda, held-out fit, best iterations} of one trial, added to the list */
    private static double[] score(DeconvolutionProblem half, DeconvolutionSettings s, double lambda, RunContext ctx,
            List<double[]> tried) {
        ctx.checkCancelled();
        int n = tried.size() + 1;
        RunContext trial = ctx.withProgress((f, status) -> ctx.progress(0,
                String.format(Locale.ROOT, "automatic lambda, trial %d (lambda %.3g): %s", n, lambda, status)));
        Stopping st = s.stopping();
        double[] r;
        if (s.method().equals("total-variation")) {
            Stopping conv = new Stopping(StopRule.AUTO, st.maxIterations(), st.tolerance());
            Solution sol = s.withLambda(lambda).withStopping(conv).solver().solve(half, trial, IterationListener.NONE);
            float[] work = new float[half.gridLength()];
            float[] x = sol.estimate();
            for (int i = 0; i < x.length; i++) {
                work[i] = Math.max(x[i], 0f);
            }
            half.blur().apply(work, work);
            r = new double[] {lambda, half.heldOutFit(work), sol.iterations()};
        } else {
            double[] held = new double[st.maxIterations()];
            int[] count = {0};
            Stopping auto = new Stopping(StopRule.AUTO, st.maxIterations(), st.tolerance());
            s.withLambda(lambda).withStopping(auto).solver().solve(half, trial, new IterationListener() {
                @Override
                public void iteration(int iteration, int maxIterations, double objective, double change) {
                }

                @Override
                public void state(IterationState state) {
                    held[count[0]++] = state.heldOutFit();
                }
            });
            int best = Stopping.bestHeldOut(java.util.Arrays.copyOf(held, count[0]));
            r = new double[] {lambda, held[best], Math.max(1, best)};
        }
        tried.add(r);
        return r;
    }

    private static double[] tried(List<double[]> tried, double lambda) {
        for (double[] t : tried) {
            if (Math.abs(Math.log(t[0] / lambda)) < 1e-6) {
                return t;
            }
        }
        return null;
    }

    /**
     * The vertex of the parabola through the best trial and its neighbours in log lambda (when both were tried and
     * the best lies between them), else -1.
     */
    static double parabola(List<double[]> tried, double best) {
        double[] lo = tried(tried, best / STEP);
        double[] mid = tried(tried, best);
        double[] hi = tried(tried, best * STEP);
        if (lo == null || hi == null || mid == null) {
            return -1;
        }
        double h = Math.log(STEP);
        double curvature = lo[1] - 2 * mid[1] + hi[1];
        if (!(curvature > 0)) {
            return -1;
        }
        double shift = 0.5 * h * (lo[1] - hi[1]) / curvature;
        shift = Math.max(-h, Math.min(h, shift));
        return best * Math.exp(shift);
    }
}
