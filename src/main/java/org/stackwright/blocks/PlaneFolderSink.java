package org.stackwright.blocks;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;
import java.util.stream.Stream;

import org.stackwright.volume.OutputClaim;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A folder of one TIFF per plane ({@code plane-00000.tif}, ... in name order), the output form that many writers can
 * make at once. The planes are written into a hidden temporary folder beside the target; each plane's file is
 * closed as soon as every block covering it is done, and {@link #commit()} renames the whole folder into place, so
 * a failed run leaves no folder and no plane. The target must not exist or be an empty folder. The folder's name is
 * claimed ({@link OutputClaim}) from the start until the commit or abort, as {@link TiffStackSink} claims its file.
 */
public final class PlaneFolderSink implements StackSink {

    private final Path target;
    private final Path tmp;
    private final int width;
    private final int height;
    private final int depth;
    private final int bits;
    private final VoxelSize voxel;
    private final TiffStackFile[] planes;
    private final OutputClaim claim;
    private boolean open = true;

    /**
     * @throws IllegalArgumentException when the parent folder is missing, or the target exists and is not an empty
     *     folder
     */
    public PlaneFolderSink(Path target, int width, int height, int depth, int bits, VoxelSize voxel) {
        this("output", target, width, height, depth, bits, voxel);
    }

    /**
     * @param key the setting the output came from, named when another run holds the name (e.g. --output)
     * @throws IllegalArgumentException naming the key when another run is writing the same folder
     */
    public PlaneFolderSink(String key, Path target, int width, int height, int depth, int bits, VoxelSize voxel) {
        this.target = OutputPaths.real(target);
        checkTarget(this.target);
        this.claim = OutputClaim.take(key, this.target);
        this.tmp = TiffFiles.temporaryFor(this.target);
        this.width = width;
        this.height = height;
        this.depth = depth;
        this.bits = bits;
        this.voxel = voxel;
        this.planes = new TiffStackFile[depth];
        try {
            Files.createDirectories(tmp);
        } catch (IOException e) {
            claim.close();
            throw new UncheckedIOException("could not create " + tmp + ": " + e.getMessage(), e);
        }
    }

    /** @throws IllegalArgumentException unless the target can become the output folder */
    public static void checkTarget(Path target) {
        Path abs = target.toAbsolutePath();
        Path dir = abs.getParent();
        if (dir == null || !Files.isDirectory(dir)) {
            throw new IllegalArgumentException("output folder " + dir + " does not exist; create it first");
        }
        if (Files.isRegularFile(abs)) {
            throw new IllegalArgumentException("output " + abs + " is a file; give a new or empty folder for the planes");
        }
        if (Files.isDirectory(abs)) {
            try (Stream<Path> s = Files.list(abs)) {
                if (s.findAny().isPresent()) {
                    throw new IllegalArgumentException("output folder " + abs + " is not empty; give a new or empty"
                            + " folder for the planes");
                }
            } catch (IOException e) {
                throw new IllegalArgumentException("output folder " + abs + " cannot be read: " + e.getMessage(), e);
            }
        }
    }

    /** @return the file name of plane z (from 0) in a folder of this many planes */
    public static String planeName(int z, int depth) {
        int digits = Math.max(5, Integer.toString(Math.max(0, depth - 1)).length());
        return String.format(Locale.ROOT, "plane-%0" + digits + "d.tif", z);
    }

    private TiffStackFile plane(int z) throws IOException {
        synchronized (planes) {
            if (planes[z] == null) {
                planes[z] = TiffStackFile.create(tmp.resolve(planeName(z, depth)), width, height, 1, bits, voxel, false);
            }
            return planes[z];
        }
    }

    @Override
    public void write(Box core, Volume pixels) {
        int plane = core.w() * core.h();
        try {
            for (int k = 0; k < core.d(); k++) {
                float[] px = new float[plane];
                System.arraycopy(pixels.data(), k * plane, px, 0, plane);
                plane(core.z() + k).write(new Box(core.x(), core.y(), 0, core.w(), core.h(), 1),
                        new Volume(core.w(), core.h(), 1, px, pixels.voxel()));
            }
        } catch (IOException e) {
            throw new UncheckedIOException("could not write a plane in " + tmp + ": " + e.getMessage(), e);
        }
    }

    @Override
    public void planeDone(int z) {
        try {
            TiffStackFile f = plane(z);
            f.force();
            f.close();
        } catch (IOException e) {
            throw new UncheckedIOException("could not finish plane " + z + " in " + tmp + ": " + e.getMessage(), e);
        }
    }

    @Override
    public synchronized void commit() {
        try {
            for (int z = 0; z < depth; z++) {
                if (planes[z] == null) {
                    plane(z); // a plane no block wrote stays zero (cannot happen when the cores tile the stack)
                }
                planes[z].close();
            }
            open = false;
            if (Files.isDirectory(target)) {
                Files.delete(target); // empty, checked at the start
            }
            OutputFiles.moveIntoPlace(tmp, target, false);
            claim.close();
        } catch (IOException e) {
            abort();
            throw new UncheckedIOException("could not write " + target + ": " + e.getMessage(), e);
        }
    }

    @Override
    public synchronized void abort() {
        if (open) {
            for (TiffStackFile f : planes) {
                if (f != null) {
                    try {
                        f.close();
                    } catch (IOException ignored) {
                        // removing it anyway
                    }
                }
            }
            open = false;
        }
        deleteTree(tmp);
        claim.close();
    }

    static void deleteTree(Path dir) {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> s = Files.walk(dir)) {
            s.sorted(java.util.Comparator.reverseOrder()).forEach(TiffStackSink::deleteQuietly);
        } catch (IOException ignored) {
            // nothing more to do
        }
    }
}
