package org.stackwright.simulate;

import java.util.SplittableRandom;

import org.stackwright.volume.Volume;

/**
 * Damage planted into invented images: defective camera pixels (hot, dead, stuck; the same positions in every
 * plane, as on a real sensor) and tile seams (dimmed bands at the tile borders of a grid acquisition, with a
 * per-tile gain). Each method writes the damage in place into the given data and returns an 8-bit style mask
 * (255 = damaged pixel) of one plane's size.
 */
public final class Damage {

    /** Kinds of defective pixels. */
    public enum DefectKind {
        /** much brighter than its neighbours */
        HOT,
        /** reads (close to) the camera offset whatever the light */
        DEAD,
        /** stuck at one fixed mid-range value */
        STUCK
    }

    private Damage() {
    }

    /**
     * Plants defective pixels at random positions (no two at the same place, none adjacent to another).
     *
     * @param data image to damage, modified
     * @param counts number of hot, dead and stuck pixels
     * @param offset camera offset, the value of a dead pixel
     * @param hotValue value of a hot pixel
     * @param stuckValue value of a stuck pixel
     * @return per-pixel kinds of one plane (null for good pixels), row-major
     */
    public static DefectKind[] defects(Volume data, int[] counts, double offset, double hotValue, double stuckValue,
            long seed) {
        int w = data.width();
        int h = data.height();
        DefectKind[] kinds = new DefectKind[w * h];
        boolean[] blocked = new boolean[w * h];
        SplittableRandom rnd = new SplittableRandom(seed);
        DefectKind[] order = DefectKind.values();
        int total = counts[0] + counts[1] + counts[2];
        if (total > w * h / 10) {
            throw new IllegalArgumentException("too many defects (" + total + ") for a " + w + "x" + h + " image");
        }
        for (int k = 0; k < order.length; k++) {
            for (int n = 0; n < counts[k]; n++) {
                int p;
                do {
                    p = rnd.nextInt(w * h);
                } while (blocked[p]);
                kinds[p] = order[k];
                int px = p % w;
                int py = p / w;
                for (int dy = -1; dy <= 1; dy++) {
                    for (int dx = -1; dx <= 1; dx++) {
                        int x = px + dx;
                        int y = py + dy;
                        if (x >= 0 && y >= 0 && x < w && y < h) {
                            blocked[y * w + x] = true;
                        }
                    }
                }
            }
        }
        for (int z = 0; z < data.depth(); z++) {
            for (int p = 0; p < w * h; p++) {
                if (kinds[p] != null) {
                    double v = switch (kinds[p]) {
                        case HOT -> hotValue;
                        case DEAD -> offset;
                        case STUCK -> stuckValue;
                    };
                    data.data()[z * w * h + p] = (float) v;
                }
            }
        }
        return kinds;
    }

    /**
     * Dims the seams of a rows x columns tile grid and gives each tile its own gain.
     *
     * @param data image to damage, modified
     * @param rows tile rows
     * @param columns tile columns
     * @param seamWidth width of each seam band in pixels
     * @param seamFactor factor applied to the intensity above the offset inside a seam band (e.g. 0.6)
     * @param gainSpread tile gains are drawn from 1 +- gainSpread
     * @param offset camera offset (kept as is)
     * @return a one-plane mask, 255 on the seam bands
     */
    public static byte[] seams(Volume data, int rows, int columns, int seamWidth, double seamFactor, double gainSpread,
            double offset, long seed) {
        int w = data.width();
        int h = data.height();
        SplittableRandom rnd = new SplittableRandom(seed);
        double[] gains = new double[rows * columns];
        for (int i = 0; i < gains.length; i++) {
            gains[i] = 1 + gainSpread * (2 * rnd.nextDouble() - 1);
        }
        byte[] mask = new byte[w * h];
        for (int y = 0; y < h; y++) {
            int ty = Math.min(rows - 1, y * rows / h);
            boolean rowSeam = nearBorder(y, h, rows, seamWidth);
            for (int x = 0; x < w; x++) {
                int tx = Math.min(columns - 1, x * columns / w);
                boolean seam = rowSeam || nearBorder(x, w, columns, seamWidth);
                double f = gains[ty * columns + tx] * (seam ? seamFactor : 1);
                if (seam) {
                    mask[y * w + x] = (byte) 255;
                }
                for (int z = 0; z < data.depth(); z++) {
                    int i = z * w * h + y * w + x;
                    data.data()[i] = (float) (offset + (data.data()[i] - offset) * f);
                }
            }
        }
        return mask;
    }

    /** True when coordinate c lies in the band of width sw centred on an inner border of n split into parts. */
    static boolean nearBorder(int c, int n, int parts, int sw) {
        for (int k = 1; k < parts; k++) {
            int border = (int) ((long) k * n / parts);
            int start = border - sw / 2;
            if (c >= start && c < start + sw) {
                return true;
            }
        }
        return false;
    }
}
