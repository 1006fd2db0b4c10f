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
 * <li>larger than the image in any direction: with the extended boundary accepted (the object grid grows to hold
 * it) and cropped, in those directions, only where its outer part holds at most {@link #LARGE_PSF_DROP} of its
 * energy ({@link #cropLargerThanImage}); with a periodic boundary refused.</li>
 * <li>peak off the centre voxel: up to one voxel a warning (noise in a measured PSF), further refused.</li>
 * </ol>
 * The PSF passed in is never modified.
 */
public final class PsfChecks {

    /** Largest allowed ratio of the negative to the positive total before a PSF is refused (common practice). */
    public static final double NEGATIVE_TOLERANCE = 0.01;
    /** Largest share of its energy a PSF larger than the image may lose by cropping (common practice, no source). */
    public static final double LARGE_PSF_DROP = 0.01;

    /**
     * A prepared PSF.
     *
     * @param psf checked, normalised, at the image's voxel size
     * @param droppedShare share of the energy cropped away because the PSF was larger than the image (0 when used
     *     whole)
     */
    public record Prepared(Volume psf, double droppedShare) {
    }

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
        return prepare(key, psf, image, false, ctx).psf();
    }

    /**
     * As {@link #prepare(String, Volume, Volume, RunContext)}; with {@code largerThanImage} a PSF larger than the
     * image is accepted (for the extended boundary) and cropped only where little energy is lost.
     */
    public static Prepared prepare(String key, Volume psf, Volume image, boolean largerThanImage, RunContext ctx) {
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
        double dropped = 0;
        if (p.width() > image.width() || p.height() > image.height() || p.depth() > image.depth()) {
            if (!largerThanImage) {
                throw new IllegalArgumentException(key + " is " + p.shape() + " at the image's voxel size but the image"
                        + " is only " + image.shape() + "; allowed: at most the image size in every direction (crop the"
                        + " PSF, or use the extended boundary)");
            }
            Volume c = cropLargerThanImage(p, image, LARGE_PSF_DROP);
            dropped = 1 - c.sum() / p.sum();
            if (c.size() < p.size()) {
                ctx.warn(String.format(Locale.ROOT, "%s: %s is larger than the image %s; cropped to %s, which keeps all"
                        + " but %.2g%% of its energy", key, p.shape(), image.shape(), c.shape(), 100 * dropped));
            } else {
                ctx.warn(key + ": " + p.shape() + " is larger than the image " + image.shape() + "; used whole (the"
                        + " object grid grows to hold it)");
            }
            p = c;
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
        return new Prepared(p.withData(out), dropped);
    }

    /**
     * Crops a PSF that is larger than the image, along the axes where it is larger, to the smallest centred odd
     * size that keeps all but {@code maxDrop} of its energy (never below the image's size along that axis, never
     * above the PSF's). The extended object grid is image + PSF - 1 per axis, so a large PSF makes every FFT larger;
     * its far tails, when faint, are not worth that.
     *
     * @param psf non-negative, odd sizes, centre at n/2; not modified
     * @param image only its size is used
     * @param maxDrop largest share of the energy that may be cropped away
     * @return the cropped PSF (not normalised), or the PSF itself when nothing can be cropped
     */
    public static Volume cropLargerThanImage(Volume psf, Volume image, double maxDrop) {
        int[] size = {psf.width(), psf.height(), psf.depth()};
        int[] limit = {image.width(), image.height(), image.depth()};
        double total = psf.sum();
        for (int axis = 0; axis < 3; axis++) {
            if (size[axis] <= limit[axis]) {
                continue;
            }
            int floor = limit[axis] % 2 == 1 ? limit[axis] : limit[axis] + 1;
            while (size[axis] - 2 >= floor) {
                int[] trial = size.clone();
                trial[axis] -= 2;
                if (centred(psf, trial).sum() < (1 - maxDrop) * total) {
                    break;
                }
                size = trial;
            }
        }
        return size[0] == psf.width() && size[1] == psf.height() && size[2] == psf.depth() ? psf : centred(psf, size);
    }

    private static Volume centred(Volume psf, int[] size) {
        int x0 = psf.width() / 2 - size[0] / 2;
        int y0 = psf.height() / 2 - size[1] / 2;
        int z0 = psf.depth() / 2 - size[2] / 2;
        Volume out = Volume.zeros(size[0], size[1], size[2], psf.voxel());
        for (int z = 0; z < size[2]; z++) {
            for (int y = 0; y < size[1]; y++) {
                System.arraycopy(psf.data(), psf.index(x0, y0 + y, z0 + z), out.data(), out.index(0, y, z), size[0]);
            }
        }
        return out;
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
