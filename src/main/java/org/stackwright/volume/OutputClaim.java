package org.stackwright.volume;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.channels.FileLock;
import java.nio.charset.StandardCharsets;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.nio.file.attribute.BasicFileAttributes;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;

/**
 * A claim on an output name for the length of a run, so two runs (processes or threads) writing the same output
 * cannot silently replace each other's result. Taken at the start, before the work: a hidden claim file next to
 * the output (short name, see {@link OutputPaths#hiddenSibling}) is created or opened and locked with an operating
 * system lock, which the system releases when the process ends however it ends, so a crash leaves no stale claim.
 * A second run finds the lock held and is refused at once; the writers check again at the rename
 * ({@link OutputFiles}: an output that appeared meanwhile is not replaced without overwrite). Creating the claim
 * file also proves the folder is writable for real (permissions, read-only mounts, quotas at zero).
 *
 * <p>Closing releases the claim and removes its file (before releasing the lock, so that no other run can lock a
 * file that is then removed under it). A run that locked a claim file its previous holder had just removed sees
 * the file's key (device and inode) change under the name and is refused. Within one process a set of held claims
 * answers before the file is opened: on POSIX systems closing any handle of a file drops the process's locks on
 * it.
 */
public final class OutputClaim implements AutoCloseable {

    /** Claim files held by this process (a second claim from another thread is refused without opening it). */
    private static final Set<Path> HELD = ConcurrentHashMap.newKeySet();

    private final Path file;
    private final FileChannel channel;
    private final FileLock lock;

    private OutputClaim(Path file, FileChannel channel, FileLock lock) {
        this.file = file;
        this.channel = channel;
        this.lock = lock;
    }

    /**
     * @param key the option the output came from, named in messages
     * @param output the output file (a real path: {@link OutputPaths#real})
     * @return the claim; close it when the run has written or given up
     * @throws IllegalArgumentException naming the key when another run holds the name, or the folder cannot take a
     *     file
     */
    public static OutputClaim take(String key, Path output) {
        Path f = OutputPaths.hiddenSibling(output, ".claim");
        if (!HELD.add(f)) {
            // another thread of this process: never open the file (closing any handle of a locked file drops the
            // process's lock on POSIX systems)
            throw busy(key, output);
        }
        FileChannel ch = null;
        try {
            Object before = null;
            try {
                ch = FileChannel.open(f, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE);
            } catch (FileAlreadyExistsException e) {
                before = fileKey(f);
                ch = FileChannel.open(f, StandardOpenOption.WRITE);
            }
            FileLock lock = ch.tryLock();
            // a key that changed means we locked a claim file its previous holder had just removed, while another
            // run created and claimed a new one
            Object now = fileKey(f);
            if (lock == null || now == null || (before != null && !before.equals(now))) {
                throw busy(key, output);
            }
            ch.truncate(0);
            ch.write(ByteBuffer.wrap((ProcessHandle.current().pid() + " " + output.getFileName())
                    .getBytes(StandardCharsets.UTF_8)), 0);
            OutputFiles.registerTemporary(f);
            return new OutputClaim(f, ch, lock);
        } catch (java.nio.channels.ClosedByInterruptException e) {
            // the run was interrupted (cancelled) while claiming: nothing was written
            closeQuietly(ch);
            HELD.remove(f);
            throw new org.stackwright.parallel.CancelledException("cancelled; no output written");
        } catch (IOException e) {
            closeQuietly(ch);
            HELD.remove(f);
            throw new IllegalArgumentException(key + ": cannot create a file in " + output.getParent() + " ("
                    + OutputFiles.reason(e) + "); choose a writable folder", e);
        } catch (RuntimeException e) {
            closeQuietly(ch);
            HELD.remove(f);
            throw e;
        }
    }

    /** @return the file system's key (device and inode) of the file, or null when it does not exist */
    private static Object fileKey(Path f) throws IOException {
        try {
            return Files.readAttributes(f, BasicFileAttributes.class).fileKey();
        } catch (NoSuchFileException e) {
            return null;
        }
    }

    private static void closeQuietly(FileChannel ch) {
        if (ch != null) {
            try {
                ch.close();
            } catch (IOException ignored) {
                // closing after a failure; the first problem is reported
            }
        }
    }

    private static IllegalArgumentException busy(String key, Path output) {
        return new IllegalArgumentException(key + ": another run is writing " + output + " right now; wait for it"
                + " to finish or choose another name");
    }

    /** Releases the claim and removes the claim file. */
    @Override
    public void close() {
        try {
            Files.deleteIfExists(file);
        } catch (IOException ignored) {
            // the lock is released below in any case; a left claim file is reused by the next run
        }
        try {
            lock.release();
        } catch (IOException ignored) {
            // the system releases the lock with the channel or the process
        }
        closeQuietly(channel);
        HELD.remove(file);
        OutputFiles.unregisterTemporary(file);
    }
}
