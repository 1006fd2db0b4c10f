package org.stackwright.inspect;

import org.stackwright.fft.Convolver;
import org.stackwright.fft.FastSizes;
import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Padding;
import org.stackwright.volume.Volume;

/**
 * The blur part of the forward model for the residual view: H x for an estimate x that lives on the data grid.
 *
 * <p><b>Boundary.</b> An estimate on the data grid only covers the data's field of view, but the data near the
 * border also hold light from objects just outside it. So the estimate is continued past the faces by the PSF
 * half-width, either mirrored (half-sample symmetric, ...c b a | a b c..., which continues a specimen that runs
 * past the edges to first order and keeps a constant object constant up to the border) or with zeros (exact for a
 * specimen that ends inside the field with dark surroundings), and blurred with a periodic FFT convolution on a
 * grid at least data + 2 half-widths large, so that no value wraps into the field of view. Neither continuation
 * knows what really lies outside: {@link TrustedRegion} says which voxels the verdict may trust.
 *
 * <p>A 2D image (depth 1) with a 3D PSF uses the PSF's centre plane (the in-focus plane of a thin specimen).
 */
public final class ForwardBlur {

    private ForwardBlur() {
    }

    /**
     * @param estimate the object estimate on the data grid, not modified
     * @param psf the PSF, odd sizes with its peak at the centre voxel, used as given (normalise first); not modified
     * @param workers threads
     * @return H x, a new volume of the estimate's size and calibration
     */
    public static Volume blur(Volume estimate, Volume psf, Workers workers) {
        return blur(estimate, psf, Padding.Mode.MIRROR, workers, FftEngines.standard());
    }

    /** As above (mirror continuation), on a given FFT engine. */
    public static Volume blur(Volume estimate, Volume psf, Workers workers, FftEngine fft) {
        return blur(estimate, psf, Padding.Mode.MIRROR, workers, fft);
    }

    /**
     * @param estimate the object estimate on the data grid, not modified
     * @param psf the PSF, odd sizes with its peak at the centre voxel, used as given (normalise first); not modified
     * @param continuation how the estimate continues past the faces: MIRROR or ZERO
     * @param workers threads
     * @param fft the FFT engine
     * @return H x, a new volume of the estimate's size and calibration
     */
    public static Volume blur(Volume estimate, Volume psf, Padding.Mode continuation, Workers workers,
            FftEngine fft) {
        if (continuation == Padding.Mode.PERIODIC) {
            throw new IllegalArgumentException("the residual view continues an estimate by MIRROR or ZERO, not PERIODIC");
        }
        Volume k = estimate.depth() == 1 && psf.depth() > 1 ? centrePlane(psf) : psf;
        int hx = k.width() / 2;
        int hy = k.height() / 2;
        int hz = k.depth() / 2;
        int nx = gridSize(estimate.width(), hx);
        int ny = gridSize(estimate.height(), hy);
        int nz = gridSize(estimate.depth(), hz);
        Volume grid = Padding.pad(estimate, nx, ny, nz, hx, hy, hz, continuation);
        Convolver c = new Convolver(k, nx, ny, nz, workers, fft);
        c.convolve(grid.data(), grid.data());
        return Padding.crop(grid, hx, hy, hz, estimate.width(), estimate.height(), estimate.depth());
    }

    /** @return the smallest fast FFT size holding n values plus h on both sides (1 stays 1 for a flat axis) */
    static int gridSize(int n, int h) {
        return n == 1 && h == 0 ? 1 : FastSizes.atLeast(n + 2 * h);
    }

    /** @return the plane at depth n/2 of a PSF, as a one-plane volume renormalised to unit sum */
    static Volume centrePlane(Volume psf) {
        Volume p = Padding.crop(psf, 0, 0, psf.depth() / 2, psf.width(), psf.height(), 1);
        double s = p.sum();
        if (s > 0) {
            float[] d = p.data();
            for (int i = 0; i < d.length; i++) {
                d[i] = (float) (d[i] / s);
            }
        }
        return p;
    }
}
