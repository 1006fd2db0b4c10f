package org.stackwright.volume;

/** Padding and cropping of volumes. The input is never modified; results are new volumes. */
public final class Padding {

    /** How voxels outside the original volume are filled. */
    public enum Mode {
        /** zeros */
        ZERO,
        /** mirror about the edge voxel's outer face (…c b a | a b c…) */
        MIRROR,
        /** the volume repeats */
        PERIODIC
    }

    private Padding() {
    }

    /**
     * Pads a volume into a larger one.
     *
     * @param v input, not modified
     * @param nx new width, at least v.width() + ox
     * @param ny new height
     * @param nz new depth
     * @param ox where the input's x = 0 lands in the output
     * @param oy where the input's y = 0 lands
     * @param oz where the input's z = 0 lands
     */
    public static Volume pad(Volume v, int nx, int ny, int nz, int ox, int oy, int oz, Mode mode) {
        if (mode == null) {
            throw new IllegalArgumentException("padding mode must be given (ZERO, MIRROR or PERIODIC)");
        }
        if (ox < 0 || oy < 0 || oz < 0 || nx < v.width() + ox || ny < v.height() + oy || nz < v.depth() + oz) {
            throw new IllegalArgumentException("padded size " + nx + "x" + ny + "x" + nz + " with offset " + ox + ","
                    + oy + "," + oz + " does not hold the volume " + v.shape());
        }
        Volume out = Volume.zeros(nx, ny, nz, v.voxel());
        float[] o = out.data();
        float[] d = v.data();
        for (int z = 0; z < nz; z++) {
            int sz = source(z - oz, v.depth(), mode);
            for (int y = 0; y < ny; y++) {
                int sy = source(y - oy, v.height(), mode);
                int row = (z * ny + y) * nx;
                if (sz < 0 || sy < 0) {
                    continue;
                }
                int srow = (sz * v.height() + sy) * v.width();
                for (int x = 0; x < nx; x++) {
                    int sx = source(x - ox, v.width(), mode);
                    if (sx >= 0) {
                        o[row + x] = d[srow + sx];
                    }
                }
            }
        }
        return out;
    }

    /** Pads symmetrically by (px, py, pz) voxels on each side. */
    public static Volume padBy(Volume v, int px, int py, int pz, Mode mode) {
        return pad(v, v.width() + 2 * px, v.height() + 2 * py, v.depth() + 2 * pz, px, py, pz, mode);
    }

    /** @return the source index for output index i, or -1 for a zero */
    static int source(int i, int n, Mode mode) {
        if (i >= 0 && i < n) {
            return i;
        }
        switch (mode) {
            case ZERO:
                return -1;
            case PERIODIC:
                return Math.floorMod(i, n);
            case MIRROR:
            default:
                int period = 2 * n;
                int m = Math.floorMod(i, period);
                return m < n ? m : period - 1 - m;
        }
    }

    /**
     * Crops a box out of a volume.
     *
     * @throws IllegalArgumentException when the box does not lie inside the volume
     */
    public static Volume crop(Volume v, int x0, int y0, int z0, int w, int h, int d) {
        if (x0 < 0 || y0 < 0 || z0 < 0 || w < 1 || h < 1 || d < 1 || x0 + w > v.width() || y0 + h > v.height()
                || z0 + d > v.depth()) {
            throw new IllegalArgumentException("crop box at " + x0 + "," + y0 + "," + z0 + " of size " + w + "x" + h
                    + "x" + d + " does not lie inside " + v.shape());
        }
        Volume out = Volume.zeros(w, h, d, v.voxel());
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                System.arraycopy(v.data(), v.index(x0, y0 + y, z0 + z), out.data(), out.index(0, y, z), w);
            }
        }
        return out;
    }
}
