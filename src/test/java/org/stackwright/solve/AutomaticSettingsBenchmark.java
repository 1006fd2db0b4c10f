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
 * <p>{@code --acceleration off} runs the methods without vector extrapolation and total-variation with constant steps (as before they were offered for
 * richardson-lucy-tv); {@code --oracle} adds, per method and condition, the method's own oracle: the best error over
 * iteration counts of the same method with the settings the default run used (camera values, background, lambda,
 * acceleration), found with the truth, and the ratio of the default's error to it; {@code --only a,b} keeps the
 * conditions named (exact, cropped, wide, narrow, read-noise, gradient, dim, bright); {@code --methods-only} leaves out the accelerated Richardson-Lucy table.
 *
 * <p>With {@code --second} it runs the conditions of the second generator ({@link ConditionStacks#SECOND}, the Born
 * &amp; Wolf stacks) instead of the first's.
 *
 * <p>Run from the repository root:
 * {@code tools/benchmark.sh org.stackwright.solve.AutomaticSettingsBenchmark [--threads N] [--second] [--methods richardson-lucy-tv,total-variation]
 * [--acceleration on|off] [--oracle] [--only bright,base] [--methods-only]}
 */
public final class AutomaticSettingsBenchmark {

    private AutomaticSettingsBenchmark() {
    }

    public static void main(String[] args) {
        int threads = 2;
        List<String> methods = new ArrayList<>();
        List<ConditionStacks.Condition> conditions = ConditionStacks.ALL;
        String acceleration = "on";
        boolean withOracle = false;
        boolean methodsOnly = false;
        List<String> only = new ArrayList<>();
        for (int i = 0; i < args.length; i++) {
            if (args[i].equals("--second")) {
                conditions = ConditionStacks.SECOND;
            } else if (args[i].equals("--threads")) {
                threads = Integer.parseInt(args[++i]);
            } else if (args[i].equals("--methods")) {
                methods.addAll(List.of(args[++i].split(",")));
            } else if (args[i].equals("--acceleration")) {
                acceleration = args[++i];
            } else if (args[i].equals("--oracle")) {
                withOracle = true;
            } else if (args[i].equals("--methods-only")) {
                methodsOnly = true;
            } else if (args[i].equals("--only")) {
                only.addAll(List.of(args[++i].split(",")));
            } else {
                throw new IllegalArgumentException("unknown argument " + args[i] + " (--threads N, --second, --methods a,b,"
                        + " --acceleration on|off, --oracle, --only a,b, --methods-only)");
            }
        }
        if (!only.isEmpty()) {
            conditions = conditions.stream().filter(c -> only.contains(c.name())).toList();
        }
        String set = conditions.get(0).set();
        Volume truth = ConditionStacks.read(set, "truth");
        if (!methodsOnly) {
            defaultTable(conditions, set, truth, threads);
        }
        for (String m : methods) {
            System.out.println();
            System.out.println("method " + m + " with its defaults, acceleration " + acceleration + " (error against the"
                    + " truth, iterations, lambda, seconds" + (withOracle ? "; oracle: iterations, error; ratio" : "")
                    + "; stop reason):");
            for (ConditionStacks.Condition c : conditions) {
                Volume data = ConditionStacks.read(set, c.data());
                Volume psf = ConditionStacks.read(set, "psf-" + c.psf());
                Map<String, String> raw = new HashMap<>();
                raw.put("offset", Double.toString(ConditionStacks.truth(set, c.data())[2]));
                raw.put("method", m);
                raw.put("acceleration", acceleration);
                DeconvolutionSettings s = DeconvolveOperation.settings(Values.parse("deconvolve",
                        new DeconvolveOperation().params(), raw));
                long t0 = System.nanoTime();
                Deconvolution.Outcome o = Deconvolution.run(data, psf, c.psf(), null, s, RunContext.quiet(threads),
                        IterationListener.NONE);
                double seconds = (System.nanoTime() - t0) * 1e-9;
                int k = o.solution().iterations();
                double error = ConditionStacks.error(o.result().data(), truth.data());
                String oracle = "";
                if (withOracle) {
                    int max = Math.min(2500, Math.max(2 * k, k + 200));
                    double[] best = ConditionStacks.methodOracle(data, psf, o.settings(), truth, max, threads);
                    if (best[0] >= max && max < 2500) { // the best at the last iteration: search to 2500
                        max = 2500;
                        best = ConditionStacks.methodOracle(data, psf, o.settings(), truth, max, threads);
                    }
                    oracle = String.format(Locale.ROOT, "; oracle %d, %.4f (of %d); ratio %.3f", (int) best[0], best[1],
                            max, error / best[1]);
                }
                System.out.printf(Locale.ROOT, "  %-30s error %.4f, %d iterations, lambda %.3g, %.1f s%s; %s%n",
                        c.what(), error, k, o.settings().lambda(), seconds, oracle, o.solution().stopReason());
                System.out.flush();
            }
        }
    }

    private static void defaultTable(List<ConditionStacks.Condition> conditions, String set, Volume truth, int threads) {
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
    }

    /** The stop reason up to its first semicolon or parenthesis (the table cell). */
    private static String shortReason(String reason) {
        int cut = reason.indexOf(" (trial");
        return cut > 0 ? reason.substring(0, cut) + reason.substring(reason.indexOf(')', cut) + 1) : reason;
    }
}
