package org.stackwright.volume;

import java.io.IOException;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;

import ij.ImagePlus;
import ij.io.FileSaver;

/** Non-TIFF outputs (PNG pictures, JSON text), written completely or not at all, like {@link TiffFiles}. */
public final class OutputFiles {

    private OutputFiles() {
    }

    /** Writes bytes to a temporary file in the target folder, then renames it into place. */
    public static void writeText(byte[] bytes, Path path, boolean overwrite) throws IOException {
        Path abs = path.toAbsolutePath();
        TiffFiles.checkWritable(abs, overwrite);
        Path tmp = TiffFiles.temporaryFor(abs);
        try {
            Files.write(tmp, bytes);
            moveIntoPlace(tmp, abs);
        } finally {
            Files.deleteIfExists(tmp);
        }
    }

    /** Writes an image (usually RGB) as PNG, completely or not at all. */
    public static void writePng(ImagePlus imp, Path path, boolean overwrite) {
        Path abs = path.toAbsolutePath();
        TiffFiles.checkWritable(abs, overwrite);
        writeWhole(abs, Path.of(TiffFiles.temporaryFor(abs) + ".png"), new FileSaver(imp)::saveAsPng);
    }

    /** An ImageJ save call: writes the file at the path, returns whether it succeeded. */
    interface Save {
        boolean to(String path);
    }

    /**
     * Lets ImageJ write the temporary file, then renames it into place; no partial file is left when anything
     * fails.
     *
     * @throws java.io.UncheckedIOException when writing or renaming fails
     */
    static void writeWhole(Path abs, Path tmp, Save save) {
        try {
            if (!save.to(tmp.toString()) || !Files.exists(tmp)) {
                throw new IOException("ImageJ could not write " + tmp);
            }
            moveIntoPlace(tmp, abs);
        } catch (IOException e) {
            throw new java.io.UncheckedIOException("could not write " + abs + ": " + e.getMessage(), e);
        } finally {
            try {
                Files.deleteIfExists(tmp);
            } catch (IOException ignored) {
                // the temporary file is hidden and named after the process; nothing more we can do
            }
        }
    }

    public static void moveIntoPlace(Path tmp, Path target) throws IOException {
        try {
            Files.move(tmp, target, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
        } catch (AtomicMoveNotSupportedException e) {
            Files.move(tmp, target, StandardCopyOption.REPLACE_EXISTING);
        }
    }
}
