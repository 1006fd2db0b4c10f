package org.stackwright.blocks;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;

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
 */
public final class TiffStackSink implements StackSink {

    private final Path target;
    private final Path tmp;
    private final boolean overwrite;
    private final TiffStackFile file;
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
        this.target = OutputPaths.real(target);
        this.overwrite = overwrite;
        TiffFiles.checkWritable(this.target, overwrite);
        this.tmp = TiffFiles.temporaryFor(this.target);
        try {
            this.file = TiffStackFile.create(tmp, width, height, depth, bits, voxel, forceBig);
        } catch (IOException e) {
            deleteQuietly(tmp);
            throw new UncheckedIOException("could not create " + tmp + ": " + e.getMessage(), e);
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
    }

    static void deleteQuietly(Path p) {
        try {
            Files.deleteIfExists(p);
        } catch (IOException ignored) {
            // a hidden temporary named after the process; nothing more to do
        }
    }
}
