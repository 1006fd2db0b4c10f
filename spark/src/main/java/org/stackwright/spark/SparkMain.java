package org.stackwright.spark;

import java.io.PrintStream;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaSparkContext;
import org.stackwright.blocks.BlockSettings;
import org.stackwright.blocks.Blockwise;
import org.stackwright.cli.CommandLineOptions;
import org.stackwright.cli.ResultFiles;
import org.stackwright.cli.StreamingRun;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Operation;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.CancelledException;
import org.stackwright.registry.Operations;

/**
 * The cluster runner: {@code java -jar stackwright-spark.jar --master 'local[2]' OPERATION OPTIONS...} on a
 * workstation, {@code spark-submit --class org.stackwright.spark.SparkMain stackwright-spark.jar OPERATION
 * OPTIONS...} on a cluster whose nodes share the input and output paths. The operation and its options are those of
 * the command line; the blocks are Spark tasks. Exit code 0 on success, 1 on failure, 2 on bad input.
 *
 * <p>In local mode {@code local[N]} becomes {@code local[N,4]}: Spark retries a failed task only when given a
 * number of tries, and 4 is what a cluster does by default ({@code spark.task.maxFailures}).
 */
public final class SparkMain {

    static final int OK = 0;
    static final int FAILED = 1;
    static final int BAD_INPUT = 2;
    /** Spark setting naming a block whose first attempt fails after writing part of its output (tests). */
    static final String FAIL_ONCE = "spark.stackwright.failOnce";

    private static final Pattern LOCAL = Pattern.compile("local\\[(\\d+|\\*)\\]");
    /** A local master with or without its number of tries: local[N], local[*], local[N,F]. */
    private static final Pattern LOCAL_ANY = Pattern.compile("local(?:\\[(\\d+|\\*)(?:,\\d+)?\\])?");
    /** What Spark keeps of each executor's heap for itself before tasks share it (its reserved memory). */
    private static final long SPARK_RESERVE = 300L << 20;

    private SparkMain() {
    }

    public static void main(String[] args) {
        // Netty under Java 17 (see also the Add-Opens of the jar's manifest)
        System.setProperty("io.netty.tryReflectionSetAccessible", "true");
        System.exit(run(args, System.out, System.err));
    }

    /** @return the master with a number of tries for local mode */
    static String withRetries(String master) {
        Matcher m = LOCAL.matcher(master.trim());
        return m.matches() ? "local[" + m.group(1) + ",4]" : master.trim();
    }

    /**
     * The memory one block task may use. Several tasks run at once in one JVM, so a budget for the whole heap (as on
     * one machine) would run out of memory. In local mode the driver is the executor: its free heap shared among the
     * task slots, capped by the memory setting. On a cluster the memory setting is what one task may use; without
     * it, an executor's memory less Spark's reserve, shared among its slots (spark.executor.cores /
     * spark.task.cpus, 1 when not set).
     */
    static long taskBudget(SparkConf conf, Values v, RunContext ctx) {
        String given = v.text(BlockSettings.MEMORY);
        long setting = given == null || given.isBlank() ? -1 : BlockSettings.parseSize(given);
        Matcher m = LOCAL_ANY.matcher(conf.get("spark.master", "").trim());
        if (m.matches()) {
            int slots = m.group(1) == null ? 1 : m.group(1).equals("*") ? Runtime.getRuntime().availableProcessors()
                    : Math.max(1, Integer.parseInt(m.group(1)));
            long share = MemoryCheck.available() / slots;
            if (setting > share) {
                ctx.warn(String.format(Locale.ROOT, "memory = %s per task is more than the Java heap has free for %d"
                        + " tasks at once (%.0f MB each); using %.0f MB (give Java more with java -Xmx...)", given,
                        slots, share / 1048576.0, share / 1048576.0));
            }
            return setting < 0 ? share : Math.min(setting, share);
        }
        if (setting > 0) {
            return setting;
        }
        long executor = conf.getSizeAsBytes("spark.executor.memory", "1g");
        int slots = Math.max(1, conf.getInt("spark.executor.cores", 1) / Math.max(1, conf.getInt("spark.task.cpus", 1)));
        return Math.max(1L << 20, (executor - SPARK_RESERVE) / slots);
    }

    /**
     * Started with {@code java -jar} against a cluster's master (not through spark-submit, which names the jars
     * itself), the executors need this runner and the core: their jars are named in {@code spark.jars}, from where
     * each executor fetches them. In local mode the executors are this JVM and nothing is shipped.
     */
    static void shipJars(SparkConf conf) {
        if (LOCAL_ANY.matcher(conf.get("spark.master", "").trim()).matches() || conf.contains("spark.jars")) {
            return;
        }
        List<String> jars = new ArrayList<>();
        for (Class<?> c : List.of(SparkMain.class, Operations.class)) {
            java.security.CodeSource src = c.getProtectionDomain().getCodeSource();
            if (src != null && src.getLocation() != null && src.getLocation().getPath().endsWith(".jar")
                    && !jars.contains(src.getLocation().toString())) {
                jars.add(src.getLocation().toString());
            }
        }
        if (!jars.isEmpty()) {
            conf.set("spark.jars", String.join(",", jars));
        }
    }

    static int run(String[] args, PrintStream out, PrintStream err) {
        String master = null;
        int i = 0;
        while (i < args.length && args[i].startsWith("--")) {
            if (args[i].equals("--master") && i + 1 < args.length) {
                master = args[i + 1];
                i += 2;
            } else if (args[i].equals("--help") || args[i].equals("-h")) {
                usage(out);
                return OK;
            } else {
                err.println("stackwright-spark: unknown option " + args[i] + " before the operation; give --master URL"
                        + " then OPERATION OPTIONS...");
                return BAD_INPUT;
            }
        }
        if (i >= args.length) {
            usage(err);
            return BAD_INPUT;
        }
        String name = args[i];
        Optional<Operation> found = Operations.byName(name);
        if (found.isEmpty() || !(found.get() instanceof Blockwise)) {
            err.println("stackwright-spark: '" + name + "' does not run in blocks; allowed: " + String.join(", ",
                    Operations.all().stream().filter(o -> o instanceof Blockwise).map(Operation::name).toList()));
            return BAD_INPUT;
        }
        Operation op = found.get();
        String[] rest = Arrays.copyOfRange(args, i + 1, args.length);
        StreamingRun.BlockFiles files = null;
        try {
            CommandLineOptions.Parsed parsed = CommandLineOptions.parse(op, rest, err);
            Values values = Values.parse(op.name(), op.params(), parsed.raw());
            if (!((Blockwise) op).blocks().applies(values)) {
                throw new IllegalArgumentException(op.name() + " with these settings does not run in blocks (dark or"
                        + " flat frames, uncertainty, depth-variant); use the plain command line");
            }
            files = StreamingRun.open(op, values, parsed.raw(), parsed.overwrite());
            SparkConf conf = new SparkConf().setAppName("stackwright " + op.name());
            if (master != null) {
                conf.setMaster(withRetries(master));
            } else if (!conf.contains("spark.master")) {
                throw new IllegalArgumentException("no Spark master: give --master URL (e.g. 'local[2]') or run"
                        + " through spark-submit");
            }
            shipJars(conf);
            int failOnce = conf.getInt(FAIL_ONCE, 0) - 1;
            RunContext ctx = new RunContext(parsed.threads(), (f, s) -> err.printf(Locale.ROOT, "[%3.0f%%] %s%n",
                    100 * f, s), w -> err.println("warning: " + w), null);
            Result r;
            try (JavaSparkContext sc = new JavaSparkContext(conf)) {
                sc.setLogLevel("WARN");
                r = SparkBlockRun.run(sc, op, values, parsed.raw(), files, parsed.overwrite(), failOnce,
                        taskBudget(conf, values, ctx), ctx);
            }
            if (!ctx.warnings().isEmpty()) {
                r.record().put("warnings", ctx.warnings());
            }
            ResultFiles.write(op, r, files.others(), parsed.overwrite(), () -> false, err);
            r.report().forEach(out::println);
            return OK;
        } catch (IllegalArgumentException e) {
            err.println("stackwright-spark " + name + ": " + e.getMessage());
            return BAD_INPUT;
        } catch (CancelledException e) {
            err.println("stackwright-spark " + name + ": cancelled; no output written");
            return FAILED;
        } catch (RuntimeException e) {
            err.println("stackwright-spark " + name + ": failed: " + e);
            return FAILED;
        } finally {
            if (files != null) {
                files.close();
            }
        }
    }

    private static void usage(PrintStream s) {
        s.println("usage: java -jar stackwright-spark.jar --master URL OPERATION OPTIONS...");
        s.println("       spark-submit --class org.stackwright.spark.SparkMain stackwright-spark.jar OPERATION OPTIONS...");
        s.println("Runs an operation of the command line with its blocks as Spark tasks (operations: "
                + String.join(", ", Operations.all().stream().filter(o -> o instanceof Blockwise)
                        .map(Operation::name).toList()) + ").");
        s.println("Options are those of 'java -jar stackwright.jar OPERATION --help'. An output naming a folder gets one");
        s.println("TIFF per plane; a file gets the planes assembled into one TIFF (BigTIFF over 4 GB).");
    }
}
