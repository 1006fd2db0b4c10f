package org.stackwright.spark;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.util.Locale;
import java.util.UUID;

import org.stackwright.blocks.Block;
import org.stackwright.blocks.Box;
import org.stackwright.volume.Volume;

/**
 * The core of one block's output as a file of its own in the staging folder ({@code <key>/block-000012.raw}: 32-bit
 * little-endian floats, x fastest, the core's size). Each piece is written under a temporary name unique to the
 * attempt and renamed when complete, so a task that fails half-way leaves only a temporary file that no one reads,
 * and its retry writes the whole piece again.
 */
final class Pieces {

    private Pieces() {
    }

    static Path path(Path staging, String key, int block) {
        return staging.resolve(key).resolve(String.format(Locale.ROOT, "block-%06d.raw", block));
    }

    /**
     * @param failAfterHalf true to throw after writing half of the piece (a forced failure for tests)
     */
    static void write(Path staging, String key, Block b, Volume core, boolean failAfterHalf) {
        Path target = path(staging, key, b.index());
        Path tmp = target.resolveSibling("." + target.getFileName() + ".part-" + UUID.randomUUID());
        try {
            Files.createDirectories(target.getParent());
            float[] v = core.data();
            try (FileChannel ch = FileChannel.open(tmp, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE)) {
                ByteBuffer buf = ByteBuffer.allocate(1 << 20).order(ByteOrder.LITTLE_ENDIAN);
                for (int i = 0; i < v.length; i++) {
                    if (!buf.hasRemaining()) {
                        flush(ch, buf);
                    }
                    buf.putFloat(v[i]);
                    if (failAfterHalf && i == v.length / 2) {
                        flush(ch, buf);
                        throw new IllegalStateException("forced failure of block " + (b.index() + 1)
                                + " after writing half of its output (first attempt only)");
                    }
                }
                flush(ch, buf);
                ch.force(false);
            }
            Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
        } catch (IOException e) {
            throw new UncheckedIOException("could not write " + target + ": " + e.getMessage(), e);
        }
    }

    private static void flush(FileChannel ch, ByteBuffer buf) throws IOException {
        buf.flip();
        while (buf.hasRemaining()) {
            ch.write(buf);
        }
        buf.clear();
    }

    /** @return plane z (of the whole stack) of a block's piece, the core's width x height */
    static Volume plane(Path staging, String key, Block b, int z) {
        Box c = b.core();
        int n = c.w() * c.h();
        Path p = path(staging, key, b.index());
        try (FileChannel ch = FileChannel.open(p, StandardOpenOption.READ)) {
            ByteBuffer buf = ByteBuffer.allocate(n * 4).order(ByteOrder.LITTLE_ENDIAN);
            long at = (long) (z - c.z()) * n * 4;
            while (buf.hasRemaining()) {
                if (ch.read(buf, at + buf.position()) < 0) {
                    throw new IOException("piece ends early");
                }
            }
            buf.flip();
            float[] v = new float[n];
            buf.asFloatBuffer().get(v);
            return new Volume(c.w(), c.h(), 1, v, org.stackwright.volume.VoxelSize.UNIT);
        } catch (IOException e) {
            throw new UncheckedIOException("could not read " + p + ": " + e.getMessage(), e);
        }
    }
}
