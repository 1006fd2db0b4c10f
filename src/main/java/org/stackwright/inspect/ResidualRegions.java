package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;

import org.stackwright.volume.Volume;

/**
 * Connected regions (26-connected in 3D, 8-connected in 2D) of voxels whose normalised residual exceeds
 * {@value #THRESHOLD} in magnitude.
 *
 * <p>Under a correct model a single voxel passes |r| > 4 with probability 6.3e-5 (two-sided normal tail), so a
 * stack of 10^6 voxels holds about 60 such voxels, scattered and almost never touching (a touching pair is expected
 * about 0.05 times, a triple practically never; heavier Poisson tails at low counts raise this a little). A region is
 * therefore <em>listed</em> (table row, verdict) when it has at least {@value #MIN_VOXELS} voxels or one voxel with
 * |r| >= {@value #STRONG} (p below 1e-20 for a normal variable): a saturated patch, a hot or dead pixel (a column
 * through z in a stack), or a defect. Smaller hits are only counted.
 *
 * <p>At low counts (expected values near or below 1) the Pearson residual is far from normal: with mu = 0.1 a
 * count of 2 already gives r = 6. So when the deviance residual is given, a voxel must also pass |d| > 4 to belong
 * to a region, and a single-voxel region must reach |d| >= {@value #STRONG_DEVIANCE}; the deviance residual stays
 * close to normal at low counts (for Gaussian noise d = r and nothing changes).
 *
 * @param listed the listed regions, largest first (at most {@value #MAX_LISTED})
 * @param listedCount number of regions that qualify for listing (may exceed the list)
 * @param scatteredVoxels voxels with |r| > 4 outside listed regions
 * @param mask per voxel: true when inside a listed region (also those beyond the list cap)
 */
public record ResidualRegions(List<Region> listed, int listedCount, long scatteredVoxels, boolean[] mask) {

    /** |r| above which a voxel belongs to a region. */
    public static final double THRESHOLD = 4;
    /** Smallest region size that is listed. */
    public static final int MIN_VOXELS = 3;
    /** A region with a voxel this far out is listed whatever its size. */
    public static final double STRONG = 10;
    /** A single voxel is listed when its deviance residual also reaches this. */
    public static final double STRONG_DEVIANCE = 6;
    /** Longest list kept. */
    public static final int MAX_LISTED = 100;

    /**
     * One region.
     *
     * @param voxels number of voxels
     * @param x centroid x, voxels
     * @param y centroid y, voxels
     * @param z centroid z, voxels
     * @param x0 bounding box start x
     * @param y0 bounding box start y
     * @param z0 bounding box start z
     * @param x1 bounding box end x (inclusive)
     * @param y1 bounding box end y (inclusive)
     * @param z1 bounding box end z (inclusive)
     * @param peak the residual of largest magnitude (signed): negative when the data fall below the prediction
     *     (saturation, dead pixels), positive when above (hot pixels, an object the estimate lacks)
     * @param chi2 sum of r^2 over the region
     */
    public record Region(int voxels, double x, double y, double z, int x0, int y0, int z0, int x1, int y1, int z1,
            double peak, double chi2) {

        /** @return the same region with its positions moved by (dx, dy, dz): from a box to the whole image */
        public Region shifted(int dx, int dy, int dz) {
            return new Region(voxels, x + dx, y + dy, z + dz, x0 + dx, y0 + dy, z0 + dz, x1 + dx, y1 + dy, z1 + dz,
                    peak, chi2);
        }
    }

    /** Finds the regions of a normalised residual (not modified). */
    public static ResidualRegions find(Volume r) {
        return find(r, null);
    }

    /**
     * @param r the normalised (Pearson) residual, not modified
     * @param deviance the signed deviance residual of the same voxels, or null; not modified
     */
    public static ResidualRegions find(Volume r, Volume deviance) {
        float[] dv = deviance == null ? null : deviance.data();
        int w = r.width();
        int h = r.height();
        int d = r.depth();
        float[] v = r.data();
        int n = v.length;
        boolean[] seen = new boolean[n];
        boolean[] mask = new boolean[n];
        int[] stack = new int[64];
        List<Region> all = new ArrayList<>();
        long scattered = 0;
        int[] list = new int[64];
        for (int start = 0; start < n; start++) {
            if (seen[start] || !hit(v, dv, start)) {
                continue;
            }
            int size = 0;
            int top = 0;
            stack[top++] = start;
            seen[start] = true;
            double sx = 0;
            double sy = 0;
            double sz = 0;
            double chi2 = 0;
            double peak = 0;
            int peakAt = start;
            int x0 = w;
            int y0 = h;
            int z0 = d;
            int x1 = -1;
            int y1 = -1;
            int z1 = -1;
            while (top > 0) {
                int i = stack[--top];
                if (size == list.length) {
                    list = java.util.Arrays.copyOf(list, 2 * size);
                }
                list[size++] = i;
                int x = i % w;
                int y = (i / w) % h;
                int z = i / (w * h);
                sx += x;
                sy += y;
                sz += z;
                chi2 += (double) v[i] * v[i];
                if (Math.abs(v[i]) > Math.abs(peak)) {
                    peak = v[i];
                    peakAt = i;
                }
                x0 = Math.min(x0, x);
                y0 = Math.min(y0, y);
                z0 = Math.min(z0, z);
                x1 = Math.max(x1, x);
                y1 = Math.max(y1, y);
                z1 = Math.max(z1, z);
                for (int dz = -1; dz <= 1; dz++) {
                    int zz = z + dz;
                    if (zz < 0 || zz >= d) {
                        continue;
                    }
                    for (int dy = -1; dy <= 1; dy++) {
                        int yy = y + dy;
                        if (yy < 0 || yy >= h) {
                            continue;
                        }
                        for (int dx = -1; dx <= 1; dx++) {
                            int xx = x + dx;
                            if (xx < 0 || xx >= w) {
                                continue;
                            }
                            int j = (zz * h + yy) * w + xx;
                            if (!seen[j] && hit(v, dv, j)) {
                                seen[j] = true;
                                if (top == stack.length) {
                                    stack = java.util.Arrays.copyOf(stack, 2 * top);
                                }
                                stack[top++] = j;
                            }
                        }
                    }
                }
            }
            boolean strong = Math.abs(peak) >= STRONG && (dv == null || Math.abs(dv[peakAt]) >= STRONG_DEVIANCE);
            if (size >= MIN_VOXELS || strong) {
                all.add(new Region(size, sx / size, sy / size, sz / size, x0, y0, z0, x1, y1, z1, peak, chi2));
                for (int k = 0; k < size; k++) {
                    mask[list[k]] = true;
                }
            } else {
                scattered += size;
            }
        }
        all.sort(Comparator.comparingInt(Region::voxels).reversed().thenComparingDouble(g -> -Math.abs(g.peak())));
        int count = all.size();
        List<Region> listed = List.copyOf(all.subList(0, Math.min(MAX_LISTED, count)));
        return new ResidualRegions(listed, count, scattered, mask);
    }

    /**
     * @param box x0, y0, z0, w, h, d
     * @return the listed regions whose centroid lies in the box (scattered voxels and mask as before)
     */
    public ResidualRegions within(int[] box) {
        List<Region> in = new ArrayList<>();
        for (Region g : listed) {
            if (inside(g, box)) {
                in.add(g);
            }
        }
        return new ResidualRegions(List.copyOf(in), in.size(), scatteredVoxels, mask);
    }

    /** @return how many listed regions have their centroid outside the box */
    public int outside(int[] box) {
        int n = 0;
        for (Region g : listed) {
            if (!inside(g, box)) {
                n++;
            }
        }
        return n;
    }

    private static boolean inside(Region g, int[] b) {
        return g.x() >= b[0] - 0.5 && g.x() < b[0] + b[3] - 0.5 && g.y() >= b[1] - 0.5 && g.y() < b[1] + b[4] - 0.5
                && g.z() >= b[2] - 0.5 && g.z() < b[2] + b[5] - 0.5;
    }

    /** @return the same regions with positions moved by (dx, dy, dz) */
    public ResidualRegions shifted(int dx, int dy, int dz) {
        List<Region> out = new ArrayList<>();
        for (Region g : listed) {
            out.add(g.shifted(dx, dy, dz));
        }
        return new ResidualRegions(List.copyOf(out), listedCount, scatteredVoxels, mask);
    }

    private static boolean hit(float[] r, float[] d, int i) {
        return Math.abs(r[i]) > THRESHOLD && (d == null || Math.abs(d[i]) > THRESHOLD);
    }

    /**
     * @param left the residual the regions were found in (e.g. what the cause fit left), not modified
     * @param n voxels of the judged region
     * @return the chi^2 per voxel the regions carry above the noise level: sum over region voxels of
     *     (left^2 - 1), divided by n, at least 0
     */
    public double chi2Excess(float[] left, long n) {
        double s = 0;
        for (int i = 0; i < left.length; i++) {
            if (mask[i]) {
                s += (double) left[i] * left[i] - 1;
            }
        }
        return Math.max(0, s / Math.max(1, n));
    }

    /** @return sum of r^2 over all listed-quality regions, divided by the number of voxels n */
    public double chi2Share(Volume r) {
        float[] v = r.data();
        double s = 0;
        for (int i = 0; i < v.length; i++) {
            if (mask[i]) {
                s += (double) v[i] * v[i];
            }
        }
        return s / v.length;
    }
}
