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

import org.stackwright.op.Json;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.CancelledException;
import org.stackwright.volume.OutputFiles;
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
                    b.arity("0..1").fallbackValue("true").paramLabel("");
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
            case IMAGE -> "FILE.tif";
            case OUTPUT_IMAGE -> p.unit().equals("PNG") ? "FILE.png" : "FILE.tif";
            case OUTPUT_FILE -> "FILE.json";
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
        return sb.toString();
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
        Map<String, String> raw = new LinkedHashMap<>();
        int threads = Runtime.getRuntime().availableProcessors();
        boolean overwrite = false;
        try {
            for (OptionSpec o : pr.matchedOptions()) {
                String key = o.longestName().substring(2);
                Param p = aliased(key);
                if (p != null) {
                    err.println("note: " + p.aliasNote(key, "--"));
                    if (pr.hasMatchedOption("--" + p.key())) {
                        throw new IllegalArgumentException("--" + key + " and --" + p.key() + " name the same setting; "
                                + "give only --" + p.key());
                    }
                    key = p.key();
                }
                Object value = o.getValue();
                if (key.equals("threads")) {
                    threads = parseThreads(String.valueOf(value));
                } else if (key.equals("overwrite")) {
                    overwrite = true;
                } else if (!key.equals("help") && !key.equals("version")) {
                    raw.put(key, value == null ? "true" : value.toString());
                }
            }
        } catch (IllegalArgumentException e) {
            err.println("stackwright " + op.name() + ": " + Main.clip(e.getMessage()));
            return Main.BAD_INPUT;
        }
        Param main = op.params().stream().filter(p -> p.kind() == Param.Kind.IMAGE).findFirst().orElse(null);
        try (CancelGuard guard = new CancelGuard()) {
            if (main != null && Batch.isBatch(raw.get(main.key()))) {
                return runBatch(main, raw, threads, overwrite, guard);
            }
            try {
                runOne(raw, threads, overwrite, guard);
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
                    Batch.output(p, op.name(), raw.get(p.key()), files.get(0));
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
            one.put(main.key(), f.toString());
            for (Param p : op.params()) {
                if ((p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE) && raw.containsKey(p.key())) {
                    one.put(p.key(), Batch.output(p, op.name(), raw.get(p.key()), f).toString());
                }
            }
            err.println("stackwright " + op.name() + ": [" + (done + failed.size() + 1) + "/" + files.size() + "] " + f);
            try {
                runOne(one, threads, overwrite, guard);
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

    /** @return the setting whose old key this is, or null */
    private Param aliased(String name) {
        return op.params().stream().filter(p -> p.aliases().contains(name)).findFirst().orElse(null);
    }

    /** Runs one input: reads, checks outputs, runs, writes. Throws on any problem. */
    private void runOne(Map<String, String> raw, int threads, boolean overwrite, CancelGuard guard) {
        Values values = Values.parse(op.name(), op.params(), raw);
        Map<String, Path> outputs = new LinkedHashMap<>();
        Map<Path, String> inputs = new LinkedHashMap<>();
        for (Param p : op.params()) {
            String v = raw.get(p.key());
            if (p.kind() == Param.Kind.IMAGE) {
                if (v == null) {
                    if (p.required()) {
                        throw new IllegalArgumentException("--" + p.key() + " is required: " + p.help());
                    }
                    continue;
                }
                Path path = Paths.get(v);
                values.withImage(p.key(), TiffFiles.open(path, "--" + p.key()));
                inputs.put(path.toAbsolutePath().normalize(), p.key());
            } else if (p.kind() == Param.Kind.OUTPUT_IMAGE || p.kind() == Param.Kind.OUTPUT_FILE) {
                if (v == null) {
                    if (p.required()) {
                        throw new IllegalArgumentException("--" + p.key() + " is required: " + p.help());
                    }
                    continue;
                }
                outputs.put(p.key(), Paths.get(v));
            }
        }
        checkOutputs(outputs, inputs, overwrite);
        outputs.values().forEach(guard::watch);
        RunContext ctx = new RunContext(threads, new CliProgress(err), w -> err.println("warning: " + w), guard::isCancelled);
        long t0 = System.nanoTime();
        Result result = op.run(values, ctx);
        err.print(CliProgress.CLEAR);
        result.record().putIfAbsent("seconds", (System.nanoTime() - t0) * 1e-9);
        if (!ctx.warnings().isEmpty()) {
            result.record().put("warnings", ctx.warnings());
        }
        writeOutputs(result, outputs, overwrite, guard);
        for (String line : result.report()) {
            out.println(line);
        }
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

    private static void checkOutputs(Map<String, Path> outputs, Map<Path, String> inputs, boolean overwrite) {
        Map<Path, String> seen = new LinkedHashMap<>();
        for (Map.Entry<String, Path> e : outputs.entrySet()) {
            Path abs = e.getValue().toAbsolutePath().normalize();
            String input = inputs.get(abs);
            if (input != null) {
                throw new IllegalArgumentException("--" + e.getKey() + " " + e.getValue() + " is the same file as --" + input
                        + "; the input is never overwritten: choose another output name");
            }
            String other = seen.put(abs, e.getKey());
            if (other != null) {
                throw new IllegalArgumentException("--" + e.getKey() + " and --" + other + " name the same file " + e.getValue());
            }
            try {
                TiffFiles.checkWritable(abs, overwrite);
            } catch (IllegalArgumentException ex) {
                throw new IllegalArgumentException("--" + e.getKey() + ": " + ex.getMessage());
            }
        }
    }

    private void writeOutputs(Result result, Map<String, Path> outputs, boolean overwrite, CancelGuard guard) {
        List<Path> written = new java.util.ArrayList<>();
        for (Map.Entry<String, Path> e : outputs.entrySet()) {
            if (guard.isCancelled()) {
                throw new CancelledException(written.isEmpty() ? "cancelled; no output written"
                        : "cancelled; complete before the cancel: " + written + "; not written: the others");
            }
            Path path = e.getValue();
            Param p = op.params().stream().filter(q -> q.key().equals(e.getKey())).findFirst().orElseThrow();
            if (p.kind() == Param.Kind.OUTPUT_FILE) {
                try {
                    OutputFiles.writeText(Json.write(result.record()).getBytes(StandardCharsets.UTF_8), path, overwrite);
                    written.add(path);
                } catch (IOException ex) {
                    throw new UncheckedIOException("could not write " + path + ": " + ex.getMessage(), ex);
                }
                continue;
            }
            ImagePlus imp = result.images().get(e.getKey());
            if (imp == null) {
                err.println("note: " + op.name() + " made no " + e.getKey() + " for this input; " + path + " not written");
            } else if (path.getFileName().toString().toLowerCase(Locale.ROOT).endsWith(".png")) {
                OutputFiles.writePng(imp, path, overwrite);
                written.add(path);
            } else {
                TiffFiles.write(imp, path, overwrite);
                written.add(path);
            }
        }
    }

}
