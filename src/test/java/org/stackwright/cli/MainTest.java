package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;

/** The command line in-process through {@link Main#run}: help, exit codes, messages that name the option. */
class MainTest {

    @TempDir
    Path dir;

    /** Exit code, stdout and stderr of one run. */
    record Run(int code, String out, String err) {
    }

    static Run run(String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8),
                new PrintStream(err, true, StandardCharsets.UTF_8));
        return new Run(code, out.toString(StandardCharsets.UTF_8), err.toString(StandardCharsets.UTF_8));
    }

    @Test
    void helpListsEveryOperation() {
        Run r = run("--help");
        assertEquals(Main.OK, r.code(), r.err());
        assertTrue(r.out().contains("demo"), r.out());
        for (Operation op : Operations.all()) {
            assertTrue(r.out().contains(op.name()), op.name() + " missing from --help:\n" + r.out());
        }
    }

    @Test
    void operationHelpListsItsOptions() {
        Run r = run("simulate", "--help");
        assertEquals(Main.OK, r.code());
        for (String option : new String[] {"--size", "--pixel", "--na", "--seed", "--output", "--threads", "--overwrite"}) {
            assertTrue(r.out().contains(option), option + " missing:\n" + r.out());
        }
    }

    @Test
    void versionAndNoOperation() {
        Run v = run("--version");
        assertEquals(Main.OK, v.code());
        assertTrue(v.out().startsWith("stackwright "), v.out());
        Run none = run();
        assertEquals(Main.BAD_INPUT, none.code());
        assertTrue(none.err().contains("simulate"), "the operations are listed:\n" + none.err());
    }

    @Test
    void unknownOperationOrOptionExitsTwoNamingIt() {
        Run r = run("deblurify");
        assertEquals(Main.BAD_INPUT, r.code());
        assertTrue(r.err().contains("deblurify"), r.err());
        r = run("simulate", "--bogus", "3", "--output", dir.resolve("a.tif").toString());
        assertEquals(Main.BAD_INPUT, r.code());
        assertTrue(r.err().contains("--bogus"), r.err());
    }

    @Test
    void badValuesExitTwoNamingTheOption() {
        String out = dir.resolve("a.tif").toString();
        String[][] cases = {
            {"na = 5 is out of range; allowed 0.01 to 1.7", "simulate", "--na", "5", "--output", out},
            {"pixel = 'abc' is not a number", "simulate", "--pixel", "abc", "--output", out},
            {"specimen = 'trees' is not allowed; choose one of cells, beads", "simulate", "--specimen", "trees",
                "--output", out},
            {"size = '12x0x3'", "simulate", "--size", "12x0x3", "--output", out},
            {"--threads = '0' is not allowed", "simulate", "--threads", "0", "--output", out},
            {"--output is required", "simulate", "--size", "16x16x1"},
            {"--output: output folder", "simulate", "--size", "16x16x1", "--output",
                dir.resolve("missing/a.tif").toString()},
            {"'--size'", "simulate", "--size"},
        };
        for (String[] c : cases) {
            String[] args = java.util.Arrays.copyOfRange(c, 1, c.length);
            Run r = run(args);
            assertEquals(Main.BAD_INPUT, r.code(), String.join(" ", args) + "\n" + r.err());
            assertTrue(r.err().contains(c[0]), "message should name " + c[0] + ": " + r.err());
        }
        assertFalse(Files.exists(dir.resolve("a.tif")), "nothing is written for bad input");
    }

    @Test
    void existingOutputIsRefusedWithoutOverwrite() throws Exception {
        Path out = dir.resolve("a.tif");
        Files.writeString(out, "keep");
        Run r = run("simulate", "--size", "16x16x1", "--output", out.toString());
        assertEquals(Main.BAD_INPUT, r.code());
        assertTrue(r.err().contains("--output") && r.err().contains("--overwrite"), r.err());
        assertEquals("keep", Files.readString(out));
        r = run("simulate", "--size", "16x16x1", "--output", out.toString(), "--overwrite");
        assertEquals(Main.OK, r.code(), r.err());
        assertFalse(Files.readString(out, StandardCharsets.ISO_8859_1).equals("keep"));
    }
}
