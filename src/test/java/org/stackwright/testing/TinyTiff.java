package org.stackwright.testing;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.file.Files;
import java.nio.file.Path;

/**
 * Writes minimal one-plane little-endian TIFF files by hand (baseline TIFF 6.0: Adobe, "TIFF Revision 6.0", 1992,
 * section 2 and the SampleFormat tag of section 19), for kinds of file our own writer never makes: 64-bit float,
 * signed 16-bit and RGB.
 */
public final class TinyTiff {

    private TinyTiff() {
    }

    /** A one-plane 64-bit float grayscale TIFF. */
    public static void writeFloat64(Path path, int width, int height, double[] pixels) throws IOException {
        ByteBuffer px = ByteBuffer.allocate(pixels.length * 8).order(ByteOrder.LITTLE_ENDIAN);
        for (double d : pixels) {
            px.putDouble(d);
        }
        write(path, width, height, 1, 64, 3, 1, px.array());
    }

    /** A one-plane signed 16-bit grayscale TIFF (SampleFormat 2). */
    public static void writeInt16(Path path, int width, int height, short[] pixels) throws IOException {
        ByteBuffer px = ByteBuffer.allocate(pixels.length * 2).order(ByteOrder.LITTLE_ENDIAN);
        for (short v : pixels) {
            px.putShort(v);
        }
        write(path, width, height, 1, 16, 2, 1, px.array());
    }

    /** A one-plane 8-bit-per-channel RGB TIFF (rgb holds r, g, b per pixel). */
    public static void writeRgb(Path path, int width, int height, byte[] rgb) throws IOException {
        write(path, width, height, 3, 8, 1, 2, rgb);
    }

    private static void write(Path path, int w, int h, int spp, int bits, int sampleFormat, int photometric, byte[] data)
            throws IOException {
        int entries = 10;
        int ifd = 8;
        int ifdSize = 2 + entries * 12 + 4;
        int bitsAt = ifd + ifdSize;
        int dataAt = bitsAt + 2 * spp + (spp % 2 == 0 ? 0 : 2);
        ByteBuffer b = ByteBuffer.allocate(dataAt + data.length).order(ByteOrder.LITTLE_ENDIAN);
        b.put((byte) 'I').put((byte) 'I').putShort((short) 42).putInt(ifd);
        b.putShort((short) entries);
        entry(b, 256, 4, 1, w);
        entry(b, 257, 4, 1, h);
        if (spp == 1) {
            entry(b, 258, 3, 1, bits);
        } else {
            entry(b, 258, 3, spp, bitsAt);
        }
        entry(b, 259, 3, 1, 1);
        entry(b, 262, 3, 1, photometric);
        entry(b, 273, 4, 1, dataAt);
        entry(b, 277, 3, 1, spp);
        entry(b, 278, 4, 1, h);
        entry(b, 279, 4, 1, data.length);
        entry(b, 339, 3, 1, sampleFormat);
        b.putInt(0);
        for (int i = 0; i < spp; i++) {
            b.putShort((short) bits);
        }
        while (b.position() < dataAt) {
            b.put((byte) 0);
        }
        b.put(data);
        Files.write(path, b.array());
    }

    private static void entry(ByteBuffer b, int tag, int type, int count, int value) {
        b.putShort((short) tag).putShort((short) type).putInt(count);
        if (type == 3 && count == 1) {
            b.putShort((short) value).putShort((short) 0);
        } else {
            b.putInt(value);
        }
    }
}
