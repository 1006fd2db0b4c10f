package org.stackwright.testing;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;

import org.stackwright.cli.Main;

/** Runs the command line in the test's JVM and keeps what it printed. */
public final class CommandLine {

    private CommandLine() {
    }

    /** @return {exit code, standard output, standard error} */
    public static String[] run(String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int rc = Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        return new String[] {Integer.toString(rc), out.toString(StandardCharsets.UTF_8),
            err.toString(StandardCharsets.UTF_8)};
    }
}
