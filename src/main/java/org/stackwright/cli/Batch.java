package org.stackwright.cli;

import java.io.IOException;
import java.nio.file.DirectoryStream;
import java.nio.file.FileSystems;
import java.nio.file.InvalidPathException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.PathMatcher;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.stackwright.op.Param;
import org.stackwright.volume.OutputPaths;
import org.stackwright.volume.TiffFiles;

/**
 * Batch mode of the command line: the main input names a folder (every .tif/.tiff in it) or, only when asked with
 * the prefix {@value #PATTERN_PREFIX}, a file pattern ({@code glob:data/*.tif}, with {@code * ? [..] {a,b}} in
 * the file name part), and each output option names a folder. A name that exists as a file is always that file,
 * whatever characters it holds ({@code psf [1].tif}). Files are processed in name order; output names are
 * {@code <title>-<operation>.tif} for the main output {@code output} and {@code <title>-<key>.tif} (or
 * {@code .json}) for the others.
 */
final class Batch {

    /** The prefix that makes an input a file pattern (the syntax of Java's glob path matcher). */
    static final String PATTERN_PREFIX = "glob:";

    private Batch() {
    }

    /** @return true when the value names a folder or, with {@value #PATTERN_PREFIX}, a file pattern */
    static boolean isBatch(String value) {
        if (value == null) {
            return false;
        }
        if (value.startsWith(PATTERN_PREFIX)) {
            return true;
        }
        try {
            return Files.isDirectory(Paths.get(value));
        } catch (InvalidPathException e) {
            return false; // not a usable path at all; the input check names the option
        }
    }

    /** @return true when a name holds characters a pattern would treat specially */
    static boolean looksLikePattern(String value) {
        return value.chars().anyMatch(c -> c == '*' || c == '?' || c == '[' || c == '{');
    }

    /**
     * @param key the input option, for messages
     * @param value a folder or a pattern
     * @return the matching TIFF files, sorted by name
     * @throws IllegalArgumentException naming the option when the folder is missing or nothing matches
     */
    static List<Path> inputs(String key, String value) {
        boolean pattern = value.startsWith(PATTERN_PREFIX);
        Path p = OutputPaths.parse("--" + key, pattern ? value.substring(PATTERN_PREFIX.length()) : value);
        Path dir;
        PathMatcher m;
        if (!pattern) {
            dir = p;
            m = FileSystems.getDefault().getPathMatcher("glob:*.{tif,tiff,TIF,TIFF}");
        } else {
            dir = p.getParent() == null ? Paths.get(".") : p.getParent();
            try {
                m = FileSystems.getDefault().getPathMatcher("glob:" + p.getFileName());
            } catch (IllegalArgumentException e) {
                throw new IllegalArgumentException("--" + key + " = '" + value + "' is not a valid file pattern ("
                        + e.getMessage() + "); allowed: a file, a folder, or a pattern such as glob:data/*.tif");
            }
        }
        if (!Files.isDirectory(dir)) {
            throw new IllegalArgumentException("--" + key + ": folder " + dir + " does not exist");
        }
        List<Path> files = new ArrayList<>();
        try (DirectoryStream<Path> ds = Files.newDirectoryStream(dir)) {
            for (Path f : ds) {
                if (Files.isRegularFile(f) && m.matches(f.getFileName()) && !f.getFileName().toString().startsWith(".")) {
                    files.add(f);
                }
            }
        } catch (IOException e) {
            throw new IllegalArgumentException("--" + key + ": folder " + dir + " cannot be read: " + e.getMessage(), e);
        }
        if (files.isEmpty()) {
            throw new IllegalArgumentException("--" + key + " = '" + value + "' matches no file; allowed: a TIFF file,"
                    + " a folder holding .tif files, or a pattern such as glob:data/*.tif");
        }
        files.sort(null);
        return files;
    }

    /**
     * @return the output file for one input in an output folder
     * @throws IllegalArgumentException naming the option when the folder does not exist
     */
    static Path output(Param p, String operation, String folder, Path input) {
        Path dir = Paths.get(folder);
        if (!Files.isDirectory(dir)) {
            throw new IllegalArgumentException("--" + p.key() + " = '" + folder + "' is not a folder; in batch mode"
                    + " (a folder or pattern as input) every output option names an existing folder");
        }
        String title = TiffFiles.titleOf(input);
        String suffix = p.key().equals("output") ? operation : p.key();
        String ext = p.fileEnding();
        return dir.resolve(title + "-" + suffix.toLowerCase(Locale.ROOT) + ext);
    }
}
