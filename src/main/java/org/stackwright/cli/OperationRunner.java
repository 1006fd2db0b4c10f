package org.stackwright.cli;

import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.RunFailedException;
import org.stackwright.op.Values;
import org.stackwright.parallel.CancelledException;
import org.stackwright.imagej.ChannelRunner;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.TiffFiles;

import picocli.CommandLine;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Model.OptionSpec;
import picocli.CommandLine.ParseResult;

/**
 * The command-line door of one operation: turns {@code --key value} options into {@link Values}, reads input
 * TIFFs, checks every output path before any work, runs, then writes outputs (each complete or not at all) and
 * the JSON record. A folder or file pattern as the main input runs a batch ({@link Batch}); SIGINT cancels at
 * the next cancel check without partial files ({@link CancelGuard}).
 */
final class OperationRunner {

    private final Operation op;
    private final PrintStream out;
    private final PrintStream err;

    OperationRunner(Operation op, PrintStream out, PrintStream err) {
        this.op = op;
        this.out = out;
        this.err = err;
    }

    /** The picocli description of the operation's options, built from its parameters. */
    static CommandSpec spec(Operation op) {
        CommandSpec spec = CommandSpec.create().name(op.name());
        spec.mixinStandardHelpOptions(true);
        spec.usageMessage().description(op.summary());
        for (Param p : op.params()) {
            for (String name : names(p)) {
                OptionSpec.Builder b = OptionSpec.builder("--" + name).type(String.class).description(describe(p))
                        .hidden(!name.equals(p.key()));
                if (p.kind() == Param.Kind.FLAG) {
                    b.arity("0..1").fallbackValue("true").paramLabel("true|false");
                } else {
                    b.arity("1").paramLabel(label(p));
                }
                spec.addOption(b.build());
            }
        }
        spec.addOption(OptionSpec.builder("--threads").type(String.class).paramLabel("N")
                .description("worker threads (default: all cores)").build());
        spec.addOption(OptionSpec.builder("--overwrite").arity("0").type(boolean.class)
                .description("replace output files that exist (default: refuse)").build());
        return spec;
    }

    /** @return the key, then the old keys (accepted as hidden options, with a note) */
    private static List<String> names(Param p) {
        List<String> names = new java.util.ArrayList<>(List.of(p.key()));
        names.addAll(p.aliases());
        return names;
    }

    private static String label(Param p) {
        return switch (p.kind()) {
            case IMAGE, OUTPUT_IMAGE, OUTPUT_FILE -> "FILE" + p.fileEnding();
            case CHOICE -> String.join("|", p.choices());
            case INTEGER -> "N";
            case NUMBER -> p.unit().isEmpty() ? "X" : p.unit().toUpperCase(Locale.ROOT).replace('/', '_');
            default -> "TEXT";
        };
    }

    private static String describe(Param p) {
        StringBuilder sb = new StringBuilder(p.help());
        if (!p.unit().isEmpty() && p.kind() == Param.Kind.NUMBER) {
            sb.append(" (").append(p.unit()).append(')');
        }
        if (p.required()) {
            sb.append(" [required]");
        } else if (p.defaultValue() != null && p.kind() != Param.Kind.FLAG) {
            sb.append(" [default ").append(p.defaultValue()).append(']');
        }
        // picocli formats descriptions with String.format: a literal % (as in "10%") must be doubled
        return sb.toString().replace("%", "%%");
    }

    /**
     * Parses the arguments against the operation's options and runs it: the door {@link Main} uses, open to tests
     * that bring their own {@link Operation}.
     */
    static int run(Operation op, String[] args, PrintStream out, PrintStream err) {
        CommandLine cl = new CommandLine(spec(op));
        ParseResult pr;
        try {
            pr = cl.parseArgs(args);
        } catch (CommandLine.ParameterException e) {
            err.println("stackwright " + op.name() + ": " + Main.clip(e.getMessage()));
            return Main.BAD_INPUT;
        }
        if (pr.isUsageHelpRequested()) {
            cl.usage(out);
            return Main.OK;
        }
        return new OperationRunner(op, out, err).run(pr);
    }

    int run(ParseResult pr) {
        Map<String, String> raw;
        int threads;
        boolean overwrite;
        try {
            CommandLineOptions.Parsed p = CommandLineOptions.collect(op, pr, err);
            raw = p.raw();
            threads = p.threads();
            overwrite = p.overwrite();
        } catch (IllegalArgumentException e) {
            err.println("stackwright " + op.name() + ": " + Main.clip(e.getMessage()));
            return Main.BAD_INPUT;
        }
        Param main = op.params().stream().filter(p -> p.kind() == Param.Kind.IMAGE).findFirst().orElse(null);
        try (CancelGuard guard = new CancelGuard()) {
            if (main != null && Batch.isBatch(raw.get(main.key())) && !StreamingRun.isPlaneFolder(op, raw, main.key())) {
                return runBatch(main, raw, threads, overwrite, guard);
            }
            try {
                runOne(raw, Map.of(), threads, overwrite, guard);
                return Main.OK;
            } catch (RuntimeException | OutOfMemoryError e) {
                err.println("stackwright " + op.name() + ": " + describe(e));
                return codeOf(e);
            }
        }
    }

    /**
     * Batch mode: runs every matching input in turn, continues past a failing file, and ends with a summary that
     * names each failed file and why. Cancel stops the batch after the current file's cancel check.
     *
     * @return OK when every file worked, BAD_INPUT when the batch itself is wrong, FAILED when any file failed
     */
    private int runBatch(Param main, Map<String, String> raw, int threads, boolean overwrite, CancelGuard guard) {
        List<Path> files;
        try {
            files = Batch.inputs(main.key(), raw.get(main.key()));
            for (Param p : op.params()) {
                if ((p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE) && raw.containsKey(p.key())) {
                    Path out = Batch.output(p, op.name(), raw.get(p.key()), files.get(0));
                    if (OutputPaths.sameFile(out.getParent(), files.get(0).getParent())) {
                        throw new IllegalArgumentException("--" + p.key() + " = '" + raw.get(p.key()) + "' is the folder"
                                + " of the inputs; batch outputs could replace other inputs: choose another folder");
                    }
                }
            }
        } catch (IllegalArgumentException e) {
            err.println("stackwright " + op.name() + ": " + Main.clip(e.getMessage()));
            return Main.BAD_INPUT;
        }
        Map<Path, String> failed = new LinkedHashMap<>();
        int done = 0;
        for (Path f : files) {
            if (guard.isCancelled()) {
                failed.put(f, "not started: cancelled");
                continue;
            }
            Map<String, String> one = new LinkedHashMap<>(raw);
            Map<String, Path> paths = new LinkedHashMap<>();
            one.put(main.key(), f.toString());
            paths.put(main.key(), f);
            for (Param p : op.params()) {
                if ((p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE) && raw.containsKey(p.key())) {
                    Path out = Batch.output(p, op.name(), raw.get(p.key()), f);
                    one.put(p.key(), out.toString());
                    paths.put(p.key(), out);
                }
            }
            err.println("stackwright " + op.name() + ": [" + (done + failed.size() + 1) + "/" + files.size() + "] " + f);
            try {
                runOne(one, paths, threads, overwrite, guard);
                done++;
            } catch (RuntimeException | OutOfMemoryError e) {
                failed.put(f, describe(e));
                err.println("stackwright " + op.name() + ": " + f + ": " + describe(e));
            }
        }
        err.println("stackwright " + op.name() + ": batch finished: " + done + " of " + files.size() + " files done, "
                + failed.size() + " failed");
        for (Map.Entry<Path, String> e : failed.entrySet()) {
            err.println("  failed: " + e.getKey() + ": " + e.getValue());
        }
        return failed.isEmpty() ? Main.OK : Main.FAILED;
    }

    /**
     * Runs one input: checks the settings, reads the inputs, checks and claims the outputs, runs, writes. Throws on
     * any problem.
     *
     * @param raw option key to text as given
     * @param paths paths already known for some keys (batch inputs from a folder listing, batch outputs), used
     *     instead of parsing their text
     */
    private void runOne(Map<String, String> raw, Map<String, Path> paths, int threads, boolean overwrite,
            CancelGuard guard) {
        boolean lists = PerChannel.hasLists(op, raw);
        Values values = lists ? null : Values.parse(op.name(), op.params(), raw);
        if (!lists && new StreamingRun(this, op, err).tryRun(values, raw, threads, overwrite, guard)) {
            return;
        }
        Map<String, ImagePlus> images = new LinkedHashMap<>();
        Map<String, Path> inputs = new LinkedHashMap<>();
        Map<String, Path> outputs = new LinkedHashMap<>();
        for (Param p : op.params()) {
            String v = raw.get(p.key());
            boolean output = p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE;
            if (p.kind() != Param.Kind.IMAGE && !output) {
                continue;
            }
            if (v == null) {
                if (p.required()) {
                    throw new IllegalArgumentException("--" + p.key() + " is required: " + p.help());
                }
                continue;
            }
            String key = "--" + p.key();
            if (output) {
                outputs.put(p.key(), paths.containsKey(p.key()) ? paths.get(p.key()) : OutputPaths.parseOutput(key, v));
            } else {
                Path path = paths.containsKey(p.key()) ? paths.get(p.key()) : OutputPaths.parse(key, v);
                images.put(p.key(), open(key, path, v));
                inputs.put(p.key(), path);
            }
        }
        try (RunOutputs files = RunOutputs.claim(op, outputs, inputs, overwrite)) {
            RunContext ctx = new RunContext(threads, new CliProgress(err), w -> err.println("warning: " + w), guard::isCancelled);
            long t0 = System.nanoTime();
            String mainKey = ChannelRunner.mainInput(op);
            ImagePlus main = mainKey == null ? null : images.get(mainKey);
            PerChannel.Made made;
            if (lists || (main != null && (main.getNChannels() > 1 || main.getNFrames() > 1))) {
                made = PerChannel.run(op, raw, images, threads, ctx, guard::isCancelled);
            } else {
                images.forEach(values::withImage);
                Result result = op.run(values, ctx);
                made = new PerChannel.Made(result.images(), result.record(), result.report());
            }
            err.print(CliProgress.CLEAR);
            made.record().putIfAbsent("seconds", (System.nanoTime() - t0) * 1e-9);
            if (!ctx.warnings().isEmpty()) {
                made.record().put("warnings", ctx.warnings());
            }
            files.write(made.images(), made.record(), err, guard::isCancelled);
            for (String line : made.report()) {
                out.println(line);
            }
        }
    }

    /**
     * Opens an input TIFF; a missing file whose name looks like a pattern gets a hint (patterns only with the
     * prefix {@value Batch#PATTERN_PREFIX}).
     */
    private static ImagePlus open(String key, Path path, String text) {
        try {
            return TiffFiles.open(path, key);
        } catch (IllegalArgumentException e) {
            if (Batch.looksLikePattern(text) && !java.nio.file.Files.exists(path)) {
                throw new IllegalArgumentException(e.getMessage() + " (to process every file matching a pattern,"
                        + " write it as " + Batch.PATTERN_PREFIX + text + ")", e);
            }
            throw e;
        }
    }

    /** Prints a report line on stdout. */
    void print(String line) {
        out.println(line);
    }

    /** @return the exit code for a failure: bad input 2, anything else (cancel, memory, I/O) 1 */
    static int codeOf(Throwable e) {
        return e instanceof IllegalArgumentException ? Main.BAD_INPUT : Main.FAILED;
    }

    /** @return the one-line message the user sees for a failure */
    static String describe(Throwable e) {
        if (e instanceof IllegalArgumentException) {
            return Main.clip(e.getMessage());
        }
        if (e instanceof CancelledException) {
            return e.getMessage() != null && e.getMessage().startsWith("cancelled; complete before the cancel")
                    ? e.getMessage() : "cancelled; no output written";
        }
        if (e instanceof OutOfMemoryError) {
            return "out of memory; give Java more heap (java -Xmx...) or use a smaller image";
        }
        if (e instanceof RunFailedException || e instanceof UncheckedIOException) {
            return Main.clip("failed: " + e.getMessage());
        }
        return Main.clip("failed: " + e);
    }

    static int parseThreads(String v) {
        try {
            int t = Integer.parseInt(v.trim());
            if (t >= 1 && t <= 1024) {
                return t;
            }
        } catch (NumberFormatException ignored) {
            // fall through to the message
        }
        throw new IllegalArgumentException("--threads = '" + v + "' is not allowed; give a whole number from 1 to 1024");
    }

    static void checkOutputs(Map<String, Path> outputs, Map<Path, String> inputs, boolean overwrite) {
        checkOutputs(outputs, inputs, overwrite, java.util.Set.of());
    }

    /**
     * Checks the outputs of a block run before any work, as {@link RunOutputs#claim} does for the usual run: each
     * output's real path (links followed) must not be an input (also through a link), two outputs must not name
     * one file, and its folder must take it. The keys in folders name folders of planes.
     *
     * @param inputs input path to its key
     */
    static void checkOutputs(Map<String, Path> outputs, Map<Path, String> inputs, boolean overwrite,
            java.util.Set<String> folders) {
        Map<Path, String> seen = new LinkedHashMap<>();
        for (Map.Entry<String, Path> e : outputs.entrySet()) {
            Path real = OutputPaths.real(e.getValue());
            for (Map.Entry<Path, String> in : inputs.entrySet()) {
                if (OutputPaths.sameFile(real, in.getKey())) {
                    throw new IllegalArgumentException("--" + e.getKey() + " " + e.getValue() + " is the same file as --"
                            + in.getValue() + "; the input is never overwritten: choose another output name");
                }
            }
            String other = seen.put(real, e.getKey());
            if (other != null) {
                throw new IllegalArgumentException("--" + e.getKey() + " and --" + other + " name the same file " + e.getValue());
            }
            try {
                if (folders.contains(e.getKey()) || StreamingRun.isFolderOutput(e.getKey(), e.getValue())) {
                    org.stackwright.blocks.PlaneFolderSink.checkTarget(real);
                } else {
                    TiffFiles.checkWritable(real, overwrite);
                }
            } catch (IllegalArgumentException ex) {
                throw new IllegalArgumentException("--" + e.getKey() + ": " + ex.getMessage());
            }
        }
    }

    void writeOutputs(Result result, Map<String, Path> outputs, boolean overwrite, CancelGuard guard) {
        ResultFiles.write(op, result, outputs, overwrite, guard::isCancelled, err);
    }

}
