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
 * <p><b>Boundary.</b> A deconvolution estimate only covers the data's field of view, but the data near the border
 * also hold light from objects just outside it. Blurring the estimate with zeros outside would predict a dark band
 * (up to the PSF half-width wide) along every face, and the residual view would flag every border as a mismatch.
 * So the estimate is first mirror-padded by the PSF half-width on every side (half-sample symmetric, ...c b a | a b
 * c...), which continues the object smoothly across the border, and then blurred with a periodic FFT convolution on a
 * grid at least data + 2 half-widths large, so that no value wraps into the field of view. A constant estimate thus
 * gives a constant prediction up to the border (checked in the tests), and a smooth object is continued to first
 * order. What the mirror cannot know (an object just outside the view) still leaves a residual in the outer band
 * of one PSF half-width; {@link ResidualMaps#border()} reports that width so a reader can discount it.
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
        return blur(estimate, psf, workers, FftEngines.standard());
    }

    /** As above, on a given FFT engine. */
    public static Volume blur(Volume estimate, Volume psf, Workers workers, FftEngine fft) {
        Volume k = estimate.depth() == 1 && psf.depth() > 1 ? centrePlane(psf) : psf;
        int hx = k.width() / 2;
        int hy = k.height() / 2;
        int hz = k.depth() / 2;
        int nx = gridSize(estimate.width(), hx);
        int ny = gridSize(estimate.height(), hy);
        int nz = gridSize(estimate.depth(), hz);
        Volume grid = Padding.pad(estimate, nx, ny, nz, hx, hy, hz, Padding.Mode.MIRROR);
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
