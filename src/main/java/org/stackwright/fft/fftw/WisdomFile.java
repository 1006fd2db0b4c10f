package org.stackwright.fft.fftw;

import static org.bytedeco.fftw.global.fftw3.fftwf_export_wisdom_to_filename;
import static org.bytedeco.fftw.global.fftw3.fftwf_import_wisdom_from_filename;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.nio.file.StandardCopyOption;
import java.util.Locale;

import org.bytedeco.javacpp.Loader;

/**
 * FFTW's wisdom (its measured plans) kept between runs, only in the user's cache folder, never next to data:
 * {@code stackwright/fftw-wisdom-<platform>.txt} under {@code $XDG_CACHE_HOME} or {@code ~/.cache} (Linux),
 * {@code ~/Library/Caches} (macOS) or {@code %LOCALAPPDATA%} (Windows); the system property
 * {@code stackwright.cache} names another folder (the tests point it into the build folder). A file that cannot be
 * read or written is ignored: plans are then made again. Callers hold {@link FftwPlanner#LOCK}.
 */
final class WisdomFile {

    private WisdomFile() {
    }

    /** @return the wisdom file of this platform */
    static Path path() {
        return folder().resolve("fftw-wisdom-" + Loader.getPlatform() + ".txt");
    }

    /** @return the user's cache folder for Stackwright (not created here) */
    static Path folder() {
        String own = System.getProperty("stackwright.cache");
        if (own != null && !own.isBlank()) {
            return Paths.get(own);
        }
        String os = System.getProperty("os.name", "").toLowerCase(Locale.ROOT);
        String home = System.getProperty("user.home");
        if (os.contains("win")) {
            String local = System.getenv("LOCALAPPDATA");
            return (local != null ? Paths.get(local) : Paths.get(home, "AppData", "Local")).resolve("Stackwright").resolve("cache");
        }
        if (os.contains("mac")) {
            return Paths.get(home, "Library", "Caches", "Stackwright");
        }
        String xdg = System.getenv("XDG_CACHE_HOME");
        return (xdg != null && !xdg.isBlank() ? Paths.get(xdg) : Paths.get(home, ".cache")).resolve("stackwright");
    }

    static void read() {
        Path p = path();
        if (Files.isReadable(p)) {
            fftwf_import_wisdom_from_filename(p.toString());
        }
    }

    /** Writes all wisdom FFTW holds (write to a temporary file, then rename: readers never see half a file). */
    static void write() {
        Path p = path();
        try {
            Files.createDirectories(p.getParent());
            Path tmp = Files.createTempFile(p.getParent(), "fftw-wisdom", ".tmp");
            try {
                if (fftwf_export_wisdom_to_filename(tmp.toString()) != 0) {
                    Files.move(tmp, p, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
                }
            } finally {
                Files.deleteIfExists(tmp);
            }
        } catch (IOException | RuntimeException e) {
            // no cache folder we can write: measured plans are simply made again next time
        }
    }
}
