package org.stackwright.op;

import org.stackwright.volume.Volume;

/**
 * Checks on a mask of untrusted pixels (nonzero = untrusted, as an ImageJ binary mask; NaN also counts as
 * untrusted). Rules:
 * <ul>
 * <li>the mask must have the image's width and height, and either its depth or depth 1 (a 2D mask then applies
 * to every plane, as for a tile-seam or a camera-defect mask); otherwise refused;</li>
 * <li>an <b>empty mask</b> (no pixel marked) is allowed: a warning says that nothing is excluded or repaired, and
 * the operation behaves as without a mask;</li>
 * <li>a mask that marks <b>every</b> pixel is refused: no trusted pixel is left to compute from.</li>
 * </ul>
 */
public final class MaskChecks {

    private MaskChecks() {
    }

    /**
     * Checks a mask against an image and expands it to one byte per image voxel.
     *
     * @param key the mask's parameter key (e.g. "mask"), named in messages
     * @param mask the mask as a volume, not modified
     * @param image the image it belongs to, not modified
     * @param ctx where the empty-mask warning goes
     * @return one byte per image voxel, 1 = untrusted
     * @throws IllegalArgumentException naming the key for a wrong size or a mask covering everything
     */
    public static byte[] check(String key, Volume mask, Volume image, RunContext ctx) {
        if (mask.width() != image.width() || mask.height() != image.height()
                || (mask.depth() != image.depth() && mask.depth() != 1)) {
            throw new IllegalArgumentException(key + " is " + mask.shape() + " but the image is " + image.shape()
                    + "; allowed: the same size, or " + image.width() + "x" + image.height() + "x1 for every plane");
        }
        int plane = image.width() * image.height();
        byte[] out = new byte[image.size()];
        float[] m = mask.data();
        int marked = 0;
        for (int z = 0; z < image.depth(); z++) {
            int src = mask.depth() == 1 ? 0 : z * plane;
            int dst = z * plane;
            for (int i = 0; i < plane; i++) {
                float f = m[src + i];
                if (f != 0) {
                    out[dst + i] = 1;
                    marked++;
                }
            }
        }
        if (marked == out.length) {
            throw new IllegalArgumentException(key + " marks all " + out.length + " pixels as untrusted; at least one"
                    + " trusted pixel is needed (nonzero = untrusted, 0 = trusted)");
        }
        if (marked == 0) {
            ctx.warn(key + " marks no pixel (all 0); nothing is excluded or repaired");
        }
        return out;
    }

    /**
     * @param a a mask (1 = untrusted), or null for none; not modified
     * @param b another mask of the same length, or null; not modified
     * @return a new mask marking pixels untrusted in either, or null when both are null
     */
    public static byte[] union(byte[] a, byte[] b) {
        if (a == null) {
            return b == null ? null : b.clone();
        }
        if (b == null) {
            return a.clone();
        }
        if (a.length != b.length) {
            throw new IllegalArgumentException("masks differ in size: " + a.length + " vs " + b.length + " pixels");
        }
        byte[] out = new byte[a.length];
        for (int i = 0; i < out.length; i++) {
            out[i] = (byte) ((a[i] != 0 || b[i] != 0) ? 1 : 0);
        }
        return out;
    }
}
