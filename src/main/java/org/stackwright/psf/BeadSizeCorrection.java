package org.stackwright.psf;

import org.stackwright.fft.Convolution;
import org.stackwright.fft.Convolver;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Removes the blur of a bead's own size from an averaged bead image. The image of a uniformly fluorescent bead
 * is the PSF convolved with a solid ball of the bead's diameter; the ball (voxel-integrated on 5x5x5 sub-voxels)
 * is used as the blur of a short Richardson-Lucy run (Richardson, JOSA 62(1):55-59, 1972; Lucy, Astronomical
 * Journal 79:745-754, 1974) that starts from the bead image itself, with zero-padded convolutions that do not wrap
 * around and work buffers made once. Few iterations are used on purpose: the
 * correction is small for sub-resolution beads and more iterations would amplify noise.
 */
final class BeadSizeCorrection {

    /** Richardson-Lucy iterations. */
    static final int ITERATIONS = 10;

    private BeadSizeCorrection() {
    }

    /** @return true when a ball of this diameter covers more than one voxel, so correcting changes anything */
    static boolean matters(double diameterUm, Volume psf) {
        return diameterUm > 0.5 * Math.min(psf.voxel().x(), Math.min(psf.voxel().y(),
                psf.depth() == 1 ? Double.MAX_VALUE : psf.voxel().z()));
    }

    /**
     * @param measured averaged bead image, unit sum, not modified
     * @param diameterUm bead diameter, micrometres
     * @return the corrected PSF, unit sum
     */
    static Volume correct(Volume measured, double diameterUm, Workers workers) {
        Volume ball = ball(measured, diameterUm);
        int nx = measured.width();
        int ny = measured.height();
        int nz = measured.depth();
        // zero-padded grid large enough that the periodic convolution does not wrap; buffers made once
        int gx = Convolution.paddedSize(nx, ball.width());
        int gy = Convolution.paddedSize(ny, ball.height());
        int gz = Convolution.paddedSize(nz, ball.depth());
        Convolver blur = new Convolver(ball, gx, gy, gz, workers);
        float[] estimate = new float[gx * gy * gz];
        float[] work = new float[estimate.length];
        float[] y = measured.data();
        for (int z = 0; z < nz; z++) {
            for (int r = 0; r < ny; r++) {
                System.arraycopy(y, measured.index(0, r, z), estimate, (z * gy + r) * gx, nx);
            }
        }
        for (int it = 0; it < ITERATIONS; it++) {
            blur.convolve(estimate, work);
            for (int z = 0; z < gz; z++) {
                for (int r = 0; r < gy; r++) {
                    for (int x = 0, g = (z * gy + r) * gx; x < gx; x++, g++) {
                        boolean inside = x < nx && r < ny && z < nz;
                        work[g] = inside && work[g] > 0 ? y[measured.index(x, r, z)] / work[g] : 0;
                    }
                }
            }
            blur.correlate(work, work);
            for (int g = 0; g < estimate.length; g++) {
                estimate[g] *= work[g];
            }
        }
        Volume out = Volume.zeros(nx, ny, nz, measured.voxel());
        for (int z = 0; z < nz; z++) {
            for (int r = 0; r < ny; r++) {
                System.arraycopy(estimate, (z * gy + r) * gx, out.data(), out.index(0, r, z), nx);
            }
        }
        return BeadAverager.centreAndNormalise(out);
    }

    /** A solid ball of the diameter, voxel-integrated, unit sum, odd size. */
    static Volume ball(Volume like, double diameterUm) {
        double r = diameterUm / 2;
        int hx = (int) Math.ceil(r / like.voxel().x());
        int hy = (int) Math.ceil(r / like.voxel().y());
        int hz = like.depth() == 1 ? 0 : (int) Math.ceil(r / like.voxel().z());
        Volume b = Volume.zeros(2 * hx + 1, 2 * hy + 1, 2 * hz + 1, like.voxel());
        int sub = 5;
        double total = 0;
        for (int z = -hz; z <= hz; z++) {
            for (int y = -hy; y <= hy; y++) {
                for (int x = -hx; x <= hx; x++) {
                    int inside = 0;
                    for (int c = 0; c < sub; c++) {
                        double pz = hz == 0 ? 0 : (z + (c - 2) / 5.0) * like.voxel().z();
                        for (int bb = 0; bb < sub; bb++) {
                            double py = (y + (bb - 2) / 5.0) * like.voxel().y();
                            for (int a = 0; a < sub; a++) {
                                double px = (x + (a - 2) / 5.0) * like.voxel().x();
                                if (px * px + py * py + pz * pz <= r * r) {
                                    inside++;
                                }
                            }
                        }
                    }
                    b.set(x + hx, y + hy, z + hz, inside);
                    total += inside;
                }
            }
        }
        float[] d = b.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (d[i] / Math.max(total, 1));
        }
        return b;
    }
}
