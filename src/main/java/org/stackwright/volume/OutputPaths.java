package org.stackwright.volume;

import java.io.File;
import java.io.IOException;
import java.nio.charset.Charset;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.InvalidPathException;
import java.nio.file.LinkOption;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.HexFormat;

/**
 * File names as a user types them, checked before any work, the same way for every door:
 * <ul>
 * <li>a path the platform cannot represent (a non-ASCII name while the locale is plain C/POSIX, a NUL character)
 * is refused naming the option and the way out, not with the file system's bare "Malformed input";</li>
 * <li>an output that ends with a separator ({@code newdir/}) names a folder, never a file called {@code newdir};</li>
 * <li>an output whose name is longer than {@value #MAX_NAME_BYTES} bytes is refused before the work (no file
 * system takes it);</li>
 * <li>{@link #real} resolves symbolic links (of the folder and of the file itself), so an output that reaches an
 * input through a link is recognised as that input ({@link #sameFile}) and writing replaces the link's target,
 * not the link.</li>
 * </ul>
 * Temporary and claim files next to an output get short names ({@link #hiddenSibling}) whatever the output's
 * length.
 */
public final class OutputPaths {

    /** The longest file name (one path element) common file systems accept, in bytes. */
    public static final int MAX_NAME_BYTES = 255;
    /** Bytes of the output's name kept in the names of its temporary and claim files. */
    static final int SIBLING_PREFIX_BYTES = 40;

    private OutputPaths() {
    }

    /**
     * @param key the option the path came from, e.g. "--input", named in messages
     * @param text the path as given
     * @return the path
     * @throws IllegalArgumentException naming the key when the platform cannot represent it
     */
    public static Path parse(String key, String text) {
        if (text.indexOf('\0') >= 0) {
            throw new IllegalArgumentException(key + " contains a NUL character");
        }
        try {
            return Paths.get(text);
        } catch (InvalidPathException e) {
            Charset names = Charset.forName(System.getProperty("sun.jnu.encoding", Charset.defaultCharset().name()));
            throw new IllegalArgumentException(key + ": the path '" + text + "' cannot be used: it has characters the"
                    + " system's file-name encoding (" + names.displayName() + ") cannot represent"
                    + (names.equals(StandardCharsets.UTF_8) ? "" : "; run with a UTF-8 locale (for example"
                            + " LC_ALL=C.UTF-8) or rename the file"), e);
        }
    }

    /**
     * Parses an output path: as {@link #parse}, and a text that ends with a separator names a folder, which is
     * refused (one output is a file; folders are outputs of batch runs).
     *
     * @throws IllegalArgumentException naming the key
     */
    public static Path parseOutput(String key, String text) {
        if (text.isBlank()) {
            throw new IllegalArgumentException(key + " is empty; give a file name");
        }
        Path p = parse(key, text);
        if (text.endsWith("/") || text.endsWith(File.separator)) {
            throw new IllegalArgumentException(key + " = '" + text + "' names a folder (it ends with "
                    + File.separator + ")" + (Files.isDirectory(p) ? "" : " that does not exist")
                    + "; give a file name (a folder is an output only when the input is a folder or pattern)");
        }
        checkName(key, p);
        return p;
    }

    /**
     * @throws IllegalArgumentException naming the key when the file name is longer than {@value #MAX_NAME_BYTES}
     *     bytes (UTF-8)
     */
    public static void checkName(String key, Path p) {
        Path name = p.getFileName();
        if (name == null) {
            return;
        }
        int bytes = name.toString().getBytes(StandardCharsets.UTF_8).length;
        if (bytes > MAX_NAME_BYTES) {
            throw new IllegalArgumentException(key + ": the file name is " + bytes + " bytes long; allowed: at most "
                    + MAX_NAME_BYTES + " bytes (choose a shorter name)");
        }
    }

    /**
     * The real location a path writes to: symbolic links of its folders and of the file itself resolved (a link to
     * a missing file gives the file it would create), "." and ".." removed.
     *
     * @param p a path, existing or not
     * @return an absolute path without links in it (as far as the folders exist)
     */
    public static Path real(Path p) {
        Path abs = p.toAbsolutePath().normalize();
        for (int hops = 0; hops < 40 && Files.isSymbolicLink(abs); hops++) {
            try {
                Path target = Files.readSymbolicLink(abs);
                abs = abs.resolveSibling(target).normalize();
            } catch (IOException | UnsupportedOperationException e) {
                break;
            }
        }
        try {
            if (Files.exists(abs)) {
                return abs.toRealPath();
            }
            Path dir = abs.getParent();
            if (dir != null && Files.exists(dir)) {
                return dir.toRealPath().resolve(abs.getFileName());
            }
        } catch (IOException e) {
            // fall through: the checks that follow name the missing or unreadable folder
        }
        return abs;
    }

    /**
     * @return true when the two paths name one file: the same real path, or (for existing files) the same file by
     *     the file system's own test, which also sees hard links
     */
    public static boolean sameFile(Path a, Path b) {
        Path ra = real(a);
        Path rb = real(b);
        if (ra.equals(rb)) {
            return true;
        }
        try {
            return Files.exists(ra, LinkOption.NOFOLLOW_LINKS) && Files.exists(rb, LinkOption.NOFOLLOW_LINKS)
                    && Files.isSameFile(ra, rb);
        } catch (IOException e) {
            return false;
        }
    }

    /**
     * A hidden file next to an output, with a short name: "." + the first {@value #SIBLING_PREFIX_BYTES} bytes of
     * the output's name + "." + 8 hex digits of a hash of the whole name + suffix. At most about 80 bytes, so it
     * never exceeds the name limit, and names of different outputs do not collide by their common beginning.
     */
    static Path hiddenSibling(Path output, String suffix) {
        String name = output.getFileName().toString();
        String prefix = prefixBytes(name, SIBLING_PREFIX_BYTES);
        String hash = HexFormat.of().toHexDigits(name.hashCode());
        return output.resolveSibling("." + prefix + "." + hash + suffix);
    }

    /** @return the longest beginning of s whose UTF-8 form has at most n bytes (whole characters only) */
    static String prefixBytes(String s, int n) {
        int bytes = 0;
        int i = 0;
        while (i < s.length()) {
            int cp = s.codePointAt(i);
            int len = new String(Character.toChars(cp)).getBytes(StandardCharsets.UTF_8).length;
            if (bytes + len > n) {
                break;
            }
            bytes += len;
            i += Character.charCount(cp);
        }
        return s.substring(0, i);
    }
}
