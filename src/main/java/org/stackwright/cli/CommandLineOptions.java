package org.stackwright.cli;

import java.io.PrintStream;
import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.op.Operation;
import org.stackwright.op.Param;

import picocli.CommandLine;
import picocli.CommandLine.Model.OptionSpec;
import picocli.CommandLine.ParseResult;

/**
 * An operation's command-line options as the command line reads them ({@code --key value}, {@code --threads},
 * {@code --overwrite}), for other front ends that take the same options (the cluster runner).
 */
public final class CommandLineOptions {

    /**
     * @param raw setting key to text, as given
     * @param threads worker threads
     * @param overwrite whether existing outputs may be replaced
     */
    public record Parsed(Map<String, String> raw, int threads, boolean overwrite) {
    }

    private CommandLineOptions() {
    }

    /**
     * @param err where notes on old keys go
     * @throws IllegalArgumentException with a message for the user when the options do not parse
     */
    public static Parsed parse(Operation op, String[] args, PrintStream err) {
        try {
            return collect(op, new CommandLine(OperationRunner.spec(op)).parseArgs(args), err);
        } catch (CommandLine.ParameterException e) {
            throw new IllegalArgumentException(Main.clip(e.getMessage()), e);
        }
    }

    /**
     * Reads the matched options of a parse; an old key is read as its setting's key, with a note.
     *
     * @throws IllegalArgumentException when an old key and its new key are both given
     */
    static Parsed collect(Operation op, ParseResult pr, PrintStream err) {
        Map<String, String> raw = new LinkedHashMap<>();
        int threads = Runtime.getRuntime().availableProcessors();
        boolean overwrite = false;
        for (OptionSpec o : pr.matchedOptions()) {
            String key = o.longestName().substring(2);
            Param p = aliased(op, key);
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
                threads = OperationRunner.parseThreads(String.valueOf(value));
            } else if (key.equals("overwrite")) {
                overwrite = true;
            } else if (!key.equals("help") && !key.equals("version")) {
                raw.put(key, value == null ? "true" : value.toString());
            }
        }
        return new Parsed(raw, threads, overwrite);
    }

    /** @return the setting whose old key this is, or null */
    private static Param aliased(Operation op, String name) {
        return op.params().stream().filter(p -> p.aliases().contains(name)).findFirst().orElse(null);
    }
}
