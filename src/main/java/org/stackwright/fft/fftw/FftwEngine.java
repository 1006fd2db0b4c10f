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
        Loader.load(org.bytedeco.fftw.global.fftw3.class);
        synchronized (FftwPlanner.LOCK) {
            if (fftwf_init_threads() == 0) {
                throw new IllegalStateException("FFTW's thread support did not start");
            }
            FftwPlanner.readWisdom();
        }
        return INSTANCE;
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
