package org.stackwright.fft;

/**
 * A real-to-complex 3D transform of one grid size on one FFT engine: the part of {@link FftEngine} that does the
 * work. The spectrum layout is the same for every engine: (nx/2+1) x ny x nz complex values, interleaved (re, im),
 * kx fastest, then ky, then kz; forward uses exp(-2 pi i k x / n) and {@link #inverse} scales by 1/(nx ny nz).
 *
 * <p>An object holds work space; it is not safe to call from two threads at once.
 */
public interface RealTransform {

    int nx();

    int ny();

    int nz();

    /** @return number of floats in a real array: nx ny nz */
    default int realLength() {
        return nx() * ny() * nz();
    }

    /** @return number of floats in a spectrum array: 2 (nx/2+1) ny nz */
    default int spectrumLength() {
        return 2 * (nx() / 2 + 1) * ny() * nz();
    }

    /** @return a new spectrum array */
    default float[] newSpectrum() {
        return new float[spectrumLength()];
    }

    /**
     * @param real input, at least {@link #realLength()} values (the first nx ny nz are used), not modified
     * @param spectrum output, {@link #spectrumLength()} values, overwritten
     */
    void forward(float[] real, float[] spectrum);

    /**
     * @param spectrum input, destroyed (used as work space)
     * @param real output, the first nx ny nz values overwritten
     */
    void inverse(float[] spectrum, float[] real);

    /**
     * The length of an array that {@link #filter} can use as its own work space (an in-place transform, no further
     * grid-sized buffer): the spectrum length where the engine transforms Java arrays in place, the real length
     * where its work space lives elsewhere.
     */
    int workLength();

    /**
     * out = F^-1[ product(F(in), kernel) ]: one filtering of a grid by a spectrum (a convolution, correlation or
     * regularised inverse). When {@code out} has at least {@link #workLength()} floats it is used as work space;
     * otherwise the transform allocates its own once.
     *
     * @param in the grid in its first nx ny nz floats, not modified (unless it is {@code out})
     * @param out receives the result in its first nx ny nz floats; may be {@code in}; floats beyond are undefined
     * @param kernel a spectrum made by {@link #forward} of this transform, not modified
     * @param product how each spectrum value is combined with the kernel's
     */
    void filter(float[] in, float[] out, float[] kernel, SpectrumProduct product);

    /**
     * @return the grid held in this transform's own work space (made on first call, then the same object): load a
     *     grid into it, filter it there with {@link #filterWork} and run element-wise passes on it, without a copy in
     *     a Java array. {@link #forward}, {@link #inverse} and {@link #filter} may use the same space; they then count
     *     up its {@link WorkGrid#generation()}.
     */
    WorkGrid work();

    /**
     * work = F^-1[ product(F(work), kernel) ]: the grid in {@link #work()} filtered in place, the same arithmetic
     * as {@link #filter}.
     *
     * @param kernel a spectrum made by {@link #forward} of this transform, not modified
     * @param product how each spectrum value is combined with the kernel's
     */
    void filterWork(float[] kernel, SpectrumProduct product);

    /**
     * Checks a grid size for any engine: at least 1 along each axis, and a spectrum that fits one Java array.
     *
     * @throws IllegalArgumentException naming the size
     */
    static void checkSize(int nx, int ny, int nz) {
        if (nx < 1 || ny < 1 || nz < 1) {
            throw new IllegalArgumentException("FFT size must be at least 1x1x1 (given " + nx + "x" + ny + "x" + nz + ")");
        }
        if ((long) (nx / 2 + 1) * ny * nz * 2 > Integer.MAX_VALUE - 8) {
            throw new IllegalArgumentException("FFT size " + nx + "x" + ny + "x" + nz + " is too large for one array");
        }
    }

    /**
     * Checks that an argument array holds at least {@code min} floats.
     *
     * @param what the argument's name, for the message
     * @throws IllegalArgumentException naming the argument, its length and the size
     */
    static void checkLength(RealTransform t, float[] a, int min, String what) {
        if (a.length < min) {
            throw new IllegalArgumentException(what + " array of " + a.length + " floats is shorter than " + min
                    + " (FFT size " + t.nx() + "x" + t.ny() + "x" + t.nz() + ")");
        }
    }

    /** @return the engine's name for the run record: {@code java} or {@code native} */
    String engine();

    /**
     * @return how the transform was planned, for the run record: {@code fixed} for the Java engine; for the native
     *     engine {@code estimate}, {@code measured, from wisdom} or {@code measured in this run}
     */
    String planning();
}
