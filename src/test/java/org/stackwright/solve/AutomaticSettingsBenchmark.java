package org.stackwright.solve;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.Volume;

/**
 * The benchmark of the automatic settings (not a test): the table of conditions of {@link ConditionStacks} (invented
 * widefield stacks of an independent generator) with {@code deconvolve}'s defaults and only the offset given, against
 * the oracle (best iteration count of accelerated Richardson-Lucy with the true camera values, found with the truth),
 * with the seconds of each default run (camera estimate, background, trial of the automatic stop and final run). It
 * prints a Markdown table for README.
 *
 * <p>With {@code --methods m1,m2,...} it also runs each named method with its defaults (automatic lambda and stop) on
 * every condition and prints its error, so the default method can be compared with the others on the same data.
 *
 * <p>With {@code --second} it runs the conditions of the second generator ({@link ConditionStacks#SECOND}, the Born
 * &amp; Wolf stacks) instead of the first's.
 *
 * <p>Run from the repository root:
 * {@code tools/benchmark.sh org.stackwright.solve.AutomaticSettingsBenchmark [--threads N] [--second] [--methods richardson-lucy-tv,total-variation]}
 */
public final class AutomaticSettingsBenchmark {

    private AutomaticSettingsBenchmark() {
    }

    public static void main(String[] args) {
        int threads = 2;
        List<String> methods = new ArrayList<>();
        List<ConditionStacks.Condition> conditions = ConditionStacks.ALL;
        for (int i = 0; i < args.length; i++) {
            if (args[i].equals("--second")) {
                conditions = ConditionStacks.SECOND;
            } else if (args[i].equals("--threads")) {
                threads = Integer.parseInt(args[++i]);
            } else if (args[i].equals("--methods")) {
                methods.addAll(List.of(args[++i].split(",")));
            } else {
                throw new IllegalArgumentException("unknown argument " + args[i] + " (--threads N, --second, --methods a,b)");
            }
        }
        String set = conditions.get(0).set();
        Volume truth = ConditionStacks.read(set, "truth");
        System.out.println("| condition | default: iterations, error | oracle: iterations, error | ratio | gain, read"
                + " noise (true) | background ADU (true) | trial fit excess (structured) | seconds (trial) | stop reason |");
        System.out.println("|---|---|---|---|---|---|---|---|---|");
        for (ConditionStacks.Condition c : conditions) {
            ConditionStacks.Row row = ConditionStacks.run(c, truth, threads);
            double[] cam = ConditionStacks.truth(set, c.data());
            @SuppressWarnings("unchecked")
            Map<String, Object> settings = (Map<String, Object>) row.record().get("settings");
            @SuppressWarnings("unchecked")
            Map<String, Object> trial = (Map<String, Object>) settings.get("stop_trial");
            System.out.printf(Locale.ROOT, "| %s | %d, %.4f | %d, %.4f | %.3f | %.2f, %.2f (%.2f, %.2f) | %.1f (%.1f) |"
                    + " %.1f%% (%.1f%%) | %.1f (%.1f) | %s |%n", c.what(), row.iterations(), row.error(), row.oracleIterations(),
                    row.oracleError(), row.ratio(), row.used().gain(), row.used().readNoise(), cam[0], cam[1],
                    row.used().background(), cam[3] * cam[0], 100 * row.fitExcess(), 100 * row.structuredExcess(), row.seconds(),
                    (Double) trial.get("trial_seconds"), shortReason(row.reason()));
        }
        for (String m : methods) {
            System.out.println();
            System.out.println("method " + m + " with its defaults (error against the truth, iterations, lambda, seconds):");
            for (ConditionStacks.Condition c : conditions) {
                Volume data = ConditionStacks.read(set, c.data());
                Volume psf = ConditionStacks.read(set, "psf-" + c.psf());
                Map<String, String> raw = new HashMap<>();
                raw.put("offset", Double.toString(ConditionStacks.truth(set, c.data())[2]));
                raw.put("method", m);
                DeconvolutionSettings s = DeconvolveOperation.settings(Values.parse("deconvolve",
                        new DeconvolveOperation().params(), raw));
                long t0 = System.nanoTime();
                Deconvolution.Outcome o = Deconvolution.run(data, psf, c.psf(), null, s, RunContext.quiet(threads),
                        IterationListener.NONE);
                System.out.printf(Locale.ROOT, "  %-30s error %.4f, %d iterations, lambda %.3g, %.1f s%n", c.what(),
                        ConditionStacks.error(o.result().data(), truth.data()), o.solution().iterations(),
                        o.settings().lambda(), (System.nanoTime() - t0) * 1e-9);
            }
        }
    }

    /** The stop reason up to its first semicolon or parenthesis (the table cell). */
    private static String shortReason(String reason) {
        int cut = reason.indexOf(" (trial");
        return cut > 0 ? reason.substring(0, cut) + reason.substring(reason.indexOf(')', cut) + 1) : reason;
    }
}
