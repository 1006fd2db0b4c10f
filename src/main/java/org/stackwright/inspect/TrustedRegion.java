package org.stackwright.inspect;

import java.util.Locale;

import org.stackwright.volume.Volume;

/**
 * The voxels the residual view judges: a box of the image, less the pixels that carry no data (masked, NaN).
 * Every number of the verdict and every panel of the summary uses this one region; the border band (voxels
 * closer to a face than the PSF's reach, see {@link #bandOf}) is reported apart.
 *
 * <p>Why a band. A voxel near a face also receives light from objects just outside the field of view. An estimate
 * that covers only the field cannot hold them, so the prediction there depends on a guess of how the object
 * continues (zeros, a mirror image). Where the guess can be wrong the band is left out of the judgement
 * ({@code exclude}); where the prediction needs no guess (the deconvolution's own extended-grid estimate) or the
 * user vouches for the guess ({@code zero}, {@code mirror}) the whole image is judged and the band only reported.
 *
 * @param width image width
 * @param height image height
 * @param depth image depth
 * @param band half-widths (x, y, z) of the border band, voxels
 * @param bandExcluded true when the band is left out of the judgement
 * @param boundary how the prediction was continued past the field: "extended-grid", "mirror", "zero" or
 *     "exclude", for records and texts
 * @param untrusted per image voxel: true for a pixel that carries no data (mask, NaN); null for none
 */
public record TrustedRegion(int width, int height, int depth, int[] band, boolean bandExcluded, String boundary,
        boolean[] untrusted) {

    /** Fraction of the PSF's light kept inside the band half-width, along each axis. */
    public static final double ENERGY_KEPT = 0.99;
    /** Fewest trusted voxels the verdict judges. */
    public static final int MIN_VOXELS = 1000;
    /** Fewest voxels of the trusted box along an axis (the width fit needs neighbours on both sides). */
    public static final int MIN_EXTENT = 3;

    public TrustedRegion {
        band = band.clone();
        if (untrusted != null && untrusted.length != (long) width * height * depth) {
            throw new IllegalArgumentException("untrusted mask has " + untrusted.length + " voxels, image "
                    + width + "x" + height + "x" + depth);
        }
    }

    /** The whole image is judged; the band is reported apart. */
    public static TrustedRegion wholeImage(Volume data, int[] band, String boundary, boolean[] untrusted) {
        return new TrustedRegion(data.width(), data.height(), data.depth(), band, false, boundary, untrusted);
    }

    /** Only the voxels further than the band from every face are judged. */
    public static TrustedRegion interior(Volume data, int[] band, boolean[] untrusted) {
        return new TrustedRegion(data.width(), data.height(), data.depth(), band, true, "exclude", untrusted);
    }

    /**
     * The band half-width along each axis: the smallest h such that the PSF's marginal profile along that axis
     * holds at least {@value #ENERGY_KEPT} of its light within h voxels of the centre. Light from beyond the field
     * reaches a voxel further than h from a face only through the rest (at most 1 %, split over both sides), so
     * the unknown outside barely moves its prediction. Set by where the PSF holds its energy, not by the size of
     * its array: a compact PSF in a large array gives a narrow band.
     *
     * @param psf the PSF (odd sizes, peak at the centre; any positive sum), not modified
     * @return half-widths x, y, z in voxels (0 along an axis of size 1)
     */
    public static int[] bandOf(Volume psf) {
        int w = psf.width();
        int h = psf.height();
        int d = psf.depth();
        double[][] m = {new double[w], new double[h], new double[d]};
        float[] p = psf.data();
        double total = 0;
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double v = Math.max(0, p[(z * h + y) * w + x]);
                    m[0][x] += v;
                    m[1][y] += v;
                    m[2][z] += v;
                    total += v;
                }
            }
        }
        int[] out = new int[3];
        for (int a = 0; a < 3; a++) {
            int c = m[a].length / 2;
            double kept = m[a][c];
            int r = 0;
            while (kept < ENERGY_KEPT * total && r < c) {
                r++;
                kept += m[a][c - r] + m[a][c + r];
            }
            out[a] = r;
        }
        return out;
    }

    /** @return x0, y0, z0, w, h, d of the judged box (extents may be 0 when the band leaves nothing) */
    public int[] box() {
        return bandExcluded ? interior() : new int[] {0, 0, 0, width, height, depth};
    }

    /** @return x0, y0, z0, w, h, d of the voxels further than the band from every face (may be empty) */
    public int[] interior() {
        int[] n = {width, height, depth};
        int[] b = new int[6];
        for (int a = 0; a < 3; a++) {
            b[a] = Math.min(band[a], n[a]);
            b[3 + a] = Math.max(0, n[a] - 2 * band[a]);
        }
        return b;
    }

    /** @return the box the analysis runs on: the judged box, widened around its centre to at least one voxel */
    public int[] analysisBox() {
        int[] b = box();
        int[] n = {width, height, depth};
        for (int a = 0; a < 3; a++) {
            if (b[3 + a] < 1) {
                b[a] = (n[a] - 1) / 2;
                b[3 + a] = 1;
            }
        }
        return b;
    }

    /** @return true when the voxel (image index) lies in the band */
    public boolean inBand(int x, int y, int z) {
        int[] in = interior();
        return x < in[0] || y < in[1] || z < in[2] || x >= in[0] + in[3] || y >= in[1] + in[4] || z >= in[2] + in[5];
    }

    /** @return trusted voxels in the judged box */
    public long trustedVoxels() {
        int[] b = box();
        long n = 0;
        for (int z = b[2]; z < b[2] + b[5]; z++) {
            for (int y = b[1]; y < b[1] + b[4]; y++) {
                for (int x = b[0]; x < b[0] + b[3]; x++) {
                    if (untrusted == null || !untrusted[(z * height + y) * width + x]) {
                        n++;
                    }
                }
            }
        }
        return n;
    }

    /**
     * @return true when the judged region is too small for a verdict: fewer than {@value #MIN_VOXELS} trusted
     *     voxels, or fewer than {@value #MIN_EXTENT} along an axis the image has that many voxels along
     */
    public boolean tooSmall() {
        int[] b = box();
        int[] n = {width, height, depth};
        for (int a = 0; a < 3; a++) {
            if (b[3 + a] < Math.min(MIN_EXTENT, n[a])) {
                return true;
            }
        }
        return trustedVoxels() < MIN_VOXELS;
    }

    /** @return one sentence saying which voxels are judged */
    public String describe() {
        int[] b = box();
        if (!bandExcluded) {
            return "the whole image";
        }
        return String.format(Locale.ROOT, "the interior %dx%dx%d (a border band of %d, %d, %d voxels in x, y, z left"
                + " out)", b[3], b[4], b[5], band[0], band[1], band[2]);
    }

    /** @return how the prediction was continued past the field, in words */
    public String boundaryWords() {
        return switch (boundary) {
            case "extended-grid" -> "the deconvolution's own estimate reaches past the field, so the prediction needs"
                    + " no guess at the border";
            case "zero" -> "the estimate is taken as zero outside the field";
            case "mirror" -> "the estimate is mirrored at the faces";
            default -> "the border band is left out";
        };
    }
}
