package org.stackwright.solve;

import java.util.Locale;
import java.util.function.Consumer;

import org.stackwright.volume.Padding;
import org.stackwright.volume.Resampling;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Makes a PSF fit for deconvolution, saying what it changed: refuses non-finite values and a zero or negative sum;
 * clips small negative values (from background subtraction of a measured PSF) to zero; pads an even size with one
 * zero plane at the far end so the size is odd and the centre voxel (index n/2) stays where it was; resamples a
 * PSF recorded at another voxel size to the image's (the centre stays on the centre voxel); normalises to unit sum.
 */
public final class PsfCheck {

    private PsfCheck() {
    }

    /**
     * @param psf the PSF as read, not modified
     * @param imageVoxel the image's voxel size
     * @param imageDepth the image's depth (a 2D image uses the PSF's centre plane)
     * @param note receives one line per change made
     * @return a new PSF: odd sizes, non-negative, unit sum, at the image's voxel size
     * @throws IllegalArgumentException naming "psf" when the PSF cannot be used
     */
    public static Volume prepare(Volume psf, VoxelSize imageVoxel, int imageDepth, Consumer<String> note) {
        int bad = psf.countNonFinite();
        if (bad > 0) {
            throw new IllegalArgumentException("psf has " + bad + " NaN or infinite voxels; give a PSF with finite values");
        }
        double sum = psf.sum();
        if (!(sum > 0)) {
            throw new IllegalArgumentException("psf sums to " + sum + "; a PSF must have a positive sum (is it empty or background-subtracted below zero?)");
        }
        Volume p = psf.copy();
        float[] d = p.data();
        float max = p.max();
        int clipped = 0;
        double negative = 0;
        for (int i = 0; i < d.length; i++) {
            if (d[i] < 0) {
                negative -= d[i];
                d[i] = 0;
                clipped++;
            }
        }
        if (clipped > 0) {
            note.accept(String.format(Locale.ROOT, "psf: %d negative voxels (total %.3g, largest value %.3g) set to 0",
                    clipped, negative, max));
        }
        if (imageDepth == 1 && p.depth() > 1) {
            p = Padding.crop(p, 0, 0, p.depth() / 2, p.width(), p.height(), 1);
            note.accept("psf: the image is 2D, so the PSF's centre plane (z = " + psf.depth() / 2 + ") is used");
        }
        if (!p.voxel().sameAs(imageVoxel)) {
            VoxelSize from = p.voxel();
            int nx = odd(p.width() * from.x() / imageVoxel.x());
            int ny = odd(p.height() * from.y() / imageVoxel.y());
            int nz = p.depth() == 1 ? 1 : odd(p.depth() * from.z() / imageVoxel.z());
            p = Resampling.resample(p, imageVoxel, nx, ny, nz);
            note.accept("psf: resampled from voxel size " + from + " to the image's " + imageVoxel + " ("
                    + psf.shape() + " -> " + p.shape() + ")");
        }
        if (p.width() % 2 == 0 || p.height() % 2 == 0 || p.depth() % 2 == 0) {
            String before = p.shape();
            p = Padding.pad(p, p.width() | 1, p.height() | 1, p.depth() | 1, 0, 0, 0, Padding.Mode.ZERO);
            note.accept("psf: even size " + before + " padded with zeros at the far end to " + p.shape()
                    + " (centre voxel n/2 unchanged)");
        }
        double s = p.sum();
        if (!(s > 0)) {
            throw new IllegalArgumentException("psf sums to " + s + " after preparation; give a PSF with a positive sum");
        }
        float[] q = p.data();
        for (int i = 0; i < q.length; i++) {
            q[i] = (float) (q[i] / s);
        }
        return p;
    }

    private static int odd(double n) {
        int m = Math.max(1, (int) Math.round(n));
        return (m % 2 == 0) ? m + 1 : m;
    }
}
