package org.stackwright.volume;

import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.FileSystemException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.util.Iterator;
import java.util.List;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicLong;

import javax.imageio.ImageIO;
import javax.imageio.ImageWriter;
import javax.imageio.stream.ImageOutputStream;
import javax.imageio.stream.MemoryCacheImageOutputStream;

import ij.ImagePlus;

/**
 * Every output file is written here, completely or not at all: the bytes go to a hidden temporary file in the
 * output's folder (short name, {@link OutputPaths#hiddenSibling}), through a stream this class controls, so every
 * write error (a full disk, a quota, a removed folder) reaches the caller as an exception; the file is forced to the
 * disk, then renamed into place. Without overwrite the rename cannot replace a file that appeared meanwhile (a hard
 * link, which fails when the name exists, then the temporary name removed); with overwrite it replaces atomically.
 * On any failure the temporary file is removed and the target is left as it was.
 *
 * <p>ImageJ's own writers are not used for the bytes on the disk: its PNG writer reports an I/O error on stdout and
 * carries on, and its TIFF writer shows a dialog. TIFFs are encoded by ImageJ's {@code TiffEncoder} into our
 * stream ({@link TiffWriting}), PNGs by the JDK's ImageIO.
 */
public final class OutputFiles {

    /** The bytes of one output, written to a stream (not closed by the body). */
    @FunctionalInterface
    public interface Body {
        void writeTo(OutputStream out) throws IOException;
    }

    /**
     * Opens the stream a temporary file is written through. The default creates the file and forces it to the
     * disk on close; tests inject one that fails after some bytes (a full disk without a full disk).
     */
    @FunctionalInterface
    public interface Sink {
        OutputStream open(Path temporary) throws IOException;
    }

    /** The default sink: a new file, written through its channel, forced to the disk when closed. */
    public static final Sink FILE = OutputFiles::openForced;

    private static final Set<Path> TEMPORARY = ConcurrentHashMap.newKeySet();
    private static final AtomicLong SEQUENCE = new AtomicLong();

    private OutputFiles() {
    }

    /** Writes bytes (a JSON record), completely or not at all. */
    public static void writeText(byte[] bytes, Path path, boolean overwrite) throws IOException {
        Path target = prepare(path, overwrite);
        try {
            writeWhole(target, overwrite, out -> out.write(bytes), FILE);
        } catch (UncheckedIOException e) {
            throw e.getCause();
        }
    }

    /** Writes an image (usually RGB) as PNG through ImageIO, completely or not at all. */
    public static void writePng(ImagePlus imp, Path path, boolean overwrite) {
        Path target = prepare(path, overwrite);
        writeWhole(target, overwrite, out -> png(imp, out), FILE);
    }

    /** Encodes the image as PNG (the overlay burnt in, as ImageJ's PNG writer does) into the stream. */
    static void png(ImagePlus imp, OutputStream out) throws IOException {
        ImagePlus flat = imp.getOverlay() != null && !imp.getHideOverlay() ? imp.flatten() : imp;
        Iterator<ImageWriter> writers = ImageIO.getImageWritersByFormatName("png");
        if (!writers.hasNext()) {
            throw new IOException("no PNG writer in this Java runtime");
        }
        ImageWriter w = writers.next();
        try (ImageOutputStream ios = new MemoryCacheImageOutputStream(out)) {
            w.setOutput(ios);
            w.write(flat.getBufferedImage());
            ios.flush();
        } finally {
            w.dispose();
        }
    }

    /**
     * Checks an output path before writing and returns where to write: its real path (links resolved), refused
     * when its folder is missing or not writable, it is a folder, or it exists and overwrite is false.
     */
    static Path prepare(Path path, boolean overwrite) {
        Path target = OutputPaths.real(path);
        TiffFiles.checkWritable(target, overwrite);
        return target;
    }

    /**
     * Writes a file completely or not at all.
     *
     * @param target where the file goes (a real path; its folder exists)
     * @param overwrite whether an existing file may be replaced; if false and the file appears while writing, it
     *     is kept and this write fails
     * @param body writes the bytes
     * @param sink opens the temporary file's stream ({@link #FILE})
     * @throws UncheckedIOException when writing, forcing or renaming fails; the target is then unchanged and no
     *     temporary file is left
     */
    public static void writeWhole(Path target, boolean overwrite, Body body, Sink sink) {
        Path tmp = OutputPaths.hiddenSibling(target, ".part-" + ProcessHandle.current().pid() + "-"
                + SEQUENCE.incrementAndGet());
        registerTemporary(tmp);
        try {
            try (OutputStream out = sink.open(tmp)) {
                body.writeTo(out);
            }
            publish(tmp, target, overwrite);
        } catch (java.nio.channels.ClosedByInterruptException e) {
            // an interrupt (a cancel) closes the channel: the write stops and nothing is left
            throw new org.stackwright.parallel.CancelledException("cancelled; " + target + " not written");
        } catch (IOException e) {
            throw new UncheckedIOException("could not write " + target + ": " + reason(e), e);
        } finally {
            try {
                Files.deleteIfExists(tmp);
            } catch (IOException ignored) {
                // the temporary file is hidden and named after the process; nothing more we can do
            }
            unregisterTemporary(tmp);
        }
    }

    /**
     * Puts a complete temporary file or folder, written by a streaming sink under a {@link TiffFiles#temporaryFor}
     * name, in place, replacing what is there.
     */
    public static void moveIntoPlace(Path tmp, Path target) throws IOException {
        moveIntoPlace(tmp, target, true);
    }

    /**
     * Puts a complete temporary file or folder in place; without overwrite a file that appeared meanwhile is kept
     * and this fails. The temporary name is then no longer removed at a cancel.
     */
    public static void moveIntoPlace(Path tmp, Path target, boolean overwrite) throws IOException {
        try {
            publish(tmp, target, overwrite);
            // without overwrite a file is put in place as a hard link: its temporary name goes now
            if (Files.isRegularFile(tmp, java.nio.file.LinkOption.NOFOLLOW_LINKS)) {
                Files.delete(tmp);
            }
        } finally {
            unregisterTemporary(tmp);
        }
    }

    /** Puts the complete temporary file in place: replacing (overwrite) or only when the name is still free. */
    private static void publish(Path tmp, Path target, boolean overwrite) throws IOException {
        if (overwrite) {
            try {
                Files.move(tmp, target, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
            } catch (AtomicMoveNotSupportedException e) {
                Files.move(tmp, target, StandardCopyOption.REPLACE_EXISTING);
            }
            return;
        }
        try {
            Files.createLink(target, tmp);
        } catch (FileAlreadyExistsException e) {
            throw new IOException("the file appeared while this run was writing it (written by another program?);"
                    + " it was not replaced", e);
        } catch (UnsupportedOperationException | FileSystemException e) {
            // a file system without hard links: the name is checked once more and the file moved
            if (e instanceof FileAlreadyExistsException || Files.exists(target)) {
                throw new IOException("the file appeared while this run was writing it; it was not replaced", e);
            }
            Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE);
        }
    }

    /** @return the reason of an I/O failure in words, e.g. "No space left on device" */
    static String reason(IOException e) {
        String m = e instanceof FileSystemException fs && fs.getReason() != null ? fs.getReason() : e.getMessage();
        if (m == null) {
            m = e.getClass().getSimpleName();
        }
        // a wrapped cause (ImageIO's "I/O error writing PNG file!") holds the system's reason
        Throwable root = e;
        while (root.getCause() != null && root.getCause() != root) {
            root = root.getCause();
        }
        if (root != e && root.getMessage() != null && !m.contains(root.getMessage())) {
            m += " (" + root.getMessage() + ")";
        }
        return m;
    }

    private static OutputStream openForced(Path tmp) throws IOException {
        FileChannel ch = FileChannel.open(tmp, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE);
        return new BufferedOutputStream(new OutputStream() {
            @Override
            public void write(int b) throws IOException {
                write(new byte[] {(byte) b}, 0, 1);
            }

            @Override
            public void write(byte[] b, int off, int len) throws IOException {
                ByteBuffer buf = ByteBuffer.wrap(b, off, len);
                while (buf.hasRemaining()) {
                    ch.write(buf);
                }
            }

            @Override
            public void close() throws IOException {
                try (ch) {
                    ch.force(true);
                }
            }
        }, 1 << 16);
    }

    /** Remembers a temporary or claim file that must not outlive the process (see {@link #temporaryFiles}). */
    static void registerTemporary(Path p) {
        TEMPORARY.add(p);
    }

    static void unregisterTemporary(Path p) {
        TEMPORARY.remove(p);
    }

    /**
     * @return the temporary and claim files of writes and claims in progress in this process, for a shutdown hook
     *     that removes them when the process is stopped mid-write
     */
    public static List<Path> temporaryFiles() {
        return List.copyOf(TEMPORARY);
    }
}
