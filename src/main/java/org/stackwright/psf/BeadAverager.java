package org.stackwright.psf;

import java.util.Arrays;
import java.util.List;

import org.stackwright.fft.FourierShift;
import org.stackwright.parallel.Workers;

import org.stackwright.volume.Volume;

/**
 * Aligns beads by sub-voxel shifts and averages them, then cleans the average into a PSF. Each bead's box (with
 * a two-voxel margin) has the stack's background taken off and is moved onto its fitted centre by a Fourier
 * shift (exact for band-limited data, no interpolation blur); the boxes are summed (brighter beads weigh
 * more, as their counts carry less relative noise). Then noise outside the support is set to zero ({@link #clean}),
 * the brightest voxel is moved to the centre by a whole-voxel shift and the sum is set to 1.
 */
final class BeadAverager {

    private BeadAverager() {
    }

    /**
     * @param stack bead stack, not modified
     * @param centres fitted bead positions
     * @param background the stack's background level, subtracted from every bead
     * @param nx box width, odd
     * @param ny box height, odd
     * @param nz box depth, odd
     * @param workers threads for the Fourier shifts
     * @return the averaged, cleaned, unit-sum PSF with the stack's voxel size
     */
    static Volume average(Volume stack, List<BeadLocaliser.Fit> centres, double background, int nx, int ny, int nz,
            Workers workers) {
        double[] sum = new double[nx * ny * nz];
        double[] sumSq = new double[nx * ny * nz];
        int m = BeadFinder.MARGIN;
        int mz = nz == 1 ? 0 : m;
        int bx = nx + 2 * m;
        int by = ny + 2 * m;
        int bz = nz + 2 * mz;
        float[] box = new float[bx * by * bz];
        FourierShift shifter = new FourierShift(bx, by, bz, workers);
        for (BeadLocaliser.Fit f : centres) {
            int cx = (int) Math.round(f.x());
            int cy = (int) Math.round(f.y());
            int cz = (int) Math.round(f.z());
            for (int z = 0, i = 0; z < bz; z++) {
                for (int y = 0; y < by; y++) {
                    for (int x = 0; x < bx; x++, i++) {
                        box[i] = (float) (stack.get(cx + x - bx / 2, cy + y - by / 2, cz + z - bz / 2) - background);
                    }
                }
            }
            shifter.shift(box, box, cx - f.x(), cy - f.y(), nz == 1 ? 0 : cz - f.z());
            int i = 0;
            for (int z = 0; z < nz; z++) {
                for (int y = 0; y < ny; y++) {
                    for (int x = 0; x < nx; x++, i++) {
                        double value = box[((z + mz) * by + y + m) * bx + x + m];
                        sum[i] += value;
                        sumSq[i] += value * value;
                    }
                }
            }
        }
        int n = centres.size();
        float[] avg = new float[sum.length];
        float[] spread = new float[sum.length];
        for (int i = 0; i < sum.length; i++) {
            avg[i] = (float) (sum[i] / n);
            spread[i] = n < 2 ? 0 : (float) Math.sqrt(Math.max(0, (sumSq[i] - sum[i] * sum[i] / n) / (n - 1) / n));
        }
        Volume v = new Volume(nx, ny, nz, avg, stack.voxel());
        Arrays.sort(spread);
        clean(v, n < 2 ? Double.NaN : spread[spread.length / 2]);
        return centreAndNormalise(v);
    }

    /**
     * Support mask and no negatives (modifies v): the noise of the average is the median over voxels of the
     * standard error across beads (or, for a single bead, 1.4826 x the median absolute deviation of the box
     * faces), the average is smoothed with a Gaussian of 1.5 voxels (which divides white noise by about 12),
     * and voxels where the smoothed average does not exceed three of its noise levels are set to zero, as are
     * negative voxels. The support is not widened: clipping negatives leaves every pure-noise voxel kept with a
     * mean of about 0.4 noise levels, and a one-voxel rim around the support held thousands of them, a floor that
     * carried a quarter of the PSF's sum on the demo bead slide.
     */
    static void clean(Volume v, double standardError) {
        float[] d = v.data();
        double noise = standardError;
        if (!(noise >= 0)) {
            float[] faces = faces(v);
            Arrays.sort(faces);
            double median = faces[faces.length / 2];
            for (int i = 0; i < faces.length; i++) {
                faces[i] = (float) Math.abs(faces[i] - median);
            }
            Arrays.sort(faces);
            noise = 1.4826 * faces[faces.length / 2];
        }
        double smoothedNoise = noise * smoothingGain(v.depth() > 1 ? 3 : 2);
        float[] smooth = Smoothing.gaussian(v, SUPPORT_SIGMA).data();
        boolean[] support = new boolean[d.length];
        for (int i = 0; i < d.length; i++) {
            support[i] = smooth[i] > 3 * smoothedNoise;
        }
        for (int z = 0; z < v.depth(); z++) {
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    int i = v.index(x, y, z);
                    if (d[i] < 0 || !support[i]) {
                        d[i] = 0;
                    }
                }
            }
        }
    }

    private static final double SUPPORT_SIGMA = 1.5;

    /** @return the factor by which the Gaussian smoothing scales the standard deviation of white noise */
    private static double smoothingGain(int dims) {
        int r = (int) Math.ceil(3 * SUPPORT_SIGMA);
        double sum = 0;
        double sumSq = 0;
        for (int i = -r; i <= r; i++) {
            double k = Math.exp(-0.5 * i * i / (SUPPORT_SIGMA * SUPPORT_SIGMA));
            sum += k;
            sumSq += k * k;
        }
        return Math.pow(Math.sqrt(sumSq) / sum, dims);
    }

    private static float[] faces(Volume v) {
        int nx = v.width();
        int ny = v.height();
        int nz = v.depth();
        float[] out = new float[v.size()];
        int k = 0;
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    boolean face = x == 0 || y == 0 || x == nx - 1 || y == ny - 1 || (nz > 1 && (z == 0 || z == nz - 1));
                    if (face) {
                        out[k++] = v.get(x, y, z);
                    }
                }
            }
        }
        return Arrays.copyOf(out, Math.max(1, k));
    }

    /** Whole-voxel shift of the brightest voxel to the centre (zeros shifted in), then unit sum. */
    static Volume centreAndNormalise(Volume v) {
        int m = v.argMax();
        int sx = v.width() / 2 - m % v.width();
        int sy = v.height() / 2 - (m / v.width()) % v.height();
        int sz = v.depth() / 2 - m / (v.width() * v.height());
        Volume out = Volume.zeros(v.width(), v.height(), v.depth(), v.voxel());
        double total = 0;
        for (int z = 0; z < v.depth(); z++) {
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    int tx = x + sx;
                    int ty = y + sy;
                    int tz = z + sz;
                    if (tx >= 0 && ty >= 0 && tz >= 0 && tx < v.width() && ty < v.height() && tz < v.depth()) {
                        out.set(tx, ty, tz, v.get(x, y, z));
                        total += v.get(x, y, z);
                    }
                }
            }
        }
        if (!(total > 0)) {
            throw new IllegalArgumentException("input: the averaged beads hold no signal above the background");
        }
        float[] d = out.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (d[i] / total);
        }
        return out;
    }
}
