package org.stackwright.fft;

import org.stackwright.parallel.Workers;

/**
 * An FFT engine: makes {@link RealTransform}s for grid sizes. Two engines exist, the pure-Java one (always there, the
 * reference) and FFTW through JavaCPP (package {@code fft.fftw}, where its native library loads); {@link FftEngines}
 * chooses. Code outside this package gets an engine from the caller ({@code op.RunContext#fft()}) and never asks
 * which one it is; the run record does ({@link RealTransform#engine()}, {@link RealTransform#planning()}).
 */
public interface FftEngine {

    /** @return {@code java} or {@code native} */
    String name();

    /**
     * @param nx size along x (fastest), at least 1
     * @param ny size along y, at least 1
     * @param nz size along z, at least 1
     * @param workers the threads (not closed by the transform)
     * @return a transform of that size; engines reuse their plans per size
     */
    RealTransform transform(int nx, int ny, int nz, Workers workers);
}
