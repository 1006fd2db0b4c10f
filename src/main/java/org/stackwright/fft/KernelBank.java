package org.stackwright.fft;

import java.util.List;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Several fixed kernels on one grid, for operators that are sums of convolutions: out = sum_k K_k (*) in_k. The
 * sum is accumulated in the Fourier domain, so K convolutions cost K forward transforms and one inverse (not 2K),
 * and the adjoint sum of correlations out_k = K_k (x) in costs one forward transform and K inverses. Kernels are
 * placed as in {@link Convolver} (centre voxel n/2 at the origin, wrapped). Each kernel's transfer function takes
 * one spectrum; two more are work space.
 *
 * <p>Not safe to call from two threads at once (owns its work buffers).
 */
public final class KernelBank {

    private final RealTransform fft;
    private final Workers workers;
    private final float[][] otf;
    private final float[] sum;
    private final float[] work;

    /**
     * @param kernels the kernels, used as given; not modified
     * @param nx grid width
     * @param ny grid height
     * @param nz grid depth
     * @param workers the threads (not closed by this object)
     * @param engine the FFT engine
     */
    public KernelBank(List<Volume> kernels, int nx, int ny, int nz, Workers workers, FftEngine engine) {
        this.fft = engine.transform(nx, ny, nz, workers);
        this.workers = workers;
        this.otf = new float[kernels.size()][];
        float[] wrapped = new float[nx * ny * nz];
        for (int k = 0; k < kernels.size(); k++) {
            java.util.Arrays.fill(wrapped, 0f);
            Convolver.wrapCentred(kernels.get(k), nx, ny, nz, wrapped);
            otf[k] = fft.newSpectrum();
            fft.forward(wrapped, otf[k]);
        }
        this.sum = fft.newSpectrum();
        this.work = fft.newSpectrum();
    }

    /** @return the name of the FFT engine, for run records */
    public String engine() {
        return fft.engine();
    }

    /** @return how the FFT engine planned its transforms, for run records */
    public String planning() {
        return fft.planning();
    }

    /** @return number of kernels */
    public int size() {
        return otf.length;
    }

    /** @return number of voxels of the grid */
    public int gridLength() {
        return fft.realLength();
    }

    /** @return kernel k's sum (its transfer function at frequency zero) */
    public double kernelSum(int k) {
        return otf[k][0];
    }

    /** Starts a sum of convolutions (clears the accumulator). */
    public void clearSum() {
        java.util.Arrays.fill(sum, 0f);
    }

    /**
     * Adds kernel k convolved with in to the sum.
     *
     * @param in grid-sized, not modified
     */
    public void addConvolved(int k, float[] in) {
        fft.forward(in, work);
        multiply(work, otf[k], sum, false, true);
    }

    /**
     * Writes the sum of the convolutions added since {@link #clearSum()}.
     *
     * @param out grid-sized, overwritten
     */
    public void finishSum(float[] out) {
        fft.inverse(sum, out);
    }

    /**
     * Transforms the input of a series of correlations ({@link #correlateHeld}).
     *
     * @param in grid-sized, not modified
     */
    public void hold(float[] in) {
        fft.forward(in, sum);
    }

    /**
     * out = kernel k (x) the held input (correlation, the adjoint of convolution).
     *
     * @param out grid-sized, overwritten
     */
    public void correlateHeld(int k, float[] out) {
        multiply(sum, otf[k], work, true, false);
        fft.inverse(work, out);
    }

    /** dst = a * h (or a * conj(h)), or dst += a * h when accumulating. */
    private void multiply(float[] a, float[] h, float[] dst, boolean conjugate, boolean accumulate) {
        int n = h.length / 2;
        workers.forRange(n, (from, to) -> {
            for (int i = 2 * from, e = 2 * to; i < e; i += 2) {
                float re = a[i];
                float im = a[i + 1];
                float c = h[i];
                float d = conjugate ? -h[i + 1] : h[i + 1];
                float pr = re * c - im * d;
                float pi = re * d + im * c;
                if (accumulate) {
                    dst[i] += pr;
                    dst[i + 1] += pi;
                } else {
                    dst[i] = pr;
                    dst[i + 1] = pi;
                }
            }
        });
    }
}
