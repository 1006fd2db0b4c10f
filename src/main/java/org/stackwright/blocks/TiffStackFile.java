package org.stackwright.blocks;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.Locale;

import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A new, uncompressed, little-endian grayscale TIFF stack of fixed size whose pixels are written in place, in any
 * order, from several threads: the header and every image directory are written first, the planes follow one after
 * the other, so the position of every row is known before any pixel is computed.
 *
 * <p>Layout per Adobe, "TIFF Revision 6.0", 1992 (one strip per plane; BitsPerSample 8, 16 or 32, SampleFormat 1 =
 * unsigned integer or 3 = IEEE float). When the file would pass the 4 GB that 32-bit offsets reach, it is a BigTIFF
 * (libtiff project's BigTIFF specification: version 43, 8-byte offsets, LONG8 strip offsets and counts). The first
 * directory carries an ImageJ-style description (images, slices, unit = micron, spacing) and the resolution tags
 * give the pixel size, so ImageJ opens the classic files as a calibrated stack.
 */
final class TiffStackFile implements AutoCloseable {

    /** Largest byte offset a classic TIFF can hold. */
    static final long CLASSIC_LIMIT = 0xFFFF_FFFFL;

    private final FileChannel ch;
    private final int width;
    private final int height;
    private final int depth;
    private final int bytesPerSample;
    private final long dataStart;
    private final boolean big;

    private TiffStackFile(FileChannel ch, int width, int height, int depth, int bits, long dataStart, boolean big) {
        this.ch = ch;
        this.width = width;
        this.height = height;
        this.depth = depth;
        this.bytesPerSample = bits / 8;
        this.dataStart = dataStart;
        this.big = big;
    }

    /** @return true when a stack of this size must be written as BigTIFF */
    static boolean needsBig(int width, int height, int depth, int bits) {
        long ifds = (long) depth * 200 + 1024;
        return ifds + (long) width * height * depth * (bits / 8) > CLASSIC_LIMIT;
    }

    /**
     * Creates the file (replacing it) with its header and directories; the pixels start as zeros.
     *
     * @param bits 8 or 16 (unsigned, rounded and clamped) or 32 (float)
     * @param forceBig true to write BigTIFF even when classic would do (for tests)
     */
    static TiffStackFile create(Path file, int width, int height, int depth, int bits, VoxelSize voxel,
            boolean forceBig) throws IOException {
        boolean big = forceBig || needsBig(width, height, depth, bits);
        byte[] desc = description(depth, voxel);
        long planeBytes = (long) width * height * (bits / 8);
        int entries0 = 15;
        int entries = 14;
        long headerBytes = big ? 16 : 8;
        long ifd0 = headerBytes;
        long ifd0Bytes = big ? 8 + 20L * entries0 + 8 : 2 + 12L * entries0 + 4;
        long descAt = ifd0 + ifd0Bytes;
        long rationalsAt = descAt + even(desc.length);
        long ifdsAt = rationalsAt + (big ? 0 : 16);
        long ifdBytes = big ? 8 + 20L * entries + 8 : 2 + 12L * entries + 4;
        long dataStart = even(ifdsAt + ifdBytes * (depth - 1));
        long end = dataStart + planeBytes * depth;
        FileChannel ch = FileChannel.open(file, StandardOpenOption.CREATE, StandardOpenOption.TRUNCATE_EXISTING,
                StandardOpenOption.WRITE, StandardOpenOption.READ);
        try {
            long[] xres = rational(1 / voxel.x());
            long[] yres = rational(1 / voxel.y());
            ByteBuffer head = ByteBuffer.allocate((int) (dataStart > (1 << 24) ? ifdsAt : dataStart))
                    .order(ByteOrder.LITTLE_ENDIAN);
            head.put((byte) 'I').put((byte) 'I');
            if (big) {
                head.putShort((short) 43).putShort((short) 8).putShort((short) 0).putLong(ifd0);
            } else {
                head.putShort((short) 42).putInt((int) ifd0);
            }
            Ifd w0 = new Ifd(head, big, entries0);
            w0.common(width, height, bits);
            w0.entry(270, 2, desc.length, descAt);
            w0.strip(273, dataStart);
            w0.rest(height, planeBytes, xres, yres, rationalsAt, bits);
            w0.finish(depth > 1 ? ifdsAt : 0);
            head.position((int) descAt);
            head.put(desc);
            head.position((int) rationalsAt);
            if (!big) {
                head.putInt((int) xres[0]).putInt((int) xres[1]).putInt((int) yres[0]).putInt((int) yres[1]);
            }
            head.position(head.capacity());
            head.flip();
            write(ch, head, 0);
            // the other directories, written in pieces of at most 4096 so memory stays small for deep stacks
            int per = 4096;
            for (int z0 = 1; z0 < depth; z0 += per) {
                int z1 = Math.min(depth, z0 + per);
                ByteBuffer b = ByteBuffer.allocate((int) (ifdBytes * (z1 - z0))).order(ByteOrder.LITTLE_ENDIAN);
                for (int z = z0; z < z1; z++) {
                    Ifd w = new Ifd(b, big, entries);
                    w.common(width, height, bits);
                    w.strip(273, dataStart + planeBytes * z);
                    w.rest(height, planeBytes, xres, yres, rationalsAt, bits);
                    w.finish(z + 1 < depth ? ifdsAt + ifdBytes * z : 0);
                }
                b.flip();
                write(ch, b, ifdsAt + ifdBytes * (z0 - 1));
            }
            // set the length: the pixels start as zeros (a sparse file until written)
            write(ch, ByteBuffer.allocate(1), end - 1);
        } catch (IOException | RuntimeException e) {
            ch.close();
            throw e;
        }
        return new TiffStackFile(ch, width, height, depth, bits, dataStart, big);
    }

    /** Writes the directory entries of one plane in ascending tag order. */
    private static final class Ifd {
        private final ByteBuffer b;
        private final boolean big;

        Ifd(ByteBuffer b, boolean big, int entries) {
            this.b = b;
            this.big = big;
            if (big) {
                b.putLong(entries);
            } else {
                b.putShort((short) entries);
            }
        }

        void common(int width, int height, int bits) {
            entry(254, 4, 1, 0);
            entry(256, 4, 1, width);
            entry(257, 4, 1, height);
            entry(258, 3, 1, bits);
            entry(259, 3, 1, 1);
            entry(262, 3, 1, 1);
        }

        void strip(int tag, long offset) {
            entry(tag, big ? 16 : 4, 1, offset);
        }

        void rest(int height, long planeBytes, long[] xres, long[] yres, long rationalsAt, int bits) {
            entry(277, 3, 1, 1);
            entry(278, 4, 1, height);
            entry(279, big ? 16 : 4, 1, planeBytes);
            if (big) {
                // a RATIONAL (8 bytes) fits in a BigTIFF entry
                rationalInline(282, xres);
                rationalInline(283, yres);
            } else {
                entry(282, 5, 1, rationalsAt);
                entry(283, 5, 1, rationalsAt + 8);
            }
            entry(296, 3, 1, 1);
            entry(339, 3, 1, bits == 32 ? 3 : 1);
        }

        private void rationalInline(int tag, long[] r) {
            b.putShort((short) tag).putShort((short) 5).putLong(1);
            b.putInt((int) r[0]).putInt((int) r[1]);
        }

        /** An entry whose value fits in the entry (SHORT, LONG, LONG8) or whose offset is given. */
        void entry(int tag, int type, long count, long value) {
            b.putShort((short) tag).putShort((short) type);
            if (big) {
                b.putLong(count);
                if (type == 3) {
                    b.putShort((short) value).putShort((short) 0).putInt(0);
                } else {
                    b.putLong(value);
                }
            } else {
                b.putInt((int) count);
                if (type == 3) {
                    b.putShort((short) value).putShort((short) 0);
                } else {
                    b.putInt((int) value);
                }
            }
        }

        void finish(long next) {
            if (big) {
                b.putLong(next);
            } else {
                b.putInt((int) next);
            }
        }
    }

    private static long even(long n) {
        return (n + 1) & ~1L;
    }

    /** @return numerator and denominator of a positive number, as ImageJ writes them (scale 10^6, less if large) */
    static long[] rational(double v) {
        long den = 1_000_000;
        while (den > 1 && v * den > Integer.MAX_VALUE) {
            den /= 10;
        }
        long num = Math.max(1, Math.min(Integer.MAX_VALUE, Math.round(v * den)));
        return new long[] {num, den};
    }

    /** ImageJ's description: images, slices, unit and z spacing (ImageJ reads them back as the calibration). */
    static byte[] description(int depth, VoxelSize voxel) {
        StringBuilder sb = new StringBuilder("ImageJ=1.54p\n");
        if (depth > 1) {
            sb.append("images=").append(depth).append('\n').append("slices=").append(depth).append('\n');
        }
        sb.append("unit=micron\n");
        sb.append(String.format(Locale.ROOT, "spacing=%s\n", Double.toString(voxel.z())));
        sb.append("loop=false\n");
        byte[] text = sb.toString().getBytes(StandardCharsets.US_ASCII);
        byte[] z = new byte[text.length + 1];
        System.arraycopy(text, 0, z, 0, text.length);
        return z;
    }

    /** @return true for a BigTIFF file */
    boolean big() {
        return big;
    }

    /**
     * Writes a core's pixels in place.
     *
     * @param core where in the stack
     * @param px its pixels, not modified
     */
    void write(Box core, Volume px) throws IOException {
        long rowBytes = (long) width * bytesPerSample;
        float[] v = px.data();
        int w = core.w();
        boolean whole = core.x() == 0 && w == width;
        int rowsPer = whole ? (int) Math.max(1, Math.min(core.h(), (1 << 22) / rowBytes)) : 1;
        ByteBuffer b = ByteBuffer.allocate(rowsPer * w * bytesPerSample).order(ByteOrder.LITTLE_ENDIAN);
        for (int k = 0; k < core.d(); k++) {
            int z = core.z() + k;
            for (int y = 0; y < core.h(); y += rowsPer) {
                int n = Math.min(rowsPer, core.h() - y);
                b.clear();
                int src = (k * core.h() + y) * w;
                int count = n * w;
                if (bytesPerSample == 4) {
                    for (int i = 0; i < count; i++) {
                        b.putFloat(v[src + i]);
                    }
                } else if (bytesPerSample == 2) {
                    for (int i = 0; i < count; i++) {
                        b.putShort((short) Math.max(0, Math.min(65535, Math.round(v[src + i]))));
                    }
                } else {
                    for (int i = 0; i < count; i++) {
                        b.put((byte) Math.max(0, Math.min(255, Math.round(v[src + i]))));
                    }
                }
                b.flip();
                long at = dataStart + ((long) z * height + core.y() + y) * rowBytes + (long) core.x() * bytesPerSample;
                write(ch, b, at);
            }
        }
    }

    private static void write(FileChannel ch, ByteBuffer b, long at) throws IOException {
        long pos = at;
        while (b.hasRemaining()) {
            pos += ch.write(b, pos);
        }
    }

    /** Forces the bytes to disk. */
    void force() throws IOException {
        ch.force(false);
    }

    @Override
    public void close() throws IOException {
        ch.close();
    }

    /** @return planes */
    int depth() {
        return depth;
    }
}
