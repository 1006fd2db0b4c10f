package org.stackwright.volume;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.HashSet;
import java.util.Set;

/**
 * Walks the chain of image file directories (IFDs) of a TIFF file and checks that every directory and every
 * tag's values lie inside the file, that the chain has no loop and that it ends. ImageJ's decoder trusts these
 * offsets: a damaged file (one flipped bit in a "next directory" offset) can make it loop for ever or ask for
 * absurd amounts of memory. Layout from Adobe, "TIFF Revision 6.0", 1992, section 2 (header, IFD entries of 12
 * bytes, field types 1 to 12).
 */
final class TiffStructure {

    /** More directories than this is taken as damage (one per plane; ten million planes is far beyond any stack). */
    static final int MAX_DIRECTORIES = 10_000_000;

    private static final int[] TYPE_SIZE = {0, 1, 1, 2, 4, 8, 1, 1, 2, 4, 8, 4, 8, 4};

    private TiffStructure() {
    }

    /**
     * @return null when the structure is sound, otherwise what is wrong, in words
     * @throws IOException when the file cannot be read
     */
    static String problem(Path path) throws IOException {
        try (FileChannel ch = FileChannel.open(path, StandardOpenOption.READ)) {
            long len = ch.size();
            if (len < 8) {
                return "it is only " + len + " bytes long";
            }
            ByteBuffer head = read(ch, 0, 8, ByteOrder.LITTLE_ENDIAN);
            ByteOrder order = head.get(0) == 'I' ? ByteOrder.LITTLE_ENDIAN : ByteOrder.BIG_ENDIAN;
            long ifd = Integer.toUnsignedLong(head.order(order).getInt(4));
            Set<Long> seen = new HashSet<>();
            int directories = 0;
            while (ifd != 0) {
                if (ifd < 8 || ifd + 2 > len) {
                    return "image directory " + (directories + 1) + " would start at byte " + ifd + ", outside the file ("
                            + len + " bytes)";
                }
                if (!seen.add(ifd) || ++directories > MAX_DIRECTORIES) {
                    return "its chain of image directories loops back on itself at byte " + ifd;
                }
                int n = Short.toUnsignedInt(read(ch, ifd, 2, order).getShort(0));
                long end = ifd + 2 + 12L * n + 4;
                if (n == 0 || end > len) {
                    return "image directory " + directories + " at byte " + ifd + " with " + n + " entries does not fit in the file";
                }
                ByteBuffer d = read(ch, ifd + 2, 12 * n + 4, order);
                for (int e = 0; e < n; e++) {
                    int tag = Short.toUnsignedInt(d.getShort(12 * e));
                    int type = Short.toUnsignedInt(d.getShort(12 * e + 2));
                    long count = Integer.toUnsignedLong(d.getInt(12 * e + 4));
                    // ImageJ sizes some arrays by the count whatever the type: an unknown type counts 1 byte a value
                    long bytes = count * (type >= 1 && type < TYPE_SIZE.length ? TYPE_SIZE[type] : 1);
                    if (bytes > 4) {
                        long at = Integer.toUnsignedLong(d.getInt(12 * e + 8));
                        if (at + bytes > len) {
                            return "tag " + tag + " of image directory " + directories + " has " + count
                                    + " values that would lie outside the file";
                        }
                    }
                }
                ifd = Integer.toUnsignedLong(d.getInt(12 * n));
            }
            return directories == 0 ? "it holds no image directory" : null;
        }
    }

    private static ByteBuffer read(FileChannel ch, long at, int n, ByteOrder order) throws IOException {
        ByteBuffer b = ByteBuffer.allocate(n).order(order);
        while (b.hasRemaining()) {
            if (ch.read(b, at + b.position()) < 0) {
                throw new IOException("unexpected end of file at byte " + (at + b.position()));
            }
        }
        return b.flip();
    }
}
