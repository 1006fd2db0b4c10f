package org.stackwright.model;

import org.stackwright.fft.Convolver;
import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.fft.WorkGrid;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Blur by a PSF on a fixed grid: periodic convolution through the FFT ({@link Convolver}); the adjoint is the
 * correlation with the PSF. Non-periodic boundaries come from the grid being larger than the data (extended
 * object domain) together with weights that are zero outside the data, see {@link DeconvolutionProblem}.
 *
 * <p>Not safe to call from two threads at once (owns its FFT work buffer). {@code out} of {@link #apply} and
 * {@link #applyAdjoint} may be a grid-sized array or a {@link #newWorkArray()}; with the latter the transforms run in
 * place in it.
 */
public final class BlurOperator implements LinearOperator {

    private final Convolver convolver;

    /**
     * @param psf the PSF, centre at index n/2 along each axis, used as given; not modified
     * @param nx grid width
     * @param ny grid height
     * @param nz grid depth
     */
    public BlurOperator(Volume psf, int nx, int ny, int nz, Workers workers) {
        this(psf, nx, ny, nz, workers, FftEngines.standard());
    }

    /**
     * As above, on a given FFT engine.
     *
     * @param fft the FFT engine
     */
    public BlurOperator(Volume psf, int nx, int ny, int nz, Workers workers, FftEngine fft) {
        this.convolver = new Convolver(psf, nx, ny, nz, workers, fft);
    }

    @Override
    public int domainLength() {
        return convolver.gridLength();
    }

    @Override
    public int rangeLength() {
        return convolver.gridLength();
    }

    @Override
    public void apply(float[] in, float[] out) {
        convolver.convolve(in, out);
    }

    @Override
    public void applyAdjoint(float[] in, float[] out) {
        convolver.correlate(in, out);
    }

    /**
     * One-step Tikhonov / Wiener inverse: out = F^-1[conj(H) F(in) / (|H|^2 + lambda)] on the grid.
     *
     * @param in not modified
     * @param out overwritten (may be in)
     */
    public void tikhonov(float[] in, float[] out, double lambda) {
        convolver.tikhonov(in, out, lambda);
    }

    /**
     * @return a new array in which {@link #apply} and {@link #applyAdjoint} run in place (give it as {@code out}):
     *     a grid in its first {@link #domainLength()} floats, with room for the FFT's work (no further grid-sized
     *     buffer is then allocated)
     */
    public float[] newWorkArray() {
        return convolver.newWorkArray();
    }

    /** @return the grid in the FFT engine's own work space, for {@link #applyInWork} and {@link #applyAdjointInWork} */
    public WorkGrid work() {
        return convolver.work();
    }

    /** work = H work, on the grid of {@link #work()} (no copy in or out). */
    public void applyInWork() {
        convolver.convolveWork();
    }

    /** work = H^T work, on the grid of {@link #work()}. */
    public void applyAdjointInWork() {
        convolver.correlateWork();
    }

    /** @return the FFT engine of the blur ({@code java} or {@code native}), for the run record */
    public String fftEngine() {
        return convolver.engine();
    }

    /** @return how that engine planned the transforms, for the run record */
    public String fftPlanning() {
        return convolver.planning();
    }

    /** @return the PSF's sum (the transfer function at frequency zero) */
    public double psfSum() {
        return convolver.kernelSum();
    }
}
