package org.stackwright.blocks;

import java.io.IOException;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * A stack stored as a folder of one TIFF per plane, planes in file-name order (name them with zero-padded numbers:
 * plane-00009 comes before plane-00010, plane-9 after plane-10). Every file must be one uncompressed grayscale
 * plane of the same size and type. The calibration is the first file's (its "spacing" gives the z step; without it
 * the z step is taken equal to the pixel width, which {@link #zStepKnown()} reports).
 */
public final class FolderPlaneSource implements PlaneSource {

    private final Path folder;
    private final List<Path> files;
    private final TiffPlaneSource[] open;
    private final TiffPlaneSource first;
    private final boolean zKnown;

    private FolderPlaneSource(Path folder, List<Path> files, TiffPlaneSource first, boolean zKnown) {
        this.folder = folder;
        this.files = files;
        this.first = first;
        this.zKnown = zKnown;
        this.open = new TiffPlaneSource[files.size()];
        this.open[0] = first;
    }

    /**
     * @param what the parameter the folder came from, for messages
     * @throws IllegalArgumentException naming the parameter when the folder holds no TIFF, or its files differ in
     *     size or type or hold more than one plane
     */
    public static FolderPlaneSource open(Path folder, String what) {
        if (!Files.isDirectory(folder)) {
            throw new IllegalArgumentException(what + ": folder " + folder + " does not exist");
        }
        List<Path> files = new ArrayList<>();
        try (DirectoryStream<Path> ds = Files.newDirectoryStream(folder, "*.{tif,tiff,TIF,TIFF}")) {
            for (Path f : ds) {
                if (Files.isRegularFile(f) && !f.getFileName().toString().startsWith(".")) {
                    files.add(f);
                }
            }
        } catch (IOException e) {
            throw new IllegalArgumentException(what + ": folder " + folder + " cannot be read: " + e.getMessage(), e);
        }
        if (files.isEmpty()) {
            throw new IllegalArgumentException(what + ": folder " + folder + " holds no .tif file; give a folder of one"
                    + " TIFF per plane");
        }
        files.sort(null);
        TiffPlaneSource first = TiffPlaneSource.open(files.get(0), what);
        if (first.depth() != 1) {
            int n = first.depth();
            first.close();
            throw new IllegalArgumentException(what + ": " + files.get(0) + " holds " + n + " planes; a folder input"
                    + " must hold one TIFF per plane");
        }
        boolean zKnown = hasSpacing(files.get(0));
        return new FolderPlaneSource(folder, files, first, zKnown);
    }

    private static boolean hasSpacing(Path file) {
        try {
            byte[] head = new byte[(int) Math.min(Files.size(file), 4096)];
            try (var in = Files.newInputStream(file)) {
                int n = in.readNBytes(head, 0, head.length);
                return new String(head, 0, n, java.nio.charset.StandardCharsets.ISO_8859_1).contains("\nspacing=");
            }
        } catch (IOException e) {
            return false;
        }
    }

    private TiffPlaneSource plane(int z) {
        synchronized (open) {
            if (open[z] == null) {
                TiffPlaneSource s = TiffPlaneSource.open(files.get(z), "plane " + files.get(z).getFileName());
                if (s.width() != first.width() || s.height() != first.height() || s.bitDepth() != first.bitDepth()
                        || s.depth() != 1) {
                    s.close();
                    throw new IllegalArgumentException("input folder " + folder + ": " + files.get(z).getFileName() + " is "
                            + s.width() + "x" + s.height() + "x" + s.depth() + " " + s.bitDepth() + "-bit but the first"
                            + " plane is " + first.width() + "x" + first.height() + " " + first.bitDepth()
                            + "-bit; every file must be one plane of the same size and type");
                }
                open[z] = s;
            }
            return open[z];
        }
    }

    /** Checks every file now (size, type, one plane), so a bad file fails before the work starts. */
    public void checkAll() {
        for (int z = 0; z < files.size(); z++) {
            plane(z);
        }
        closePlanes();
    }

    private void closePlanes() {
        synchronized (open) {
            for (int z = 1; z < open.length; z++) {
                if (open[z] != null) {
                    open[z].close();
                    open[z] = null;
                }
            }
        }
    }

    /** @return false when the first file gave no z step (then it is taken equal to the pixel width) */
    public boolean zStepKnown() {
        return zKnown;
    }

    @Override
    public int width() {
        return first.width();
    }

    @Override
    public int height() {
        return first.height();
    }

    @Override
    public int depth() {
        return files.size();
    }

    @Override
    public VoxelSize voxel() {
        return first.voxel();
    }

    @Override
    public boolean calibrated() {
        return first.calibrated();
    }

    @Override
    public int bitDepth() {
        return first.bitDepth();
    }

    @Override
    public String title() {
        return folder.getFileName() == null ? "planes" : folder.getFileName().toString();
    }

    @Override
    public Volume read(Box box) {
        int d = depth() == 1 ? 1 : box.d();
        int plane = box.w() * box.h();
        float[] out = new float[plane * d];
        for (int k = 0; k < d; k++) {
            Volume p = plane(depth() == 1 ? 0 : box.z() + k).read(new Box(box.x(), box.y(), 0, box.w(), box.h(), 1));
            System.arraycopy(p.data(), 0, out, k * plane, plane);
        }
        // keep few files open: a stack of thousands of planes must not run out of file handles
        if (box.z() + d >= depth()) {
            closePlanes();
        }
        return new Volume(box.w(), box.h(), d, out, voxel());
    }

    @Override
    public void close() {
        closePlanes();
        first.close();
    }
}
