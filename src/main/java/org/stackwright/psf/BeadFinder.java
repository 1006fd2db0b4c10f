package org.stackwright.psf;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import org.stackwright.volume.Volume;

/**
 * Finds beads in a bead stack and rejects those unfit for a PSF average. Detection: the stack is smoothed with a
 * Gaussian of one voxel (noise), and local maxima over a 5x5x5 neighbourhood that rise more than ten noise
 * standard deviations (1.4826 x median absolute deviation) and more than 2 % of the brightest smoothed voxel
 * above the median background are candidates. A
 * candidate dimmer than a fifth of a brighter candidate whose PSF box holds it is a side lobe of that bead, not a
 * bead, and is dropped; so is any candidate within two voxels of the axis of a brighter one inside its box (the
 * axial side maxima of a bead seen through spherical aberration). Rejections, each with its reason:
 * <ul>
 * <li>too close to the edge: the PSF box (plus two voxels for interpolation) does not fit in the stack;</li>
 * <li>neighbour: another bead lies inside the PSF box, so its light would enter the average;</li>
 * <li>saturated: a voxel next to the peak is at the saturation level (flat top, the shape is lost).</li>
 * </ul>
 */
final class BeadFinder {

    /** A voxel margin around the box for cubic interpolation and sub-voxel shifts. */
    static final int MARGIN = 2;

    private BeadFinder() {
    }

    /**
     * @param stack bead stack, not modified
     * @param hx half width of the PSF box, voxels
     * @param hy half height
     * @param hz half depth
     * @param saturation saturation level in image units; NaN to detect it (the stack maximum, when at least two
     *     voxels share it)
     * @return every bead found, brightest first, rejected ones with their reason
     */
    static List<Bead> find(Volume stack, int hx, int hy, int hz, double saturation) {
        Volume smooth = Smoothing.gaussian(stack, 1.0);
        float[] s = smooth.data();
        double[] stats = backgroundAndNoise(s);
        float top = Float.NEGATIVE_INFINITY;
        for (float v : s) {
            top = Math.max(top, v);
        }
        double threshold = stats[0] + Math.max(10 * stats[1], 0.02 * (top - stats[0]));
        int nx = stack.width();
        int ny = stack.height();
        int nz = stack.depth();
        List<int[]> maxima = new ArrayList<>();
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    float v = s[smooth.index(x, y, z)];
                    if (v > threshold && isLocalMaximum(smooth, x, y, z, 2)) {
                        maxima.add(new int[] {x, y, z});
                    }
                }
            }
        }
        maxima.sort((a, b) -> Float.compare(smooth.get(b[0], b[1], b[2]), smooth.get(a[0], a[1], a[2])));
        List<int[]> beads = new ArrayList<>();
        for (int[] m : maxima) {
            boolean lobe = false;
            for (int[] b : beads) {
                boolean dim = smooth.get(m[0], m[1], m[2]) - stats[0] < 0.2 * (smooth.get(b[0], b[1], b[2]) - stats[0]);
                if (insideBox(m, b, hx, hy, hz) && (dim || onAxis(m, b))) {
                    lobe = true;
                    break;
                }
            }
            if (!lobe) {
                beads.add(m);
            }
        }
        double level = Double.isNaN(saturation) ? detectSaturation(stack.data()) : saturation;
        List<Bead> out = new ArrayList<>();
        for (int i = 0; i < beads.size(); i++) {
            int[] b = beads.get(i);
            Bead bead = new Bead(i + 1, b[0], b[1], b[2], smooth.get(b[0], b[1], b[2]) - stats[0], true, "");
            String why = reason(stack, beads, i, hx, hy, hz, level);
            out.add(why.isEmpty() ? bead : bead.reject(why));
        }
        return out;
    }

    private static String reason(Volume stack, List<int[]> beads, int i, int hx, int hy, int hz, double level) {
        int[] b = beads.get(i);
        int mx = hx + MARGIN;
        int my = hy + MARGIN;
        int mz = hz + MARGIN;
        if (b[0] < mx || b[1] < my || b[2] < mz || b[0] + mx >= stack.width() || b[1] + my >= stack.height()
                || b[2] + mz >= stack.depth()) {
            return "too close to the image edge for a " + (2 * hx + 1) + "x" + (2 * hy + 1) + "x" + (2 * hz + 1)
                    + " box";
        }
        if (!Double.isNaN(level)) {
            int clipped = 0;
            for (int z = b[2] - 1; z <= b[2] + 1; z++) {
                for (int y = b[1] - 1; y <= b[1] + 1; y++) {
                    for (int x = b[0] - 1; x <= b[0] + 1; x++) {
                        if (stack.get(x, y, z) >= level) {
                            clipped++;
                        }
                    }
                }
            }
            if (clipped > 0) {
                return String.format(Locale.ROOT, "saturated (%d voxel%s next to the peak at the saturation level %.6g)",
                        clipped, clipped == 1 ? "" : "s", level);
            }
        }
        double nearest = Double.MAX_VALUE;
        for (int j = 0; j < beads.size(); j++) {
            if (j != i && insideBox(beads.get(j), b, hx + MARGIN, hy + MARGIN, hz + MARGIN)) {
                int[] o = beads.get(j);
                nearest = Math.min(nearest, Math.sqrt(Math.pow(o[0] - b[0], 2) + Math.pow(o[1] - b[1], 2)
                        + Math.pow(o[2] - b[2], 2)));
            }
        }
        if (nearest < Double.MAX_VALUE) {
            return String.format(Locale.ROOT, "close pair: another bead %.1f voxels away, inside the PSF box", nearest);
        }
        return "";
    }

    /**
     * @return true when a lies within two voxels of b's axis: the axial side maxima of a bead imaged through
     *     spherical aberration (deep in a sample of lower index) lie there and can be nearly as bright as the
     *     main one
     */
    private static boolean onAxis(int[] a, int[] b) {
        return Math.abs(a[0] - b[0]) <= 2 && Math.abs(a[1] - b[1]) <= 2;
    }

    private static boolean insideBox(int[] a, int[] b, int hx, int hy, int hz) {
        return Math.abs(a[0] - b[0]) <= hx && Math.abs(a[1] - b[1]) <= hy && Math.abs(a[2] - b[2]) <= hz;
    }

    private static boolean isLocalMaximum(Volume v, int x, int y, int z, int r) {
        float c = v.get(x, y, z);
        for (int k = Math.max(0, z - r); k <= Math.min(v.depth() - 1, z + r); k++) {
            for (int j = Math.max(0, y - r); j <= Math.min(v.height() - 1, y + r); j++) {
                for (int i = Math.max(0, x - r); i <= Math.min(v.width() - 1, x + r); i++) {
                    float o = v.get(i, j, k);
                    // strict on one side of the scan order, so a flat top gives exactly one maximum
                    if (o > c || (o == c && v.index(i, j, k) < v.index(x, y, z))) {
                        return false;
                    }
                }
            }
        }
        return true;
    }

    /** @return {median, 1.4826 x median absolute deviation} */
    static double[] backgroundAndNoise(float[] d) {
        int step = Math.max(1, d.length / 200_000);
        float[] sample = new float[(d.length + step - 1) / step];
        for (int i = 0, k = 0; i < d.length; i += step, k++) {
            sample[k] = d[i];
        }
        float[] sorted = sample.clone();
        Arrays.sort(sorted);
        double median = sorted[sorted.length / 2];
        for (int i = 0; i < sample.length; i++) {
            sample[i] = (float) Math.abs(sample[i] - median);
        }
        Arrays.sort(sample);
        return new double[] {median, Math.max(1.4826 * sample[sample.length / 2], 1e-12)};
    }

    /**
     * @return the stack maximum when it looks like a clipping level: three or more voxels share it (a flat top),
     *     or it is a common camera full scale (2^k - 1 for 8, 10, 12, 14 or 16 bits); else NaN
     */
    static double detectSaturation(float[] d) {
        float max = Float.NEGATIVE_INFINITY;
        for (float v : d) {
            max = Math.max(max, v);
        }
        int count = 0;
        for (float v : d) {
            if (v == max) {
                count++;
            }
        }
        boolean fullScale = false;
        for (int bits : new int[] {8, 10, 12, 14, 16}) {
            fullScale |= max == (1 << bits) - 1;
        }
        return count >= 3 || fullScale ? max : Double.NaN;
    }
}
