package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

import org.stackwright.psf.Fwhm;
import org.stackwright.volume.Volume;

/**
 * Full width at half maximum (FWHM) of beads in an image, along x, y and z: bright local maxima are taken as beads,
 * and a 1D profile through each peak voxel along each axis is fitted with a Gaussian on a constant background,
 * f(t) = B + A exp(-(t - c)^2 / (2 s^2)), by Levenberg-Marquardt least squares (the fit of {@link Fwhm}, over the
 * whole window and without its fallback). FWHM = 2 sqrt(2 ln 2) s = 2.3548 s, converted to micrometres with the
 * voxel size. The profile through the peak voxel of a Gaussian is a Gaussian of the same width whatever the
 * sub-voxel position of the centre, so the fit is unbiased for Gaussian beads. The widths are those of the image
 * as sampled: camera pixels add about 1/12 voxel^2 to the variance, which is not removed (it is part of the PSF as
 * the camera records it).
 *
 * <p>Beads are local maxima (3x3x3 neighbourhood) at least {@code threshold} of the way from the image's median
 * (taken as background) to its maximum, at least {@code halfWindow} voxels from every face (so the profile is
 * complete), and not within a window of a brighter bead. A profile whose fit fails or gives a width outside
 * (0.2, halfWindow) voxels gives NaN.
 */
public final class BeadWidths {

    /** 2 sqrt(2 ln 2): FWHM of a Gaussian over its standard deviation (the same constant as {@link Fwhm}). */
    public static final double FWHM_PER_SIGMA = Fwhm.FWHM_PER_SIGMA;

    /**
     * One bead.
     *
     * @param x peak voxel x
     * @param y peak voxel y
     * @param z peak voxel z
     * @param peak value at the peak voxel
     * @param fwhmX FWHM along x, micrometres (NaN when the fit failed)
     * @param fwhmY FWHM along y, micrometres
     * @param fwhmZ FWHM along z, micrometres (NaN for a 2D image)
     */
    public record Bead(int x, int y, int z, double peak, double fwhmX, double fwhmY, double fwhmZ) {
    }

    private final int halfWindow;
    private final int halfWindowZ;
    private final double threshold;

    /**
     * @param halfWindow profile half-length along x and y, voxels (at least 3; about 3 FWHM is right)
     * @param halfWindowZ profile half-length along z, voxels (at least 3; ignored for 2D images)
     * @param threshold fraction of the way from the median to the maximum a bead's peak must reach, in (0, 1)
     */
    public BeadWidths(int halfWindow, int halfWindowZ, double threshold) {
        if (halfWindow < 3 || halfWindowZ < 3) {
            throw new IllegalArgumentException("profile half-window must be at least 3 voxels (given " + halfWindow
                    + ", " + halfWindowZ + ")");
        }
        if (!(threshold > 0 && threshold < 1)) {
            throw new IllegalArgumentException("bead threshold must lie in (0, 1) (given " + threshold + ")");
        }
        this.halfWindow = halfWindow;
        this.halfWindowZ = halfWindowZ;
        this.threshold = threshold;
    }

    /** Measures every bead found in the image (not modified), brightest first. */
    public List<Bead> measure(Volume image) {
        List<int[]> peaks = findPeaks(image);
        List<Bead> out = new ArrayList<>();
        for (int[] p : peaks) {
            double fx = fwhm(image, p, 0, halfWindow) * image.voxel().x();
            double fy = fwhm(image, p, 1, halfWindow) * image.voxel().y();
            double fz = image.depth() == 1 ? Double.NaN : fwhm(image, p, 2, halfWindowZ) * image.voxel().z();
            out.add(new Bead(p[0], p[1], p[2], image.get(p[0], p[1], p[2]), fx, fy, fz));
        }
        return out;
    }

    /** @return the median of the finite values, NaN when there are none */
    public static double median(double[] values) {
        double[] v = Arrays.stream(values).filter(Double::isFinite).sorted().toArray();
        if (v.length == 0) {
            return Double.NaN;
        }
        return v.length % 2 == 1 ? v[v.length / 2] : 0.5 * (v[v.length / 2 - 1] + v[v.length / 2]);
    }

    private List<int[]> findPeaks(Volume v) {
        int w = v.width();
        int h = v.height();
        int d = v.depth();
        float[] a = v.data();
        float[] sorted = a.clone();
        Arrays.sort(sorted);
        double median = sorted[sorted.length / 2];
        double level = median + threshold * (v.max() - median);
        int mz = d == 1 ? 0 : halfWindowZ;
        List<int[]> candidates = new ArrayList<>();
        for (int z = mz; z < d - mz; z++) {
            for (int y = halfWindow; y < h - halfWindow; y++) {
                for (int x = halfWindow; x < w - halfWindow; x++) {
                    float c = a[v.index(x, y, z)];
                    if (c >= level && isLocalMax(v, x, y, z, c)) {
                        candidates.add(new int[] {x, y, z});
                    }
                }
            }
        }
        candidates.sort((p, q) -> Float.compare(v.get(q[0], q[1], q[2]), v.get(p[0], p[1], p[2])));
        List<int[]> kept = new ArrayList<>();
        for (int[] c : candidates) {
            boolean near = false;
            for (int[] k : kept) {
                if (Math.abs(c[0] - k[0]) <= halfWindow && Math.abs(c[1] - k[1]) <= halfWindow
                        && Math.abs(c[2] - k[2]) <= Math.max(mz, 0)) {
                    near = true;
                    break;
                }
            }
            if (!near) {
                kept.add(c);
            }
        }
        return kept;
    }

    private static boolean isLocalMax(Volume v, int x, int y, int z, float c) {
        for (int dz = -1; dz <= 1; dz++) {
            int zz = z + dz;
            if (zz < 0 || zz >= v.depth()) {
                continue;
            }
            for (int dy = -1; dy <= 1; dy++) {
                for (int dx = -1; dx <= 1; dx++) {
                    if ((dx != 0 || dy != 0 || dz != 0) && v.get(x + dx, y + dy, zz) > c) {
                        return false;
                    }
                }
            }
        }
        return true;
    }

    /** @return the fitted FWHM in voxels of the profile through peak p along the axis, NaN when the fit fails */
    double fwhm(Volume v, int[] p, int axis, int half) {
        int n = 2 * half + 1;
        double[] f = new double[n];
        for (int i = 0; i < n; i++) {
            int[] q = p.clone();
            q[axis] += i - half;
            f[i] = v.get(q[0], q[1], q[2]);
        }
        double sigma = fitSigma(f, half);
        return sigma > 0.2 && sigma < half ? FWHM_PER_SIGMA * sigma : Double.NaN;
    }

    /**
     * Fits the profile with {@link Fwhm#fitGaussian} over the whole window, started from the window's minimum as
     * background and the number of samples above half maximum as width; @return |s| in samples, or NaN when the
     * profile is flat or the fit fails.
     *
     * @param f profile, not modified
     * @param centre index of the peak voxel in the profile (the start centre)
     */
    static double fitSigma(double[] f, int centre) {
        double lo = Arrays.stream(f).min().orElse(0);
        double hi = Arrays.stream(f).max().orElse(0);
        if (!(hi > lo)) {
            return Double.NaN;
        }
        // start: width from the number of samples above half maximum
        int above = 0;
        for (double v : f) {
            if (v - lo >= 0.5 * (hi - lo)) {
                above++;
            }
        }
        double s0 = Math.max(0.5, above / FWHM_PER_SIGMA);
        try {
            return Fwhm.fitGaussian(f, 0, f.length - 1, hi - lo, centre, s0, lo);
        } catch (RuntimeException e) {
            return Double.NaN; // no convergence: reported as a failed profile
        }
    }
}
