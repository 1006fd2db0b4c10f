package org.stackwright.blocks;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A grayscale stack in an uncompressed TIFF or BigTIFF file, read by random access: a block reads just the rows of
 * the planes it needs, so a stack far larger than memory can be processed. Reads 8, 16 and 32-bit samples (unsigned,
 * signed or float), one sample per pixel, in strips (tiled and compressed files are refused with a message). The
 * planes are the directories of the first directory's size (thumbnails of another size are skipped); an ImageJ file
 * whose description promises more images than it has directories (ImageJ's way of saving a stack over 4 GB) holds
 * them one after the other from the first plane on. Calibration: ImageJ's "unit" and "spacing" in the description,
 * else the resolution tags in centimetres or inches.
 */
public final class TiffPlaneSource implements PlaneSource {

    private final Path path;
    private final String title;
    private final FileChannel ch;
    private final ByteOrder order;
    private final int width;
    private final int height;
    private final int bits;
    private final int format;
    private final long rowsPerStrip;
    /** per plane, per strip: the byte offset */
    private final long[][] strips;
    private final VoxelSize voxel;
    private final boolean calibrated;

    private TiffPlaneSource(Path path, String title, FileChannel ch, ByteOrder order, int width, int height, int bits,
            int format, long rowsPerStrip, long[][] strips, VoxelSize voxel, boolean calibrated) {
        this.path = path;
        this.title = title;
        this.ch = ch;
        this.order = order;
        this.width = width;
        this.height = height;
        this.bits = bits;
        this.format = format;
        this.rowsPerStrip = rowsPerStrip;
        this.strips = strips;
        this.voxel = voxel;
        this.calibrated = calibrated;
    }

    /**
     * Opens a file for reading (the file is not changed, ever).
     *
     * @param what the parameter the path came from, for messages (e.g. "--input")
     * @throws IllegalArgumentException naming the parameter when the file is missing, not a TIFF, damaged, or of a
     *     kind that cannot be read by random access
     */
    public static TiffPlaneSource open(Path path, String what) {
        if (!Files.isRegularFile(path)) {
            throw new IllegalArgumentException(what + ": file " + path + (Files.isDirectory(path)
                    ? " is a folder; give a TIFF file" : " does not exist"));
        }
        FileChannel ch;
        try {
            ch = FileChannel.open(path, StandardOpenOption.READ);
        } catch (IOException e) {
            throw new IllegalArgumentException(what + ": file " + path + " cannot be read: " + e.getMessage(), e);
        }
        try {
            return build(path, what, ch);
        } catch (RuntimeException | IOException e) {
            try {
                ch.close();
            } catch (IOException ignored) {
                // already failing
            }
            if (e instanceof IllegalArgumentException iae && iae.getMessage().startsWith(what)) {
                throw iae;
            }
            throw new IllegalArgumentException(what + ": TIFF file " + path + " cannot be streamed: " + e.getMessage(), e);
        }
    }

    private static TiffPlaneSource build(Path path, String what, FileChannel ch) throws IOException {
        ByteOrder[] order = new ByteOrder[1];
        List<TiffDirectories.Directory> dirs;
        try {
            dirs = TiffDirectories.read(ch, order);
        } catch (IllegalArgumentException e) {
            throw new IllegalArgumentException(what + ": " + path + " is not a readable TIFF: " + e.getMessage(), e);
        }
        TiffDirectories.Directory first = dirs.get(0);
        String kind = null;
        if (first.tiled()) {
            kind = "tiled";
        } else if (first.compression() != 1) {
            kind = "compressed (compression " + first.compression() + ")";
        } else if (first.samples() != 1) {
            kind = "colour or multi-sample (" + first.samples() + " samples per pixel)";
        } else if (first.bits() != 8 && first.bits() != 16 && first.bits() != 32) {
            kind = first.bits() + "-bit";
        } else if (first.format() == 3 && first.bits() != 32) {
            kind = first.bits() + "-bit floating point";
        } else if (first.stripOffsets() == null) {
            kind = "without strip offsets";
        }
        if (kind != null) {
            throw new IllegalArgumentException(what + ": " + path + " is a " + kind + " TIFF, which cannot be read plane"
                    + " by plane; save it as an uncompressed 8, 16 or 32-bit grayscale TIFF (ImageJ: File>Save As>Tiff)");
        }
        if (first.width() < 1 || first.height() < 1 || first.width() > 1_000_000 || first.height() > 1_000_000) {
            throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged: it gives an image size of "
                    + first.width() + "x" + first.height());
        }
        int w = (int) first.width();
        int h = (int) first.height();
        long rowBytes = (long) w * first.bits() / 8;
        String desc = first.description();
        int channels = intField(desc, "channels", 1);
        int frames = intField(desc, "frames", 1);
        if (channels > 1 || frames > 1) {
            throw new IllegalArgumentException(what + ": " + path + " is a hyperstack with " + channels + " channels and "
                    + frames + " time points; give one channel and one time point (split the hyperstack first)");
        }
        List<long[]> planes = new ArrayList<>();
        long size = ch.size();
        for (TiffDirectories.Directory d : dirs) {
            if (d.width() != w || d.height() != h) {
                continue;
            }
            if (d.bits() != first.bits() || d.format() != first.format() || d.compression() != 1 || d.tiled()
                    || d.samples() != 1 || d.stripOffsets() == null || d.rowsPerStrip() != first.rowsPerStrip()) {
                throw new IllegalArgumentException(what + ": " + path + " mixes planes of different kinds (plane "
                        + (planes.size() + 1) + "); save the stack again as one uncompressed TIFF");
            }
            long strips = (h + d.rowsPerStrip() - 1) / d.rowsPerStrip();
            if (d.stripOffsets().length < strips) {
                throw new IllegalArgumentException(what + ": TIFF file " + path + " is damaged: plane " + (planes.size() + 1)
                        + " has " + d.stripOffsets().length + " strips, " + strips + " needed");
            }
            planes.add(d.stripOffsets());
        }
        int images = intField(desc, "images", planes.size());
        if (desc != null && desc.startsWith("ImageJ") && images > planes.size()) {
            // ImageJ writes a stack as one run of planes; over 4 GB it keeps only the first directory
            long base = planes.get(0)[0];
            long planeBytes = rowBytes * h;
            planes.clear();
            for (int z = 0; z < images; z++) {
                planes.add(new long[] {base + z * planeBytes});
            }
            long[][] arr = planes.toArray(new long[0][]);
            checkInside(what, path, arr, h, rowBytes, h, size);
            return create(path, ch, order[0], first, w, h, h, arr);
        }
        long[][] arr = planes.toArray(new long[0][]);
        checkInside(what, path, arr, first.rowsPerStrip(), rowBytes, h, size);
        return create(path, ch, order[0], first, w, h, first.rowsPerStrip(), arr);
    }

    private static TiffPlaneSource create(Path path, FileChannel ch, ByteOrder order, TiffDirectories.Directory first,
            int w, int h, long rps, long[][] planes) {
        double[] cal = calibration(first);
        boolean calibrated = cal != null;
        VoxelSize voxel = calibrated ? new VoxelSize(cal[0], cal[1], cal[2]) : VoxelSize.UNIT;
        int format = first.format() == 3 ? 3 : first.format() == 2 ? 2 : 1;
        return new TiffPlaneSource(path, TiffFiles.titleOf(path), ch, order, w, h, first.bits(), format, rps, planes,
                voxel, calibrated);
    }

    private static void checkInside(String what, Path path, long[][] planes, long rps, long rowBytes, int h, long size) {
        for (int z = 0; z < planes.length; z++) {
            long[] s = planes[z];
            int strips = (int) ((h + rps - 1) / rps);
            for (int i = 0; i < strips; i++) {
                long rows = Math.min(rps, h - i * rps);
                if (s[i] < 0 || s[i] + rows * rowBytes > size) {
                    throw new IllegalArgumentException(what + ": TIFF file " + path + " is truncated or damaged: plane "
                            + (z + 1) + " would end after the file's " + size + " bytes");
                }
            }
        }
    }

    /** @return um per voxel in x, y, z, or null when the file has no usable length unit */
    private static double[] calibration(TiffDirectories.Directory d) {
        String desc = d.description();
        double f = -1;
        String unit = textField(desc, "unit");
        if (unit != null) {
            f = ImagePlusAdapter.unitToMicrometres(unit.replace("\\u00B5", "u"));
        } else if (d.resolutionUnit() == 3) {
            f = 1e4;
        } else if (d.resolutionUnit() == 2) {
            f = 25_400;
        }
        if (f <= 0 || !(d.xResolution() > 0)) {
            return null;
        }
        double x = f / d.xResolution();
        double y = d.yResolution() > 0 ? f / d.yResolution() : x;
        String spacing = textField(desc, "spacing");
        double z = x;
        if (spacing != null) {
            try {
                double s = Double.parseDouble(spacing);
                if (s > 0 && Double.isFinite(s)) {
                    z = s * f;
                }
            } catch (NumberFormatException ignored) {
                // keep z = x, as ImageJ does for a stack without spacing
            }
        }
        return new double[] {x, y, z};
    }

    private static String textField(String desc, String key) {
        if (desc == null || !desc.startsWith("ImageJ")) {
            return null;
        }
        Matcher m = Pattern.compile("(?m)^" + key + "=(.*)$").matcher(desc);
        return m.find() ? m.group(1).trim() : null;
    }

    private static int intField(String desc, String key, int fallback) {
        String v = textField(desc, key);
        if (v == null) {
            return fallback;
        }
        try {
            return Math.max(1, Integer.parseInt(v));
        } catch (NumberFormatException e) {
            return fallback;
        }
    }

    @Override
    public int width() {
        return width;
    }

    @Override
    public int height() {
        return height;
    }

    @Override
    public int depth() {
        return strips.length;
    }

    @Override
    public VoxelSize voxel() {
        return voxel;
    }

    @Override
    public boolean calibrated() {
        return calibrated;
    }

    @Override
    public int bitDepth() {
        return bits;
    }

    @Override
    public String title() {
        return title;
    }

    /** @return the file */
    public Path path() {
        return path;
    }

    @Override
    public Volume read(Box box) {
        int d = depth() == 1 ? 1 : box.d();
        float[] out = new float[box.w() * box.h() * d];
        int bpp = bits / 8;
        long rowBytes = (long) width * bpp;
        boolean fullRows = box.w() * 2 >= width;
        int chunkRows = fullRows ? (int) Math.max(1, Math.min(box.h(), (1 << 22) / rowBytes)) : 1;
        ByteBuffer buf = ByteBuffer.allocate((int) (fullRows ? chunkRows * rowBytes : (long) box.w() * bpp)).order(order);
        try {
            for (int k = 0; k < d; k++) {
                long[] s = strips[depth() == 1 ? 0 : box.z() + k];
                int y = 0;
                while (y < box.h()) {
                    int row = box.y() + y;
                    long strip = row / rowsPerStrip;
                    long inStrip = row % rowsPerStrip;
                    // rows left in this strip, so a read never crosses into the next strip
                    int n = (int) Math.min(Math.min(chunkRows, box.h() - y), rowsPerStrip - inStrip);
                    long at = s[(int) strip] + inStrip * rowBytes;
                    int dst = (k * box.h() + y) * box.w();
                    if (fullRows) {
                        TiffDirectories.readFully(ch, buf, at, (int) (n * rowBytes));
                        for (int r = 0; r < n; r++) {
                            convert(buf, (int) (r * rowBytes + (long) box.x() * bpp), out, dst + r * box.w(), box.w());
                        }
                    } else {
                        TiffDirectories.readFully(ch, buf, at + (long) box.x() * bpp, box.w() * bpp);
                        convert(buf, 0, out, dst, box.w());
                    }
                    y += n;
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException("could not read " + path + ": " + e.getMessage(), e);
        }
        return new Volume(box.w(), box.h(), d, out, voxel);
    }

    private void convert(ByteBuffer b, int at, float[] out, int dst, int n) {
        switch (bits) {
            case 8 -> {
                for (int i = 0; i < n; i++) {
                    byte v = b.get(at + i);
                    out[dst + i] = format == 2 ? v : v & 0xff;
                }
            }
            case 16 -> {
                for (int i = 0; i < n; i++) {
                    short v = b.getShort(at + 2 * i);
                    out[dst + i] = format == 2 ? v : v & 0xffff;
                }
            }
            default -> {
                for (int i = 0; i < n; i++) {
                    int at4 = at + 4 * i;
                    out[dst + i] = format == 3 ? b.getFloat(at4)
                            : format == 2 ? b.getInt(at4) : (float) Integer.toUnsignedLong(b.getInt(at4));
                }
            }
        }
    }

    @Override
    public void close() {
        try {
            ch.close();
        } catch (IOException ignored) {
            // reading only: nothing is lost
        }
    }

    @Override
    public String toString() {
        return String.format(Locale.ROOT, "%s (%dx%dx%d, %d-bit)", path, width, height, depth(), bits);
    }
}
