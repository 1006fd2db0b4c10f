package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;

import ij.Macro;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.Test;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Values;
import org.stackwright.simulate.SimulateOperation;
import org.stackwright.testing.FuzzText;

/**
 * Fuzzing of the parsers that take user text: {@link Values#parse} (every door), the command line
 * ({@link Main#run}, picocli plus our checks, batch patterns included) and ImageJ macro-option strings read with
 * {@link Macro#getValue}. Each case must end in time and either succeed or give an IllegalArgumentException (exit
 * code 2 on the command line) with a short, non-empty message; nothing else may escape.
 *
 * <p>CI runs a bounded count (a few seconds); a longer run: {@code mvn -o test -Dtest=ParserFuzzTest
 * -Dstackwright.fuzz.count=100000}. The case index and seed are in every failure message, for replay.
 */
class ParserFuzzTest {

    private static final int COUNT = FuzzText.count(1500);
    private static final Fixtures FILES = new Fixtures();
    private static final List<Operation> OPS = List.of(new SimulateOperation(), new ScaleOperation(), new SlowOperation());

    @AfterAll
    static void clean() {
        FILES.close();
    }

    private static List<String> keys(Operation op) {
        return op.params().stream().map(Param::key).toList();
    }

    private static void checkMessage(String where, String message) {
        assertTrue(message != null && !message.isBlank(), where + ": empty message");
        assertTrue(message.length() < 2000, where + ": message of " + message.length() + " characters: "
                + message.substring(0, Math.min(300, message.length())));
    }

    /** Calls every accessor an operation would call, so the values are parsed as they would be in a run. */
    private static void readAll(Values v) {
        for (Param p : v.params()) {
            switch (p.kind()) {
                case NUMBER -> v.number(p.key());
                case INTEGER -> {
                    if (v.raw(p.key()) != null) {
                        v.integer(p.key());
                    }
                }
                case TEXT -> {
                    if (p.key().equals("size")) {
                        v.dims("size", 3);
                    } else if (p.key().equals("grid")) {
                        v.dims("grid", 2);
                    }
                }
                default -> v.raw(p.key());
            }
        }
    }

    @Test
    void valuesParse() {
        assertTimeoutPreemptively(Duration.ofSeconds(60 + COUNT / 100), () -> {
            SplittableRandom r = new SplittableRandom(1);
            for (int i = 0; i < COUNT; i++) {
                Operation op = OPS.get(r.nextInt(OPS.size()));
                Map<String, String> raw = new LinkedHashMap<>();
                int n = r.nextInt(0, 6);
                for (int k = 0; k < n; k++) {
                    raw.put(FuzzText.key(r, keys(op)), FuzzText.value(r));
                }
                try {
                    readAll(Values.parse(op.name(), op.params(), raw));
                } catch (IllegalArgumentException e) {
                    checkMessage("case " + i + " " + raw.keySet(), e.getMessage());
                } catch (RuntimeException e) {
                    fail("case " + i + " " + raw + ": " + e, e);
                }
            }
        });
    }

    @Test
    void commandLine() {
        // a command-line case costs ~5 ms (picocli builds the options each time): a fifth of the count
        int count = Math.max(1, COUNT / 5);
        assertTimeoutPreemptively(Duration.ofSeconds(60 + count / 20), () -> {
            SplittableRandom r = new SplittableRandom(2);
            String missing = FILES.path("missing/out.tif").toString();
            for (int i = 0; i < count; i++) {
                Operation op = OPS.get(r.nextInt(OPS.size()));
                List<String> args = new ArrayList<>();
                int n = r.nextInt(0, 6);
                for (int k = 0; k < n; k++) {
                    String key = FuzzText.key(r, keys(op));
                    args.add(r.nextInt(8) == 0 ? key : "--" + key);
                    if (key.equals("input") && r.nextBoolean()) {
                        // paths, folders and patterns, good and bad, for the input and batch checks
                        args.add(FILES.dir + "/" + FuzzText.value(r));
                    } else if (r.nextInt(6) != 0) {
                        args.add(FuzzText.value(r));
                    }
                }
                // every run ends at the output check at the latest: nothing is computed or written
                args.add("--output");
                args.add(missing);
                ByteArrayOutputStream err = new ByteArrayOutputStream();
                PrintStream errStream = new PrintStream(err, true, StandardCharsets.UTF_8);
                PrintStream out = new PrintStream(new ByteArrayOutputStream());
                int code;
                try {
                    if (op instanceof SimulateOperation) {
                        args.add(0, op.name());
                        code = Main.run(args.toArray(String[]::new), out, errStream);
                    } else {
                        code = OperationRunner.run(op, args.toArray(String[]::new), out, errStream);
                    }
                } catch (RuntimeException e) {
                    fail("case " + i + " " + args + ": " + e, e);
                    return;
                }
                String msg = err.toString(StandardCharsets.UTF_8);
                if (code != Main.OK || !msg.isEmpty()) {
                    assertTrue(code == Main.BAD_INPUT, "case " + i + " " + args + ": exit " + code + ": " + msg);
                    checkMessage("case " + i, msg);
                }
            }
        });
    }

    /** A random macro-options string as the ImageJ recorder writes them: key=value, key=[a b], bare flags. */
    private static String macroOptions(SplittableRandom r, List<String> keys) {
        StringBuilder sb = new StringBuilder();
        int n = r.nextInt(0, 8);
        for (int k = 0; k < n; k++) {
            String key = FuzzText.key(r, keys);
            String v = FuzzText.value(r);
            switch (r.nextInt(5)) {
                case 0 -> sb.append(key);
                case 1 -> sb.append(key).append("=[").append(v).append(']');
                case 2 -> sb.append(key).append("=[").append(v);
                default -> sb.append(key).append('=').append(v);
            }
            sb.append(r.nextInt(6) == 0 ? "" : " ");
        }
        return sb.toString();
    }

    @Test
    void macroOptions() {
        assertTimeoutPreemptively(Duration.ofSeconds(60 + COUNT / 100), () -> {
            SplittableRandom r = new SplittableRandom(3);
            for (int i = 0; i < COUNT; i++) {
                Operation op = OPS.get(r.nextInt(OPS.size()));
                String options = macroOptions(r, keys(op));
                Map<String, String> raw = new LinkedHashMap<>();
                try {
                    for (Param p : op.params()) {
                        String v = Macro.getValue(options, p.key(), null);
                        if (v != null && !p.isImageOrFile()) {
                            raw.put(p.key(), v);
                        }
                    }
                    readAll(Values.parse(op.name(), op.params(), raw));
                } catch (IllegalArgumentException e) {
                    checkMessage("case " + i + " options " + Values.class.getSimpleName(), e.getMessage());
                } catch (RuntimeException e) {
                    fail("case " + i + " options '" + options + "': " + e, e);
                }
            }
        });
    }
}
