package org.stackwright.blocks;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;

import org.stackwright.volume.OutputClaim;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * One TIFF file (BigTIFF over 4 GB) written block by block under a hidden temporary name in the target folder, and
 * renamed into place by {@link #commit()} when every block is written: the all-or-nothing rule of
 * {@link TiffFiles#write} (the real path, links followed; without overwrite a file that appeared meanwhile is
 * kept). The cores are written where they belong as soon as they are done, so memory holds no
 * more than one block's output.
 *
 * <p>The output's name is claimed ({@link OutputClaim}) from the start until the commit or abort, as every other
 * output of a run is: a second run (process or thread) writing the same file meanwhile is refused at once, and a run
 * that crashes leaves nothing under the output's name (its claim is released by the system with the process).
 */
public final class TiffStackSink implements StackSink {

    private final Path target;
    private final Path tmp;
    private final boolean overwrite;
    private final TiffStackFile file;
    private final OutputClaim claim;
    private boolean open = true;

    /**
     * @param target the output file
     * @param bits 8, 16 or 32
     * @param overwrite whether an existing file may be replaced
     * @param forceBig BigTIFF even when it would fit a classic TIFF (tests)
     * @throws IllegalArgumentException when the folder is missing or the file exists and overwrite is false
     */
    public TiffStackSink(Path target, int width, int height, int depth, int bits, VoxelSize voxel, boolean overwrite,
            boolean forceBig) {
        this("output", target, width, height, depth, bits, voxel, overwrite, forceBig);
    }

    /**
     * @param key the setting the output came from, named when another run holds the name (e.g. --output)
     * @throws IllegalArgumentException naming the key when another run is writing the same file
     */
    public TiffStackSink(String key, Path target, int width, int height, int depth, int bits, VoxelSize voxel,
            boolean overwrite, boolean forceBig) {
        this.target = OutputPaths.real(target);
        this.overwrite = overwrite;
        TiffFiles.checkWritable(this.target, overwrite);
        this.claim = OutputClaim.take(key, this.target);
        this.tmp = TiffFiles.temporaryFor(this.target);
        try {
            this.file = TiffStackFile.create(tmp, width, height, depth, bits, voxel, forceBig);
        } catch (IOException e) {
            deleteQuietly(tmp);
            claim.close();
            throw new UncheckedIOException("could not create " + tmp + ": " + e.getMessage(), e);
        } catch (RuntimeException e) {
            deleteQuietly(tmp);
            claim.close();
            throw e;
        }
    }

    /** @return true when the file is a BigTIFF */
    public boolean big() {
        return file.big();
    }

    @Override
    public void write(Box core, Volume pixels) {
        try {
            file.write(core, pixels);
        } catch (IOException e) {
            throw new UncheckedIOException("could not write " + tmp + ": " + e.getMessage(), e);
        }
    }

    @Override
    public synchronized void commit() {
        try {
            file.force();
            file.close();
            open = false;
            OutputFiles.moveIntoPlace(tmp, target, overwrite);
            claim.close();
        } catch (IOException e) {
            abort();
            throw new UncheckedIOException("could not write " + target + ": " + e.getMessage(), e);
        }
    }

    @Override
    public synchronized void abort() {
        if (open) {
            try {
                file.close();
            } catch (IOException ignored) {
                // removing it anyway
            }
            open = false;
        }
        deleteQuietly(tmp);
        claim.close();
    }

    static void deleteQuietly(Path p) {
        try {
            Files.deleteIfExists(p);
        } catch (IOException ignored) {
            // a hidden temporary named after the process; nothing more to do
        }
    }
}
