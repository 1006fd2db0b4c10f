package org.stackwright.cli;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicBoolean;

import org.stackwright.volume.OutputFiles;

/**
 * Cancel on SIGINT (Ctrl-C) or SIGTERM for the command line, without partial files.
 *
 * <p>The JVM answers SIGINT by running shutdown hooks and then halting, whatever the other threads are doing. A
 * hook that only sets a flag would let the JVM halt at once, killing the run mid-iteration or mid-write (the
 * temporary file and its clean-up with it). So the hook sets the cancel flag and then <i>waits</i> until the run
 * has stopped at its next cancel check and cleaned up ({@link #close()}), at most {@link #GRACE_SECONDS}. If the
 * run does not stop in time the hook removes the temporary and claim files of the writes in progress
 * ({@link OutputFiles#temporaryFiles}) before the JVM halts.
 * The process then ends with the usual exit code of an interrupted program (130 for SIGINT).
 */
final class CancelGuard implements AutoCloseable {

    /** How long the shutdown hook waits for the run to stop and clean up. */
    static final int GRACE_SECONDS = 30;

    /** Exit code of a run stopped by SIGINT (128 + 2, the shell convention). */
    static final int SIGNALLED_EXIT = 130;

    /** Set once any guard's hook ran: the JVM is shutting down on a signal. */
    private static final AtomicBoolean SIGNALLED = new AtomicBoolean();

    private final AtomicBoolean cancelled = new AtomicBoolean();
    private final CountDownLatch finished = new CountDownLatch(1);
    private final Thread hook;

    CancelGuard() {
        hook = new Thread(this::onShutdown, "stackwright-cancel");
        Runtime.getRuntime().addShutdownHook(hook);
    }

    /** @return true once a signal asked the run to stop */
    boolean isCancelled() {
        return cancelled.get();
    }

    /**
     * @param code the exit code the run returned
     * @return the code to exit with: {@value #SIGNALLED_EXIT} once a signal started the shutdown. Exiting with
     *     another nonzero code in the moment between the hooks' end and the JVM's halt would halt at once with that
     *     code instead of the signal's.
     */
    static int exitCode(int code) {
        return SIGNALLED.get() ? SIGNALLED_EXIT : code;
    }

    private void onShutdown() {
        SIGNALLED.set(true);
        cancelled.set(true);
        try {
            if (finished.await(GRACE_SECONDS, TimeUnit.SECONDS)) {
                return;
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
        for (Path tmp : OutputFiles.temporaryFiles()) {
            try {
                Files.deleteIfExists(tmp);
            } catch (IOException ignored) {
                // best effort while the JVM halts
            }
        }
    }

    /** Marks the run as stopped and cleaned up; removes the hook when the JVM is not shutting down. */
    @Override
    public void close() {
        finished.countDown();
        try {
            Runtime.getRuntime().removeShutdownHook(hook);
        } catch (IllegalStateException shuttingDown) {
            // the hook is running and now returns; the JVM halts
        }
    }
}
