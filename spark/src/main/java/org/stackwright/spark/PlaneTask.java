package org.stackwright.spark;

import java.nio.file.Path;
import java.util.Locale;

import org.stackwright.blocks.Block;
import org.stackwright.blocks.Box;
import org.stackwright.blocks.PlaneFolderSink;
import org.stackwright.blocks.TiffStackSink;
import org.stackwright.volume.VoxelSize;

/**
 * One output plane as a Spark task: puts the plane together from the pieces of every block whose core holds it and
 * writes it as a one-plane TIFF in the staging folder, under a temporary name renamed when complete (so a failed
 * attempt leaves no partial plane under the plane's name).
 */
final class PlaneTask {

    private PlaneTask() {
    }

    static Path planePath(Path staging, String key, int z, int depth) {
        return staging.resolve("planes-" + key).resolve(PlaneFolderSink.planeName(z, depth));
    }

    static void run(TaskSpec spec, String key, int z, double[] voxel) {
        Path staging = Path.of(spec.staging());
        int w = spec.plan().width();
        int h = spec.plan().height();
        Path target = planePath(staging, key, z, spec.plan().depth());
        try {
            java.nio.file.Files.createDirectories(target.getParent());
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
        TiffStackSink sink = new TiffStackSink(target, w, h, 1, spec.outputs().get(key),
                new VoxelSize(voxel[0], voxel[1], voxel[2]), true, false);
        try {
            for (Block b : spec.plan().blocks()) {
                Box c = b.core();
                if (c.holdsPlane(z)) {
                    sink.write(new Box(c.x(), c.y(), 0, c.w(), c.h(), 1), Pieces.plane(staging, key, b, z));
                }
            }
            sink.commit();
        } catch (RuntimeException e) {
            sink.abort();
            throw new IllegalStateException(String.format(Locale.ROOT, "plane %d of %s: %s", z, key, e.getMessage()), e);
        }
    }
}
