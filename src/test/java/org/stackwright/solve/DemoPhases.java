package org.stackwright.solve;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.model.BlurOperator;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.InputChecks;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.Volume;

/**
 * For the deconvolution benchmark (not a test): one deconvolution split into the phases {@link Deconvolution#run}
 * goes through, each timed on its own (wall and CPU of the process), so that the set-up of a short run on a small
 * stack can be seen beside its iterations. The phases are the same calls in the same order as a run's; the blur
 * alone (plan and transfer function) is timed on a separate operator before the problem is built.
 */
final class DemoPhases {

    private final Map<String, double[]> phases = new LinkedHashMap<>();
    private final List<double[]> iterations = new ArrayList<>();
    private long wall;
    private long cpu;

    private DemoPhases() {
    }

    /**
     * Runs the phases of one deconvolution of {@code data} with a fixed iteration count.
     *
     * @param s settings with every camera value and the background given, and a fixed stop
     * @return the phases in order, wall and CPU seconds each
     */
    static DemoPhases run(Volume data, Volume psf, DeconvolutionSettings s, RunContext ctx) {
        DemoPhases t = new DemoPhases();
        t.start();
        InputChecks.Scan scan = InputChecks.check("input", data, ctx);
        InputChecks.checkOffset("input", data, s.offset(), s.readNoise(), ctx);
        Volume finite = InputChecks.finiteCopy(data, scan);
        t.lap("input checks");
        DeconvolutionProblem.Boundary boundary = AutomaticSettings.boundary(s);
        Volume p = PsfChecks.prepare("psf", psf, finite, boundary == DeconvolutionProblem.Boundary.EXTENDED, ctx).psf();
        t.lap("PSF checks, normalisation, centring");
        AutomaticSettings.Resolved resolved = AutomaticSettings.resolve(finite, p, null, s, null, null, ctx);
        DeconvolutionSettings used = resolved.settings();
        t.lap("automatic settings (all given here)");
        try (Workers workers = new Workers(ctx.threads())) {
            t.lap("thread pool");
            int nx = org.stackwright.fft.Convolution.paddedSize(finite.width(), p.width());
            int ny = org.stackwright.fft.Convolution.paddedSize(finite.height(), p.height());
            int nz = org.stackwright.fft.Convolution.paddedSize(finite.depth(), p.depth());
            new BlurOperator(p, nx, ny, nz, workers, ctx.fft());
            t.lap("a blur alone: plan + transfer function (timed apart, not part of a run)");
            DeconvolutionProblem problem = new DeconvolutionProblem(finite, p, null, boundary, used.camera(),
                    used.background(), workers, ctx.fft());
            t.lap("problem: blur (plan + transfer function) + H^T w");
            float[] x = new float[problem.gridLength()];
            problem.initialEstimate(x);
            t.lap("first estimate");
            Solution sol = ((RichardsonLucy) used.solver()).solve(problem, x, ctx, (k, max, obj, ch) -> t.iteration());
            t.lap("iterations (" + sol.iterations() + ")");
            problem.fitOfEstimate(sol.estimate());
            t.lap("final fit (one blur)");
            problem.toVolume(sol.estimate());
            t.lap("result on the image grid");
        }
        return t;
    }

    private void start() {
        wall = System.nanoTime();
        cpu = processCpu();
    }

    private void lap(String name) {
        long w = System.nanoTime();
        long c = processCpu();
        phases.put(name, new double[] {(w - wall) * 1e-9, (c - cpu) * 1e-9});
        wall = System.nanoTime();
        cpu = processCpu();
    }

    private void iteration() {
        iterations.add(new double[] {System.nanoTime() * 1e-9, processCpu() * 1e-9});
    }

    /** Prints one line per phase and the iterations' times, with the total excluding the phase timed apart. */
    void print(String indent) {
        double tw = 0;
        double tc = 0;
        for (Map.Entry<String, double[]> e : phases.entrySet()) {
            System.out.printf(Locale.ROOT, "%s%-75s %.4f s wall, %.4f s CPU%n", indent, e.getKey(), e.getValue()[0],
                    e.getValue()[1]);
            if (!e.getKey().startsWith("a blur alone")) {
                tw += e.getValue()[0];
                tc += e.getValue()[1];
            }
        }
        StringBuilder b = new StringBuilder();
        for (int k = 1; k < iterations.size(); k++) {
            b.append(String.format(Locale.ROOT, " %.4f", iterations.get(k)[0] - iterations.get(k - 1)[0]));
        }
        System.out.printf(Locale.ROOT, "%siterations 2.. wall:%s s%n", indent, b);
        System.out.printf(Locale.ROOT, "%stotal of a run's phases %.4f s wall, %.4f s CPU%n", indent, tw, tc);
    }

    /**
     * Prints the shortest wall time of each phase over several runs (the machine is shared: the minimum is the least
     * disturbed), with the mean CPU time.
     */
    static void printBest(List<DemoPhases> runs, String indent) {
        double tw = 0;
        double tc = 0;
        for (String name : runs.get(0).phases.keySet()) {
            double w = Double.POSITIVE_INFINITY;
            double c = 0;
            for (DemoPhases r : runs) {
                w = Math.min(w, r.phases.get(name)[0]);
                c += r.phases.get(name)[1] / runs.size();
            }
            System.out.printf(Locale.ROOT, "%s%-75s %.4f s wall, %.4f s CPU%n", indent, name, w, c);
            if (!name.startsWith("a blur alone")) {
                tw += w;
                tc += c;
            }
        }
        StringBuilder b = new StringBuilder();
        int n = runs.get(0).iterations.size();
        for (int k = 1; k < n; k++) {
            double w = Double.POSITIVE_INFINITY;
            for (DemoPhases r : runs) {
                w = Math.min(w, r.iterations.get(k)[0] - r.iterations.get(k - 1)[0]);
            }
            b.append(String.format(Locale.ROOT, " %.4f", w));
        }
        System.out.printf(Locale.ROOT, "%siterations 2.. wall, shortest of %d runs:%s s%n", indent, runs.size(), b);
        System.out.printf(Locale.ROOT, "%ssum of the shortest phases of a run %.4f s wall, %.4f s CPU%n", indent, tw, tc);
    }

    /** @return wall and CPU seconds of a phase whose name starts with {@code prefix}, or null */
    double[] phase(String prefix) {
        for (Map.Entry<String, double[]> e : phases.entrySet()) {
            if (e.getKey().startsWith(prefix)) {
                return e.getValue();
            }
        }
        return null;
    }

    private static long processCpu() {
        return ((com.sun.management.OperatingSystemMXBean) java.lang.management.ManagementFactory
                .getOperatingSystemMXBean()).getProcessCpuTime();
    }
}
