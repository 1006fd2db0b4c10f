package org.stackwright.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.io.BufferedReader;
import java.io.InputStreamReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.List;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.junit.jupiter.api.Test;

/**
 * SIGINT (Ctrl-C) on a real command-line process: the run stops at the next iteration, writes no output and
 * leaves no temporary file, and the process ends with 130 (128 + SIGINT, the shell convention).
 */
class CancelSignalTest {

    private static final Pattern ITERATION = Pattern.compile("iteration (\\d+)");

    @Test
    void sigintStopsWithinOneIterationAndLeavesNoFile() throws Exception {
        assumeTrue(Files.isExecutable(Paths.get("/bin/kill")) || Files.isExecutable(Paths.get("/usr/bin/kill")),
                "needs the kill command (POSIX)");
        // a process started in the background without job control (nohup, `cmd &` in a script) ignores SIGINT, and
        // its children inherit that: their JVM installs no handler, so the signal cannot be tested there (measured:
        // a verify started with `nohup ... &` failed here twice, the same verify in the foreground passed)
        assumeTrue(!sigintIgnored(), "SIGINT is ignored in this process (started in the background without job "
                + "control); run the tests in the foreground to test cancelling");
        try (Fixtures files = new Fixtures()) {
            Path out = files.path("slow.tif");
            String java = Paths.get(System.getProperty("java.home"), "bin", "java").toString();
            Process p = new ProcessBuilder(java, "-Xmx256m", "-cp", System.getProperty("java.class.path"),
                    SlowOperation.class.getName(), "--iterations", "400", "--delay", "250", "--output", out.toString())
                    .redirectOutput(ProcessBuilder.Redirect.DISCARD).start();
            List<String> lines = new CopyOnWriteArrayList<>();
            CountDownLatch third = new CountDownLatch(1);
            Thread reader = new Thread(() -> {
                try (BufferedReader r = new BufferedReader(new InputStreamReader(p.getErrorStream(), StandardCharsets.UTF_8))) {
                    for (String line; (line = r.readLine()) != null;) {
                        lines.add(line);
                        if (line.contains("iteration 3")) {
                            third.countDown();
                        }
                    }
                } catch (java.io.IOException ignored) {
                    // the process ended
                }
            });
            reader.start();
            assertTrue(third.await(60, TimeUnit.SECONDS), "no progress from the child: " + lines);
            int seen = lastIteration(lines);
            long t0 = System.nanoTime();
            new ProcessBuilder("kill", "-INT", Long.toString(p.pid())).start().waitFor();
            assertTrue(p.waitFor(20, TimeUnit.SECONDS), "the process did not stop after SIGINT");
            double seconds = (System.nanoTime() - t0) * 1e-9;
            reader.join(5000);
            assertEquals(130, p.exitValue(), "exit code; stderr: " + lines);
            assertTrue(lines.stream().anyMatch(l -> l.contains("cancelled; no output written")), "stderr: " + lines);
            int last = lastIteration(lines);
            // the signal can arrive just after iteration `seen` was reported: at most one more iteration starts
            assertTrue(last <= seen + 1, "iterations after the signal: seen " + seen + ", last " + last);
            assertTrue(seconds < 5, "took " + seconds + " s to stop");
            assertFalse(Files.exists(out), "output written after SIGINT");
            assertEquals(List.of(), Fixtures.temporaryFiles(files.dir));
        }
    }

    private static int lastIteration(List<String> lines) {
        int last = 0;
        for (String l : lines) {
            Matcher m = ITERATION.matcher(l);
            if (m.find()) {
                last = Math.max(last, Integer.parseInt(m.group(1)));
            }
        }
        return last;
    }

    /** @return whether this process ignores SIGINT (Linux: bit 2 of SigIgn in /proc/self/status); false elsewhere */
    static boolean sigintIgnored() {
        try {
            for (String l : Files.readAllLines(Paths.get("/proc/self/status"))) {
                if (l.startsWith("SigIgn:")) {
                    return (Long.parseLong(l.substring(7).trim(), 16) & 2L) != 0;
                }
            }
        } catch (java.io.IOException | RuntimeException e) {
            return false;
        }
        return false;
    }
}
