package org.stackwright.psf;

import java.util.Locale;

import org.stackwright.op.RunContext;
import org.stackwright.volume.Resampling;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Checks a PSF given by the user against the image it will be used with, and returns a PSF ready for use (odd
 * sizes, peak at the centre voxel n/2, unit sum, the image's voxel size). Every refusal names the PSF's
 * parameter key, the value found and what is allowed. Rules, in the order applied:
 * <ol>
 * <li>NaN or infinite values: refused.</li>
 * <li>no positive value (all zeros, or all negative): refused.</li>
 * <li>negative values: when their total magnitude is at most {@link #NEGATIVE_TOLERANCE} of the positive total
 * (background noise of a measured PSF) they are set to 0 with a warning; more is refused.</li>
 * <li>a 2D PSF for a 3D stack, or a 3D PSF for a 2D image: refused.</li>
 * <li>another voxel size than the image's: resampled to the image's voxel size (sizes kept odd), with a note;
 * never silently reused.</li>
 * <li>an even size: refused (the centre voxel n/2 must be the optical axis).</li>
 * <li>larger than the image in any direction: refused.</li>
 * <li>peak off the centre voxel: up to one voxel a warning (noise in a measured PSF), further refused.</li>
 * </ol>
 * The PSF passed in is never modified.
 */
public final class PsfChecks {

    /** Largest allowed ratio of the negative to the positive total before a PSF is refused (common practice). */
    public static final double NEGATIVE_TOLERANCE = 0.01;

    private PsfChecks() {
    }

    /**
     * @param key the PSF's parameter key (e.g. "psf"), named in messages
     * @param psf the PSF, not modified
     * @param image the image it is for, not modified (only its size and voxel size are used)
     * @param ctx where notes and warnings go
     * @return a new, checked, normalised PSF at the image's voxel size
     * @throws IllegalArgumentException naming the key when the PSF cannot be used
     */
    public static Volume prepare(String key, Volume psf, Volume image, RunContext ctx) {
        float[] d = psf.data();
        requireUsableValues(key, psf);
        int negative = 0;
        double pos = 0;
        double neg = 0;
        for (float f : d) {
            if (f > 0) {
                pos += f;
            } else if (f < 0) {
                negative++;
                neg -= f;
            }
        }
        float[] work = d.clone();
        if (negative > 0) {
            if (neg > NEGATIVE_TOLERANCE * pos) {
                throw new IllegalArgumentException(String.format(Locale.ROOT, "%s has %d negative values totalling"
                        + " %.3g%% of the positive total; allowed up to %.3g%% (subtract the background correctly)",
                        key, negative, 100 * neg / pos, 100 * NEGATIVE_TOLERANCE));
            }
            for (int i = 0; i < work.length; i++) {
                work[i] = Math.max(0f, work[i]);
            }
            ctx.warn(key + ": " + negative + " small negative values set to 0");
        }
        Volume p = psf.withData(work);
        if (p.depth() == 1 && image.depth() > 1) {
            throw new IllegalArgumentException(key + " is 2D (" + p.shape() + ") but the image is a 3D stack ("
                    + image.shape() + "); allowed: a 3D PSF for a 3D stack");
        }
        if (p.depth() > 1 && image.depth() == 1) {
            throw new IllegalArgumentException(key + " is 3D (" + p.shape() + ") but the image is 2D ("
                    + image.shape() + "); allowed: a 2D PSF (depth 1) for a 2D image");
        }
        requireOdd(key, p);
        VoxelSize target = image.depth() == 1 ? new VoxelSize(image.voxel().x(), image.voxel().y(), p.voxel().z())
                : image.voxel();
        if (!p.voxel().sameAs(target)) {
            int nx = odd(p.width() * p.voxel().x() / target.x());
            int ny = odd(p.height() * p.voxel().y() / target.y());
            int nz = p.depth() == 1 ? 1 : odd(p.depth() * p.voxel().z() / target.z());
            ctx.warn(key + ": voxel size " + p.voxel() + " differs from the image's " + target + "; resampled from "
                    + p.shape() + " to " + nx + "x" + ny + "x" + nz);
            p = Resampling.resample(p, target, nx, ny, nz);
            if (p.depth() == 1 && image.depth() > 1) {
                // the same rule as for a PSF given with one plane: a stack needs the PSF's z extent
                throw new IllegalArgumentException(key + " resampled to the image's voxel size " + target + " has a"
                        + " single plane (" + p.shape() + ": its " + fmt(psf.depth() * psf.voxel().z()) + " um depth"
                        + " is less than one z step of the image); allowed: a PSF that spans several z steps of the"
                        + " stack (check both voxel sizes)");
            }
        }
        if (p.width() > image.width() || p.height() > image.height() || p.depth() > image.depth()) {
            throw new IllegalArgumentException(key + " is " + p.shape() + " at the image's voxel size but the image is"
                    + " only " + image.shape() + "; allowed: at most the image size in every direction (crop the PSF)");
        }
        int peak = p.argMax();
        int px = peak % p.width();
        int py = (peak / p.width()) % p.height();
        int pz = peak / (p.width() * p.height());
        int cx = p.width() / 2;
        int cy = p.height() / 2;
        int cz = p.depth() / 2;
        int off = Math.max(Math.abs(px - cx), Math.max(Math.abs(py - cy), Math.abs(pz - cz)));
        if (off > 1) {
            throw new IllegalArgumentException(key + " has its peak at voxel (" + px + ", " + py + ", " + pz
                    + ") but its centre voxel is (" + cx + ", " + cy + ", " + cz + "); allowed: the peak within 1"
                    + " voxel of the centre (centre the PSF, e.g. by making it from beads)");
        }
        if (off == 1) {
            ctx.warn(key + ": peak is 1 voxel from the centre voxel; the result will be shifted by up to one voxel");
        }
        double sum = p.sum();
        float[] out = p.data() == work || p.data() == d ? p.data().clone() : p.data();
        for (int i = 0; i < out.length; i++) {
            out[i] = (float) (out[i] / sum);
        }
        return p.withData(out);
    }

    /**
     * Rules 1 and 2 alone (finite values, some positive value): the rules that hold for any PSF or bead image,
     * also one that is measured rather than used (off-centre, even-sized, with a background).
     *
     * @param key the parameter key, named in messages
     * @param psf the PSF or bead image, not modified
     * @throws IllegalArgumentException naming the key
     */
    public static void requireUsableValues(String key, Volume psf) {
        int nonFinite = 0;
        double pos = 0;
        for (float f : psf.data()) {
            if (!Float.isFinite(f)) {
                nonFinite++;
            } else if (f > 0) {
                pos += f;
            }
        }
        if (nonFinite > 0) {
            throw new IllegalArgumentException(key + " has " + nonFinite + " NaN or infinite values; allowed: finite"
                    + " values only (a PSF is a light intensity distribution)");
        }
        if (!(pos > 0)) {
            throw new IllegalArgumentException(key + " has no positive value (sum of positive values " + fmt(pos)
                    + "); allowed: a PSF with positive values and positive sum");
        }
    }

    private static void requireOdd(String key, Volume p) {
        if (p.width() % 2 == 0 || p.height() % 2 == 0 || p.depth() % 2 == 0) {
            throw new IllegalArgumentException(key + " is " + p.shape() + "; allowed: odd sizes only, so the centre"
                    + " voxel n/2 is the optical axis (crop or pad by one voxel)");
        }
    }

    /** @return the nearest odd whole number to x, at least 1 */
    static int odd(double x) {
        int n = (int) Math.round(x);
        if (n % 2 == 0) {
            n = x >= n ? n + 1 : n - 1;
        }
        return Math.max(1, n);
    }

    private static String fmt(double v) {
        return String.format(Locale.ROOT, "%.6g", v);
    }
}
