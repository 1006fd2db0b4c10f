package org.stackwright.cli;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.Comparator;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.stream.Stream;

import ij.IJ;
import ij.ImagePlus;

import org.stackwright.testing.TinyTiff;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Input files for the door tests, made in a fresh temporary folder: good and bad TIFFs, text files, folders.
 * Every input file's SHA-256 is recorded when made, so a test can prove afterwards that no input was modified.
 */
final class Fixtures implements AutoCloseable {

    final Path dir;
    private final Map<Path, String> hashes = new LinkedHashMap<>();

    Fixtures() {
        try {
            dir = Files.createTempDirectory("stackwright-fixtures");
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** @return true when running as root, which ignores file permissions (permission cases are skipped) */
    static boolean isRoot() {
        return "root".equals(System.getProperty("user.name"));
    }

    Path path(String name) {
        return dir.resolve(name);
    }

    /** A 32-bit TIFF of the given pixels (w x h x d, 0.1 um pixels). */
    Path tiff(String name, int w, int h, int d, float... values) {
        float[] px = new float[w * h * d];
        for (int i = 0; i < px.length; i++) {
            px[i] = values.length == 0 ? 1 + (i * 37 % 101) : values[i % values.length];
        }
        Path p = path(name);
        TiffFiles.write(new Volume(w, h, d, px, new VoxelSize(0.1, 0.1, 0.3)), p, true);
        return recorded(p);
    }

    /** A 32-bit TIFF of a volume (its pixels and voxel size as given). */
    Path volume(String name, Volume v) {
        Path p = path(name);
        TiffFiles.write(v, p, true);
        return recorded(p);
    }

    /** A hyperstack TIFF with the given channels, slices and frames. */
    Path hyperstack(String name, int channels, int slices, int frames) {
        ImagePlus imp = IJ.createImage(name, "32-bit ramp", 8, 8, channels, slices, frames);
        Path p = path(name);
        TiffFiles.write(imp, p, true);
        return recorded(p);
    }

    Path text(String name, String content) {
        Path p = path(name);
        try {
            Files.writeString(p, content);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return recorded(p);
    }

    /** A good stack cut to the given fraction of its length (pixels missing). */
    Path truncated(String name, double fraction) {
        return truncated(name, fraction, 4);
    }

    /** A good 16x16xdepth image cut to the given fraction of its length. */
    Path truncated(String name, double fraction, int depth) {
        Path good = tiff(hidden(name), 16, 16, depth);
        try {
            byte[] b = Files.readAllBytes(good);
            Path p = path(name);
            Files.write(p, java.util.Arrays.copyOf(b, (int) (b.length * fraction)));
            return recorded(p);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** A good TIFF whose header points its first image directory past the end of the file. */
    Path damagedHeader(String name) {
        Path good = tiff(hidden(name), 8, 8, 2);
        try {
            byte[] b = Files.readAllBytes(good);
            boolean little = b[0] == 'I';
            int off = 0x7ff0_0000;
            for (int i = 0; i < 4; i++) {
                b[4 + i] = (byte) (little ? off >>> (8 * i) : off >>> (8 * (3 - i)));
            }
            Path p = path(name);
            Files.write(p, b);
            return recorded(p);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /** @return a hidden sibling name for the intact original of a damaged file */
    private static String hidden(String name) {
        int slash = name.lastIndexOf('/');
        return name.substring(0, slash + 1) + "." + name.substring(slash + 1) + ".whole.tif";
    }

    Path rgb(String name) {
        byte[] px = new byte[4 * 4 * 3];
        for (int i = 0; i < px.length; i++) {
            px[i] = (byte) (i * 5);
        }
        Path p = path(name);
        try {
            TinyTiff.writeRgb(p, 4, 4, px);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return recorded(p);
    }

    Path float64(String name, double... values) {
        Path p = path(name);
        try {
            TinyTiff.writeFloat64(p, values.length, 1, values);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return recorded(p);
    }

    Path folder(String name) {
        Path p = path(name);
        try {
            Files.createDirectories(p);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return p;
    }

    private Path recorded(Path p) {
        hashes.put(p, sha256(p));
        return p;
    }

    /** @return inputs whose content changed since they were made, with old and new hash; empty when none */
    Map<Path, String> changedInputs() {
        Map<Path, String> changed = new LinkedHashMap<>();
        hashes.forEach((p, h) -> {
            String now = Files.exists(p) ? sha256(p) : "missing";
            if (!now.equals(h)) {
                changed.put(p, h + " -> " + now);
            }
        });
        return changed;
    }

    static String sha256(Path p) {
        try {
            return HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(Files.readAllBytes(p)));
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        } catch (NoSuchAlgorithmException e) {
            throw new IllegalStateException(e);
        }
    }

    /** @return names of files in the folder that are left-over temporary files of an output */
    static java.util.List<String> temporaryFiles(Path folder) {
        try (Stream<Path> s = Files.list(folder)) {
            return s.map(p -> p.getFileName().toString()).filter(n -> n.contains(".part-")).sorted().toList();
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    @Override
    public void close() {
        try (Stream<Path> s = Files.walk(dir)) {
            s.sorted(Comparator.reverseOrder()).forEach(p -> {
                p.toFile().setWritable(true);
                p.toFile().delete();
            });
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
