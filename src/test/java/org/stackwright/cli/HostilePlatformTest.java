package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The command line on a hostile platform, where a row of the bad-input table cannot show it: a non-ASCII path
 * under the plain C locale (a separate JVM, since the file-name encoding is fixed when a JVM starts), two runs
 * writing one output at the same moment (threads of one process and two processes: the second is refused while
 * the first works, and the first's file is complete), and help text without
 * picocli's format warnings (which go to the real stderr).
 */
class HostilePlatformTest {

    @TempDir
    Path dir;

    private static Process java(Map<String, String> env, String... args) throws Exception {
        List<String> cmd = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                "-Djava.awt.headless=true", "-cp", System.getProperty("java.class.path"), Main.class.getName()));
        cmd.addAll(List.of(args));
        ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true);
        pb.environment().putAll(env);
        return pb.start();
    }

    @Test
    void aNonAsciiPathUnderTheCLocaleIsRefusedNamingTheOption() throws Exception {
        Process p = java(Map.of("LANG", "C", "LC_ALL", "C"), "simulate", "--size", "8x8x2", "--output",
                dir.resolve("d\u00e4t\u00e4.tif").toString());
        String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(120, TimeUnit.SECONDS));
        if (p.exitValue() == 0) {
            // a JVM that decodes file names as UTF-8 whatever the locale: the name simply works
            assertTrue(Files.exists(dir.resolve("d\u00e4t\u00e4.tif")), out);
            return;
        }
        assertEquals(Main.BAD_INPUT, p.exitValue(), out);
        assertTrue(out.contains("--output: the path") && out.contains("UTF-8 locale"), out);
    }

    /** A stream that remembers what was written, so a test can wait for a progress line. */
    private static final class Watch extends ByteArrayOutputStream {
        synchronized boolean saw(String s) {
            return toString(StandardCharsets.UTF_8).contains(s);
        }
    }

    @Test
    void twoThreadsWritingOneOutputAtOnce() throws Exception {
        Path out = dir.resolve("shared.tif");
        String[] args = {"--iterations", "15", "--delay", "100", "--output", out.toString(), "--overwrite"};
        Watch firstErr = new Watch();
        int[] first = {-1};
        Thread t = new Thread(() -> first[0] = OperationRunner.run(new SlowOperation(), args,
                new PrintStream(new ByteArrayOutputStream()), new PrintStream(firstErr, true, StandardCharsets.UTF_8)));
        t.start();
        long until = System.nanoTime() + 60_000_000_000L;
        while (!firstErr.saw("iteration 1") && System.nanoTime() < until) {
            Thread.sleep(5);
        }
        // the second run starts while the first is working: refused before any work, nothing replaced
        Watch secondErr = new Watch();
        int second = OperationRunner.run(new SlowOperation(), args, new PrintStream(new ByteArrayOutputStream()),
                new PrintStream(secondErr, true, StandardCharsets.UTF_8));
        t.join();
        assertEquals(Main.BAD_INPUT, second, secondErr.toString(StandardCharsets.UTF_8));
        assertTrue(secondErr.saw("--output: another run is writing"), secondErr.toString(StandardCharsets.UTF_8));
        assertEquals(Main.OK, first[0], firstErr.toString(StandardCharsets.UTF_8));
        assertEquals(List.of("shared.tif"), names());
    }

    @Test
    void twoProcessesWritingOneOutputAtOnce() throws Exception {
        Path out = dir.resolve("two.tif");
        Path release = dir.resolve("release"); // the first run holds its output until this exists
        List<String> cmd = List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(), "-cp",
                System.getProperty("java.class.path"), SlowOperation.class.getName(), "--iterations", "1200", "--delay",
                "100", "--until", release.toString(), "--output", out.toString());
        Process first = new ProcessBuilder(cmd).redirectErrorStream(true).start();
        try {
            java.io.InputStream in = first.getInputStream();
            StringBuilder seen = new StringBuilder();
            while (seen.indexOf("iteration 1") < 0) {
                int c = in.read();
                if (c < 0) {
                    break;
                }
                seen.append((char) c);
            }
            assertTrue(seen.indexOf("iteration 1") >= 0, seen.toString());
            Process second = new ProcessBuilder(cmd).redirectErrorStream(true).start();
            String msg = new String(second.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
            assertTrue(second.waitFor(120, TimeUnit.SECONDS));
            assertEquals(Main.BAD_INPUT, second.exitValue(), msg);
            assertTrue(msg.contains("another run is writing"), msg);
            Files.createFile(release);
            in.transferTo(java.io.OutputStream.nullOutputStream());
            assertTrue(first.waitFor(120, TimeUnit.SECONDS));
            assertEquals(Main.OK, first.exitValue());
        } finally {
            first.destroyForcibly();
        }
        Files.deleteIfExists(release);
        assertEquals(List.of("two.tif"), names());
    }

    @Test
    void helpTextHasNoFormatWarnings() {
        PrintStream saved = System.err;
        ByteArrayOutputStream captured = new ByteArrayOutputStream();
        ByteArrayOutputStream help = new ByteArrayOutputStream();
        try {
            System.setErr(new PrintStream(captured, true, StandardCharsets.UTF_8));
            for (String op : Main.commandNames()) {
                assertEquals(Main.OK, Main.run(new String[] {op, "--help"}, new PrintStream(help, true,
                        StandardCharsets.UTF_8), System.err));
            }
        } finally {
            System.setErr(saved);
        }
        String err = captured.toString(StandardCharsets.UTF_8);
        assertFalse(err.contains("WARN"), err);
        assertTrue(help.toString(StandardCharsets.UTF_8).contains("percent of the tile (10%)"));
    }

    private List<String> names() throws Exception {
        try (var s = Files.list(dir)) {
            return s.map(p -> p.getFileName().toString()).sorted().toList();
        }
    }
}
