package org.stackwright.blocks;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * The image file directories (IFDs) of a TIFF or BigTIFF file, read without the pixels: what a stack reader needs to
 * find any row of any plane on disk. Layout of TIFF from Adobe, "TIFF Revision 6.0", 1992 (section 2: header, IFD
 * entries of 12 bytes; field types 1 to 12); BigTIFF as published by the libtiff project (header version 43,
 * 8-byte offsets, IFD entries of 20 bytes, field types LONG8 = 16, SLONG8 = 17, IFD8 = 18). Every offset is checked
 * against the file length; a loop in the chain of directories is refused.
 */
final class TiffDirectories {

    /** One directory: the tags a stack reader uses. */
    record Directory(long width, long height, int bits, int format, int compression, int samples, long rowsPerStrip,
            long[] stripOffsets, long[] stripCounts, boolean tiled, String description, double xResolution,
            double yResolution, int resolutionUnit) {
    }

    private static final int[] TYPE_SIZE = {0, 1, 1, 2, 4, 8, 1, 1, 2, 4, 8, 4, 8, 4, 0, 0, 8, 8, 8};
    private static final int MAX_DIRECTORIES = 10_000_000;

    private final FileChannel ch;
    private final long length;
    final ByteOrder order;
    final boolean big;

    private TiffDirectories(FileChannel ch, ByteOrder order, boolean big) throws IOException {
        this.ch = ch;
        this.length = ch.size();
        this.order = order;
        this.big = big;
    }

    /**
     * @return every directory of the file, in chain order
     * @throws IllegalArgumentException (without the parameter name: the caller adds it) when the file is not a TIFF
     *     or its structure is damaged
     */
    static List<Directory> read(FileChannel ch, ByteOrder[] orderOut) throws IOException {
        long len = ch.size();
        if (len < 8) {
            throw new IllegalArgumentException("it is only " + len + " bytes long");
        }
        ByteBuffer head = ByteBuffer.allocate(16);
        readFully(ch, head, 0, (int) Math.min(16, len));
        byte b0 = head.get(0);
        byte b1 = head.get(1);
        if (b0 != b1 || (b0 != 'I' && b0 != 'M')) {
            throw new IllegalArgumentException("it is not a TIFF file");
        }
        ByteOrder order = b0 == 'I' ? ByteOrder.LITTLE_ENDIAN : ByteOrder.BIG_ENDIAN;
        head.order(order);
        int version = Short.toUnsignedInt(head.getShort(2));
        boolean big;
        long first;
        if (version == 42) {
            big = false;
            first = Integer.toUnsignedLong(head.getInt(4));
        } else if (version == 43 && len >= 16 && head.getShort(4) == 8) {
            big = true;
            first = head.getLong(8);
        } else {
            throw new IllegalArgumentException("it is not a TIFF or BigTIFF file (version " + version + ")");
        }
        orderOut[0] = order;
        TiffDirectories t = new TiffDirectories(ch, order, big);
        List<Directory> out = new ArrayList<>();
        Set<Long> seen = new HashSet<>();
        long ifd = first;
        while (ifd != 0) {
            if (!seen.add(ifd) || out.size() >= MAX_DIRECTORIES) {
                throw new IllegalArgumentException("its chain of image directories loops back on itself at byte " + ifd);
            }
            long[] next = new long[1];
            out.add(t.directory(ifd, out.size() + 1, next));
            ifd = next[0];
        }
        if (out.isEmpty()) {
            throw new IllegalArgumentException("it holds no image directory");
        }
        return out;
    }

    private Directory directory(long at, int number, long[] next) throws IOException {
        int countBytes = big ? 8 : 2;
        int entryBytes = big ? 20 : 12;
        int offBytes = big ? 8 : 4;
        if (at < 8 || at + countBytes > length) {
            throw new IllegalArgumentException("image directory " + number + " would start at byte " + at
                    + ", outside the file (" + length + " bytes)");
        }
        ByteBuffer c = buffer(at, countBytes);
        long n = big ? c.getLong(0) : Short.toUnsignedInt(c.getShort(0));
        long end = at + countBytes + n * entryBytes + offBytes;
        if (n < 1 || n > 100_000 || end > length) {
            throw new IllegalArgumentException("image directory " + number + " at byte " + at + " with " + n
                    + " entries does not fit in the file");
        }
        ByteBuffer d = buffer(at + countBytes, (int) (n * entryBytes + offBytes));
        long width = 0;
        long height = 0;
        int bits = 1;
        int format = 1;
        int compression = 1;
        int samples = 1;
        long rows = -1;
        long[] offsets = null;
        long[] counts = null;
        boolean tiled = false;
        String description = null;
        double xres = Double.NaN;
        double yres = Double.NaN;
        int unit = 2;
        for (int e = 0; e < n; e++) {
            int p = e * entryBytes;
            int tag = Short.toUnsignedInt(d.getShort(p));
            int type = Short.toUnsignedInt(d.getShort(p + 2));
            long count = big ? d.getLong(p + 4) : Integer.toUnsignedLong(d.getInt(p + 4));
            int size = type < TYPE_SIZE.length ? TYPE_SIZE[type] : 0;
            if (size == 0 || count < 0 || count > length) {
                continue; // unknown type: not a tag a stack reader needs
            }
            long bytes = count * size;
            ByteBuffer values;
            if (bytes <= offBytes) {
                values = d.duplicate().order(order).position(p + (big ? 12 : 8)).slice().order(order);
            } else {
                long off = big ? d.getLong(p + 12) : Integer.toUnsignedLong(d.getInt(p + 8));
                if (off < 0 || off + bytes > length) {
                    throw new IllegalArgumentException("tag " + tag + " of image directory " + number + " has " + count
                            + " values that would lie outside the file");
                }
                if (tag != 273 && tag != 279 && tag != 270 && tag != 282 && tag != 283 && tag != 258) {
                    continue;
                }
                if (bytes > Integer.MAX_VALUE - 16) {
                    throw new IllegalArgumentException("tag " + tag + " of image directory " + number + " is too large");
                }
                values = buffer(off, (int) bytes);
            }
            switch (tag) {
                case 256 -> width = number(values, type, 0);
                case 257 -> height = number(values, type, 0);
                case 258 -> bits = (int) number(values, type, 0);
                case 259 -> compression = (int) number(values, type, 0);
                case 270 -> description = ascii(values, (int) count);
                case 273 -> offsets = numbers(values, type, (int) count);
                case 277 -> samples = (int) number(values, type, 0);
                case 278 -> rows = number(values, type, 0);
                case 279 -> counts = numbers(values, type, (int) count);
                case 282 -> xres = rational(values, type);
                case 283 -> yres = rational(values, type);
                case 296 -> unit = (int) number(values, type, 0);
                case 322, 323, 324, 325 -> tiled = true;
                case 339 -> format = (int) number(values, type, 0);
                default -> {
                    // not needed to read the pixels
                }
            }
        }
        next[0] = big ? d.getLong((int) (n * entryBytes)) : Integer.toUnsignedLong(d.getInt((int) (n * entryBytes)));
        if (rows < 1 || rows > height) {
            rows = height;
        }
        return new Directory(width, height, bits, format, compression, samples, rows, offsets, counts, tiled,
                description, xres, yres, unit);
    }

    private static long number(ByteBuffer v, int type, int i) {
        return switch (type) {
            case 1, 7 -> Byte.toUnsignedInt(v.get(i));
            case 6 -> v.get(i);
            case 3 -> Short.toUnsignedInt(v.getShort(2 * i));
            case 8 -> v.getShort(2 * i);
            case 4, 13 -> Integer.toUnsignedLong(v.getInt(4 * i));
            case 9 -> v.getInt(4 * i);
            case 16, 17, 18 -> v.getLong(8 * i);
            default -> 0;
        };
    }

    private static long[] numbers(ByteBuffer v, int type, int count) {
        long[] out = new long[count];
        for (int i = 0; i < count; i++) {
            out[i] = number(v, type, i);
        }
        return out;
    }

    private static double rational(ByteBuffer v, int type) {
        if (type == 5 || type == 10) {
            double num = type == 5 ? Integer.toUnsignedLong(v.getInt(0)) : v.getInt(0);
            double den = type == 5 ? Integer.toUnsignedLong(v.getInt(4)) : v.getInt(4);
            return den == 0 ? Double.NaN : num / den;
        }
        return Double.NaN;
    }

    private static String ascii(ByteBuffer v, int count) {
        byte[] b = new byte[count];
        v.duplicate().position(0).get(b, 0, count);
        int end = 0;
        while (end < count && b[end] != 0) {
            end++;
        }
        return new String(b, 0, end, java.nio.charset.StandardCharsets.ISO_8859_1);
    }

    private ByteBuffer buffer(long at, int n) throws IOException {
        ByteBuffer b = ByteBuffer.allocate(n).order(order);
        readFully(ch, b, at, n);
        return b.order(order);
    }

    static void readFully(FileChannel ch, ByteBuffer b, long at, int n) throws IOException {
        b.clear().limit(n);
        while (b.hasRemaining()) {
            if (ch.read(b, at + b.position()) < 0) {
                throw new IOException("unexpected end of file at byte " + (at + b.position()));
            }
        }
        b.flip();
    }
}
