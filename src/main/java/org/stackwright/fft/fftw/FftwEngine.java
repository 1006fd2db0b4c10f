package org.stackwright.fft.fftw;

import static org.bytedeco.fftw.global.fftw3.fftwf_init_threads;

import org.bytedeco.javacpp.Loader;
import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.fft.RealTransform;
import org.stackwright.parallel.Workers;

/**
 * The native FFT engine: FFTW 3.3.10 in single precision (Frigo &amp; Johnson, "The design and implementation of
 * FFTW3", Proc. IEEE 93(2), 2005) through the JavaCPP presets, which carry the native libraries for Linux, macOS
 * and Windows. Real-to-complex 3D transforms in place in native memory, multi-threaded by FFTW's own threads (as many
 * as the caller's {@link Workers}); plans are made and reused by {@link FftwPlanner}.
 *
 * <p>Not called directly: {@link FftEngines} loads it by name, so a build without FFTW still runs.
 */
public final class FftwEngine implements FftEngine {

    private static final FftwEngine INSTANCE = new FftwEngine();

    private FftwEngine() {
    }

    /**
     * Loads the native library (JavaCPP extracts it into its cache folder on first use), starts FFTW's thread
     * support and reads the wisdom file. Called once per JVM by {@link FftEngines}.
     *
     * @return the engine
     * @throws UnsatisfiedLinkError or another error when the library does not load on this platform
     */
    public static FftwEngine load() {
        checkJavaCppVersion();
        Loader.load(org.bytedeco.fftw.global.fftw3.class);
        synchronized (FftwPlanner.LOCK) {
            if (fftwf_init_threads() == 0) {
                throw new IllegalStateException("FFTW's thread support did not start");
            }
            FftwPlanner.readWisdom();
        }
        return INSTANCE;
    }

    /**
     * JavaCPP cannot be relocated (the JNI names in the native libraries are bound to its package), so in Fiji another
     * plugin's JavaCPP jar may be the one the class loader found. The FFTW presets are built for one JavaCPP version
     * (the part after the last '-' of their version); any other is refused here, before native code runs, so that
     * {@code auto} falls back to the Java engine with this message instead of failing later.
     */
    private static void checkJavaCppVersion() {
        String javacpp;
        String presets;
        try {
            javacpp = Loader.getVersion();
            presets = Loader.getVersion("org.bytedeco", "fftw", org.bytedeco.fftw.global.fftw3.class);
        } catch (java.io.IOException e) {
            throw new IllegalStateException("the JavaCPP and FFTW versions could not be read: " + e.getMessage(), e);
        }
        if (javacpp == null || presets == null) {
            return; // no version information (classes not from the released jars): nothing to compare
        }
        String wanted = presets.substring(presets.lastIndexOf('-') + 1);
        if (!wanted.equals(javacpp)) {
            java.security.CodeSource where = Loader.class.getProtectionDomain().getCodeSource();
            throw new IllegalStateException("JavaCPP " + javacpp + (where == null ? "" : " from " + where.getLocation())
                    + " is loaded, but the FFTW library here needs JavaCPP " + wanted
                    + " (another plugin brings its own JavaCPP; see README, Fiji and JavaCPP)");
        }
    }

    @Override
    public String name() {
        return FftEngines.NATIVE_NAME;
    }

    @Override
    public RealTransform transform(int nx, int ny, int nz, Workers workers) {
        return new FftwTransform(nx, ny, nz, workers);
    }

    @Override
    public String toString() {
        return name();
    }
}
