package org.stackwright.fft;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/** One-off convolutions of a volume with a kernel, returning a volume of the input's size. */
public final class Convolution {

    /** How values outside the volume are taken. */
    public enum Boundary {
        /** zero outside ("same"-size part of the full linear convolution) */
        ZERO,
        /** the volume repeats periodically */
        PERIODIC
    }

    private Convolution() {
    }

    /**
     * @param image input, not modified
     * @param kernel kernel with its centre at index n/2 along each axis, used as given; not modified
     * @param boundary zero-padded or periodic
     * @param correlate true for correlation (the adjoint), false for convolution
     * @return a new volume of the image's size and calibration
     */
    public static Volume apply(Volume image, Volume kernel, Boundary boundary, boolean correlate, Workers workers) {
        int nx;
        int ny;
        int nz;
        if (boundary == Boundary.PERIODIC) {
            nx = image.width();
            ny = image.height();
            nz = image.depth();
        } else {
            nx = paddedSize(image.width(), kernel.width());
            ny = paddedSize(image.height(), kernel.height());
            nz = paddedSize(image.depth(), kernel.depth());
        }
        Convolver c = new Convolver(kernel, nx, ny, nz, workers);
        float[] grid = new float[nx * ny * nz];
        float[] src = image.data();
        for (int z = 0; z < image.depth(); z++) {
            for (int y = 0; y < image.height(); y++) {
                System.arraycopy(src, image.index(0, y, z), grid, (z * ny + y) * nx, image.width());
            }
        }
        if (correlate) {
            c.correlate(grid, grid);
        } else {
            c.convolve(grid, grid);
        }
        Volume out = Volume.zeros(image.width(), image.height(), image.depth(), image.voxel());
        for (int z = 0; z < image.depth(); z++) {
            for (int y = 0; y < image.height(); y++) {
                System.arraycopy(grid, (z * ny + y) * nx, out.data(), out.index(0, y, z), image.width());
            }
        }
        return out;
    }

    /** @return H x with zero boundaries, same size as x */
    public static Volume convolve(Volume image, Volume kernel, Workers workers) {
        return apply(image, kernel, Boundary.ZERO, false, workers);
    }

    /**
     * @return the smallest fast FFT size that holds n data values plus the kernel's reach on both sides without
     *     wrap-around: n + k - 1 rounded up to a product of 2, 3 and 5 (1 stays 1 for a flat axis)
     */
    public static int paddedSize(int n, int k) {
        if (n == 1 && k == 1) {
            return 1;
        }
        return FastSizes.atLeast(n + k - 1);
    }
}
