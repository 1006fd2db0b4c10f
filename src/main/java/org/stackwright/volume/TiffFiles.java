package org.stackwright.volume;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.ImagePlus;
import ij.io.Opener;

/**
 * TIFF reading and writing through ImageJ 1.x, calibration included (and what ImageJ misses of OME-TIFFs:
 * {@link OmeMetadata}). Writing is all-or-nothing ({@link OutputFiles}): the file is written under a temporary name
 * in the target folder and renamed when complete.
 */
public final class TiffFiles {

    private TiffFiles() {
    }

    /**
     * Opens a TIFF file as an ImagePlus.
     *
     * @param what the name of the parameter the path came from (for messages), e.g. "--input"
     * @throws IllegalArgumentException naming the parameter when the file is missing, unreadable, not a TIFF or
     *     damaged
     */
    public static ImagePlus open(Path path, String what) {
        if (path == null) {
            throw new IllegalArgumentException(what + ": no file given");
        }
        if (!Files.exists(path)) {
            throw new IllegalArgumentException(what + ": file " + path + " does not exist");
        }
        if (Files.isDirectory(path)) {
            throw new IllegalArgumentException(what + ": " + path + " is a folder; give a TIFF file");
        }
        if (!Files.isReadable(path)) {
            throw new IllegalArgumentException(what + ": file " + path + " cannot be read (check its permissions)");
        }
        byte[] head = new byte[4];
        int got;
        try (InputStream in = Files.newInputStream(path)) {
            got = in.readNBytes(head, 0, 4);
        } catch (IOException e) {
            throw new IllegalArgumentException(what + ": file " + path + " cannot be read: " + e.getMessage(), e);
        }
        boolean tiff = got == 4 && ((head[0] == 'I' && head[1] == 'I' && head[2] == 42 && head[3] == 0)
                || (head[0] == 'M' && head[1] == 'M' && head[2] == 0 && head[3] == 42));
        boolean bigTiff = got == 4 && ((head[0] == 'I' && head[1] == 'I' && head[2] == 43 && head[3] == 0)
                || (head[0] == 'M' && head[1] == 'M' && head[2] == 0 && head[3] == 43));
        if (bigTiff) {
            throw new IllegalArgumentException(what + ": " + path + " is a BigTIFF file, which ImageJ 1.x cannot read; "
                    + "save it as a standard TIFF (under 4 GB) first");
        }
        if (!tiff) {
            throw new IllegalArgumentException(what + ": " + path + " is not a TIFF file (save it as TIFF first)");
        }
        // the structure walk and the size check run before ImageJ's reader, which trusts the header's offsets
        TiffCheck.Layout layout = TiffCheck.requireComplete(path, what);
        long images = layout.images();
        ImagePlus imp;
        try {
            Path abs = path.toAbsolutePath();
            String folder = abs.getParent().toString() + java.io.File.separator;
            String name = abs.getFileName().toString();
            imp = new Opener().openTiff(folder, name);
        } catch (RuntimeException e) {
            if (e instanceof IllegalArgumentException) {
                throw e;
            }
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged or unsupported ("
                    + e.getClass().getSimpleName() + (e.getMessage() == null ? "" : ": " + e.getMessage()) + ")", e);
        }
        if (imp == null || imp.getStack() == null || imp.getStackSize() < 1 || imp.getProcessor() == null) {
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged or truncated (ImageJ could not read its pixels)");
        }
        if (imp.getStackSize() < images) {
            throw new IllegalArgumentException(what + ": TIFF file " + path + " describes " + images + " images of "
                    + imp.getWidth() + "x" + imp.getHeight() + " but ImageJ read only " + imp.getStackSize()
                    + " (the file is damaged, or mixes pages of other sizes such as thumbnails: save the stack alone"
                    + " as TIFF)");
        }
        OmeMetadata.Pixels ome = OmeMetadata.parse(layout.description());
        if (ome != null) {
            imp = OmeMetadata.apply(imp, ome);
        }
        // plain TIFF has no tag for the z step: only ImageJ's description ("spacing=") and OME-XML record it
        String desc = layout.description();
        boolean zRecorded = (desc != null && desc.startsWith("ImageJ") && desc.contains("spacing="))
                || (ome != null && Double.isFinite(ome.sizeZ()));
        if (imp.getNSlices() > 1 && !zRecorded && ImagePlusAdapter.isCalibrated(imp)) {
            imp.setProp(ImagePlusAdapter.Z_STEP_UNKNOWN, "true");
        }
        imp.setTitle(titleOf(path));
        return imp;
    }

    /** Opens channel 1, time point 1 of a TIFF file as a volume. */
    public static Volume read(Path path, String what) {
        return ImagePlusAdapter.toVolume(open(path, what));
    }

    /** @return the file name without its .tif/.tiff ending */
    public static String titleOf(Path path) {
        String name = path.getFileName().toString();
        return name.replaceFirst("(?i)\\.(ome\\.)?tiff?$", "");
    }

    /** Writes a volume as a 32-bit TIFF with its calibration; see {@link #write(ImagePlus, Path, boolean)}. */
    public static void write(Volume v, Path path, boolean overwrite) {
        write(ImagePlusAdapter.toImagePlus(v, titleOf(path)), path, overwrite);
    }

    /**
     * Writes an image as TIFF, completely or not at all ({@link OutputFiles#writeWhole}), to the path's real
     * location (symbolic links resolved).
     *
     * @param overwrite whether an existing file may be replaced
     * @throws IllegalArgumentException when the folder is missing or not writable, or the file exists and
     *     overwrite is false
     * @throws java.io.UncheckedIOException when writing fails (no partial file is left)
     */
    public static void write(ImagePlus imp, Path path, boolean overwrite) {
        Path target = OutputFiles.prepare(path, overwrite);
        OutputFiles.writeWhole(target, overwrite, out -> TiffWriting.encode(imp, out), OutputFiles.FILE);
    }

    /**
     * The hidden temporary file or folder a streaming output (written block by block) goes to before
     * {@link OutputFiles#moveIntoPlace} renames it: in the output's folder (so the rename is atomic), a short name
     * ({@link OutputPaths#hiddenSibling}) with this process's id. It is registered with
     * {@link OutputFiles#temporaryFiles}, so a cancelled run removes it.
     */
    public static Path temporaryFor(Path output) {
        Path tmp = OutputPaths.hiddenSibling(output.toAbsolutePath(), ".part-" + ProcessHandle.current().pid());
        OutputFiles.registerTemporary(tmp);
        return tmp;
    }

    /**
     * Checks an output path before any work is done.
     *
     * @throws IllegalArgumentException naming the path when its folder is missing or read-only, or the file exists
     *     and overwrite is false
     */
    public static void checkWritable(Path path, boolean overwrite) {
        Path abs = OutputPaths.real(path);
        if (Files.isSymbolicLink(abs)) {
            throw new IllegalArgumentException("output " + path + " is a symbolic link that leads nowhere (a loop of"
                    + " links); remove it or choose another name");
        }
        Path dir = abs.getParent();
        if (dir == null || !Files.isDirectory(dir)) {
            throw new IllegalArgumentException("output folder " + dir + " does not exist; create it first");
        }
        if (!Files.isWritable(dir)) {
            throw new IllegalArgumentException("output folder " + dir + " is not writable");
        }
        if (Files.isDirectory(abs)) {
            throw new IllegalArgumentException("output " + abs + " is a folder; give a file name");
        }
        OutputPaths.checkName("output", abs);
        if (Files.exists(abs) && !overwrite) {
            throw new IllegalArgumentException("output file " + abs + " exists; choose another name or allow overwriting (--overwrite)");
        }
    }
}
