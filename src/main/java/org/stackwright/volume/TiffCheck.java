package org.stackwright.volume;

import java.io.File;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.io.FileInfo;
import ij.io.TiffDecoder;

/**
 * Checks that a TIFF file holds all the pixel data its header promises before ImageJ reads it. ImageJ's reader
 * fills a truncated stack silently (it returns the planes that are there, or zeros), which would give a silently
 * wrong result; a damaged header can also ask for absurd sizes. TIFF has no checksum, so flipped bits inside the
 * pixel data cannot be detected by any reader; flipped bits in the header are caught when they point outside the
 * file or give impossible sizes.
 */
final class TiffCheck {

    /**
     * @param images the number of images (planes) of the first image's size
     * @param description the first image's ImageDescription (null when it has none), e.g. OME-XML
     */
    record Layout(long images, String description) {
    }

    private TiffCheck() {
    }

    /**
     * @param path an existing, readable file starting with a TIFF signature
     * @param what the parameter the path came from, for messages
     * @return the number of images (planes) of the first image's size the file describes (pages of another size,
     *     thumbnails, are not part of the stack ImageJ opens, so a caller can check ImageJ read them all) and the
     *     first image's description
     * @throws IllegalArgumentException naming the parameter when the header cannot be read or the pixel data
     *     would extend past the end of the file
     */
    static Layout requireComplete(Path path, String what) {
        Path abs = path.toAbsolutePath();
        long length;
        FileInfo[] info;
        String problem;
        try {
            problem = TiffStructure.problem(abs);
        } catch (IOException e) {
            problem = "it cannot be read (" + e.getMessage() + ")";
        }
        if (problem != null) {
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is truncated or damaged: " + problem);
        }
        try {
            length = Files.size(abs);
            info = new TiffDecoder(abs.getParent().toString() + File.separator, abs.getFileName().toString()).getTiffInfo();
        } catch (IOException e) {
            if (e.getMessage() != null && e.getMessage().startsWith("Unsupported")) {
                throw new IllegalArgumentException(what + ": TIFF file " + path + " is of a kind that cannot be read ("
                        + e.getMessage() + "); allowed: 8, 16 or 32-bit grayscale (convert 64-bit images to 32-bit)", e);
            }
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged: its header cannot be read ("
                    + e.getMessage() + ")", e);
        } catch (OutOfMemoryError e) {
            // the decoder reads only headers and metadata; asking for the whole heap means a damaged count (one
            // failed huge allocation, which frees nothing and leaves the heap as it was)
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged: its header asks for an"
                    + " impossible amount of memory", e);
        } catch (RuntimeException e) {
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged: its header cannot be read ("
                    + e.getClass().getSimpleName() + (e.getMessage() == null ? "" : ": " + e.getMessage()) + ")", e);
        }
        if (info == null || info.length == 0) {
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged: it describes no image");
        }
        long images = 0;
        for (FileInfo fi : info) {
            if (fi.width < 1 || fi.height < 1 || fi.nImages < 1) {
                throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged: it gives an image size of "
                        + fi.width + "x" + fi.height + " with " + fi.nImages + " planes");
            }
            long end = dataEnd(fi);
            if (end > length || end < 0) {
                throw new IllegalArgumentException(what + ": TIFF file " + path + " is truncated or damaged: its pixel data"
                        + " would end at byte " + end + " but the file has " + length + " bytes");
            }
            if (fi.width == info[0].width && fi.height == info[0].height) {
                images += fi.nImages;
            }
        }
        return new Layout(images, info[0].description);
    }

    /**
     * @return the byte after the last pixel byte the header describes: the end of every strip, and for
     *     uncompressed data the end of the last plane (first offset + planes x plane size + gaps)
     */
    private static long dataEnd(FileInfo fi) {
        long end = 0;
        if (fi.stripOffsets != null && fi.stripLengths != null) {
            for (int i = 0; i < Math.min(fi.stripOffsets.length, fi.stripLengths.length); i++) {
                end = Math.max(end, Integer.toUnsignedLong(fi.stripOffsets[i]) + Integer.toUnsignedLong(fi.stripLengths[i]));
            }
        }
        if (fi.compression <= FileInfo.COMPRESSION_NONE) {
            long plane = (long) fi.width * fi.height * Math.max(1, fi.getBytesPerPixel());
            long first = fi.getOffset();
            long stack = first + fi.nImages * plane + (fi.nImages - 1) * Math.max(0L, fi.getGap());
            end = Math.max(end, stack);
        }
        return end;
    }
}
