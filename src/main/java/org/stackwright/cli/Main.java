package org.stackwright.cli;

import java.io.PrintStream;
import java.util.List;

import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;

import picocli.CommandLine;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Model.OptionSpec;
import picocli.CommandLine.ParseResult;

/**
 * The command line: {@code java -jar stackwright.jar <operation> --key value ...}. Options are built from each
 * operation's parameters, so the keys are the macro keys. Exit code 0 on success, 1 on failure, 2 on bad input;
 * messages go to stderr, results and reports to stdout.
 */
public final class Main {

    /** Exit code for a run that worked. */
    public static final int OK = 0;
    /** Exit code for a failure during the run (including cancel). */
    public static final int FAILED = 1;
    /** Exit code for bad input (unknown option, value out of range, unreadable file ...). */
    public static final int BAD_INPUT = 2;

    private Main() {
    }

    public static void main(String[] args) {
        System.setProperty("java.awt.headless", System.getProperty("java.awt.headless", "true"));
        int code = run(args, System.out, System.err);
        System.exit(CancelGuard.exitCode(code));
    }

    /** Runs the command line and returns the exit code (for tests: no System.exit). */
    public static int run(String[] args, PrintStream out, PrintStream err) {
        CommandSpec root = rootSpec();
        CommandLine cl = new CommandLine(root);
        ParseResult pr;
        try {
            pr = cl.parseArgs(args);
        } catch (CommandLine.ParameterException e) {
            err.println("stackwright: " + clip(e.getMessage()));
            err.println("Run 'stackwright " + (e.getCommandLine() == cl ? "" : e.getCommandLine().getCommandName() + " ")
                    + "--help' for the options.");
            return BAD_INPUT;
        }
        if (pr.isVersionHelpRequested()) {
            out.println("stackwright " + Version.get());
            return OK;
        }
        if (pr.isUsageHelpRequested()) {
            cl.usage(out);
            return OK;
        }
        if (!pr.hasSubcommand()) {
            // no operation named: the list goes to stderr, as for any other bad input
            cl.usage(err);
            return BAD_INPUT;
        }
        ParseResult sub = pr.subcommand();
        if (sub.isUsageHelpRequested()) {
            sub.commandSpec().commandLine().usage(out);
            return OK;
        }
        String name = sub.commandSpec().name();
        if (name.equals(DemoCommand.NAME)) {
            return new DemoCommand(out, err).run(sub);
        }
        Operation op = Operations.byName(name).orElseThrow();
        return new OperationRunner(op, out, err).run(sub);
    }

    /** Cuts a message that quotes a very long value down to a readable length (at most 500 characters). */
    static String clip(String message) {
        return message == null || message.length() <= 500 ? message : message.substring(0, 497) + "...";
    }

    static CommandSpec rootSpec() {
        CommandSpec root = CommandSpec.create().name("stackwright");
        root.mixinStandardHelpOptions(true);
        root.version("stackwright " + Version.get());
        root.usageMessage().description(
                "Restores microscopy images: PSFs, deconvolution, repair of defects and seams, residual checks.",
                "Deconvolved and inpainted pixels are estimates; not for diagnostic use.");
        root.usageMessage().commandListHeading("%nOperations:%n");
        root.addSubcommand(DemoCommand.NAME, DemoCommand.spec());
        for (Operation op : Operations.all()) {
            root.addSubcommand(op.name(), OperationRunner.spec(op));
        }
        return root;
    }

    /** @return the names of all subcommands, for tests */
    static List<String> commandNames() {
        return List.copyOf(rootSpec().subcommands().keySet());
    }

    static OptionSpec longOption(String name, String label, String description) {
        return OptionSpec.builder("--" + name).paramLabel(label).type(String.class).description(description).build();
    }
}
