package org.stackwright.cli;

import java.util.LinkedHashMap;
import java.util.Map;

import org.stackwright.op.Operation;

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
     * @throws IllegalArgumentException with a message for the user when the options do not parse
     */
    public static Parsed parse(Operation op, String[] args) {
        try {
            return collect(new CommandLine(OperationRunner.spec(op)).parseArgs(args));
        } catch (CommandLine.ParameterException e) {
            throw new IllegalArgumentException(Main.clip(e.getMessage()), e);
        }
    }

    /** Reads the matched options of a parse. */
    static Parsed collect(ParseResult pr) {
        Map<String, String> raw = new LinkedHashMap<>();
        int threads = Runtime.getRuntime().availableProcessors();
        boolean overwrite = false;
        for (OptionSpec o : pr.matchedOptions()) {
            String key = o.longestName().substring(2);
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
}
