package org.stackwright.fft;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Periodic convolution and correlation with one fixed kernel on one fixed grid, through the FFT.
 *
 * <p>The kernel's centre voxel (index n/2 along each axis) is placed at the grid origin and wrapped, and its
 * transfer function (the OTF for a PSF) is computed once. {@link #convolve} computes H x and {@link #correlate}
 * computes the adjoint H^T x (correlation with the kernel), each with one forward and one inverse transform and
 * no allocation. For a non-periodic ("same" size, zero outside) result, embed the data in a grid at least
 * data + kernel - 1 large: see {@link Convolution}.
 *
 * <p>Memory: the transfer function (a spectrum, about one grid of floats) and the engine's work space. Give the
 * output an array of {@link #workLength()} floats ({@link #newWorkArray()}) and the transform runs in it, in place,
 * with no further grid-sized buffer; with a grid-sized output the Java engine allocates a work spectrum once.
 *
 * <p>Not safe to call from two threads at once (it owns its work space).
 */
public final class Convolver {

    private final RealTransform fft;
    private final float[] otf;

    /**
     * A convolver on the JVM's standard engine ({@link FftEngines#standard()}).
     *
     * @param kernel the kernel (a PSF), used as given (not normalised); not modified
     * @param nx grid width
     * @param ny grid height
     * @param nz grid depth
     * @param workers the threads (not closed by this object)
     */
    public Convolver(Volume kernel, int nx, int ny, int nz, Workers workers) {
        this(kernel, nx, ny, nz, workers, FftEngines.standard());
    }

    /**
     * @param kernel the kernel (a PSF), used as given (not normalised); not modified
     * @param nx grid width
     * @param ny grid height
     * @param nz grid depth
     * @param workers the threads (not closed by this object)
     * @param engine the FFT engine
     */
    public Convolver(Volume kernel, int nx, int ny, int nz, Workers workers, FftEngine engine) {
        this.fft = engine.transform(nx, ny, nz, workers);
        float[] wrapped = new float[nx * ny * nz];
        wrapCentred(kernel, nx, ny, nz, wrapped);
        this.otf = fft.newSpectrum();
        fft.forward(wrapped, otf);
    }

    /**
     * Places the kernel's centre voxel (n/2 along each axis) at the origin of an nx x ny x nz grid, wrapping
     * around (values that land on the same grid voxel are added, so a kernel larger than the grid is folded).
     */
    static void wrapCentred(Volume k, int nx, int ny, int nz, float[] out) {
        int cx = k.width() / 2;
        int cy = k.height() / 2;
        int cz = k.depth() / 2;
        float[] kd = k.data();
        for (int z = 0; z < k.depth(); z++) {
            int gz = Math.floorMod(z - cz, nz);
            for (int y = 0; y < k.height(); y++) {
                int gy = Math.floorMod(y - cy, ny);
                int row = (gz * ny + gy) * nx;
                int krow = (z * k.height() + y) * k.width();
                for (int x = 0; x < k.width(); x++) {
                    out[row + Math.floorMod(x - cx, nx)] += kd[krow + x];
                }
            }
        }
    }

    public int nx() {
        return fft.nx();
    }

    public int ny() {
        return fft.ny();
    }

    public int nz() {
        return fft.nz();
    }

    /** @return number of voxels of the grid */
    public int gridLength() {
        return fft.realLength();
    }

    /** @return the length of an output array that lets the transform run in place (at least the grid length) */
    public int workLength() {
        return Math.max(fft.workLength(), fft.realLength());
    }

    /** @return a new array of {@link #workLength()} floats: a grid in its first {@link #gridLength()} floats */
    public float[] newWorkArray() {
        return new float[workLength()];
    }

    /** @return the engine's name for the run record: java or native */
    public String engine() {
        return fft.engine();
    }

    /** @return how the engine planned this grid ({@link RealTransform#planning()}) */
    public String planning() {
        return fft.planning();
    }

    /**
     * out = kernel (*) in, periodic on the grid.
     *
     * @param in grid in the first {@link #gridLength()} floats, not modified (unless it is out)
     * @param out grid-sized output or a {@link #newWorkArray()}, overwritten (may be the same array as in)
     */
    public void convolve(float[] in, float[] out) {
        fft.filter(in, out, otf, SpectrumProduct.MULTIPLY);
    }

    /**
     * out = kernel (x) in (correlation), the adjoint of {@link #convolve}.
     *
     * @param in grid in the first {@link #gridLength()} floats, not modified (unless it is out)
     * @param out grid-sized output or a {@link #newWorkArray()}, overwritten (may be the same array as in)
     */
    public void correlate(float[] in, float[] out) {
        fft.filter(in, out, otf, SpectrumProduct.CONJUGATE);
    }

    /**
     * @return the grid in the engine's own work space ({@link RealTransform#work()}): load it, filter it in place with
     *     {@link #convolveWork} and {@link #correlateWork}, and run element-wise passes on it without a Java copy
     */
    public WorkGrid work() {
        return fft.work();
    }

    /** work = kernel (*) work: {@link #convolve} on the grid in {@link #work()}. */
    public void convolveWork() {
        fft.filterWork(otf, SpectrumProduct.MULTIPLY);
    }

    /** work = kernel (x) work: {@link #correlate} on the grid in {@link #work()}. */
    public void correlateWork() {
        fft.filterWork(otf, SpectrumProduct.CONJUGATE);
    }

    /** @return the transfer function's value at frequency 0: the kernel's sum */
    public double kernelSum() {
        return otf[0];
    }

    /**
     * One-step Tikhonov-regularised inverse filter (a Wiener filter with a flat noise-to-signal ratio):
     * out = F^-1[ conj(K) F(in) / (|K|^2 + lambda) ].
     *
     * @param in grid-sized input, not modified
     * @param out grid-sized output, overwritten (may be the same array as in)
     * @param lambda regularisation, positive
     */
    public void tikhonov(float[] in, float[] out, double lambda) {
        fft.filter(in, out, otf, SpectrumProduct.tikhonov(lambda));
    }
}
