package org.stackwright.model;

import org.stackwright.fft.Convolver;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Blur by a PSF on a fixed grid: periodic convolution through the FFT ({@link Convolver}); the adjoint is the
 * correlation with the PSF. Non-periodic boundaries come from the grid being larger than the data (extended
 * object domain) together with weights that are zero outside the data, see {@link DeconvolutionProblem}.
 *
 * <p>Not safe to call from two threads at once (owns its FFT work buffer).
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
        this.convolver = new Convolver(psf, nx, ny, nz, workers);
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

    /** @return the PSF's sum (the transfer function at frequency zero) */
    public double psfSum() {
        return convolver.kernelSum();
    }
}
