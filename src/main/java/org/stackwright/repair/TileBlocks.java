package org.stackwright.repair;

import java.util.Arrays;

import org.stackwright.volume.Volume;

/**
 * Every tile of a mosaic cut into the same grid of blocks: the log of each block's median above the dark level, for
 * each tile (and slice) and block position. This table is what the shading and the tile levels are estimated from
 * ({@link TileShading}): at one block position all tiles see the same shading, and across the positions of one tile
 * the same gain. Pixels exactly 0 are gaps (no data); a block cut by the tile's border keeps the part inside it when
 * that is at least half a block.
 */
final class TileBlocks {

    /** blocks per tile step along its shorter side (a block of 8 px for tiles of 200) */
    static final int BLOCKS_PER_TILE = 24;

    final TileShading.Tiles tiles;
    /** block side, pixels */
    final int block;
    final int nbx;
    final int nby;
    /** log block median above the offset, [sample][position]; a sample is one tile in one slice; NaN = no data */
    final double[][] logs;
    /** tile (row-major) of each sample */
    final int[] tileOf;
    /** slice of each sample */
    final int[] sliceOf;
    /** mean tile coordinate of the pixels each block position was measured at (cut blocks differ from whole ones) */
    final double[] u;
    final double[] v;
    /** samples with data at each position */
    final int[] count;

    private TileBlocks(TileShading.Tiles tiles, int block, int samples) {
        this.tiles = tiles;
        this.block = block;
        this.nbx = (tiles.spanX() + block - 1) / block;
        this.nby = (tiles.spanY() + block - 1) / block;
        this.logs = new double[samples][nbx * nby];
        this.tileOf = new int[samples];
        this.sliceOf = new int[samples];
        this.u = new double[nbx * nby];
        this.v = new double[nbx * nby];
        this.count = new int[nbx * nby];
    }

    int positions() {
        return nbx * nby;
    }

    int samples() {
        return logs.length;
    }

    static TileBlocks of(Volume image, TileShading.Tiles t, double offset) {
        int b = Math.max(1, Math.min(t.stepX(), t.stepY()) / BLOCKS_PER_TILE);
        int tiles = t.columns() * t.rows();
        TileBlocks tb = new TileBlocks(t, b, tiles * image.depth());
        double[] px = new double[b * b];
        for (int z = 0; z < image.depth(); z++) {
            for (int r = 0; r < t.rows(); r++) {
                for (int c = 0; c < t.columns(); c++) {
                    int s = z * tiles + r * t.columns() + c;
                    tb.tileOf[s] = r * t.columns() + c;
                    tb.sliceOf[s] = z;
                    Arrays.fill(tb.logs[s], Double.NaN);
                    for (int by = 0; by < tb.nby; by++) {
                        for (int bx = 0; bx < tb.nbx; bx++) {
                            int xa = Math.max(t.x0()[c], t.originX()[c] + bx * b);
                            int ya = Math.max(t.y0()[r], t.originY()[r] + by * b);
                            int xb = Math.min(t.x1()[c], t.originX()[c] + (bx + 1) * b);
                            int yb = Math.min(t.y1()[r], t.originY()[r] + (by + 1) * b);
                            int n = 0;
                            double su = 0;
                            double sv = 0;
                            for (int y = ya; y < yb; y++) {
                                for (int x = xa; x < xb; x++) {
                                    float val = image.get(x, y, z);
                                    if (val != 0 && Float.isFinite(val)) {
                                        px[n++] = val - offset;
                                        su += x - t.originX()[c];
                                        sv += y - t.originY()[r];
                                    }
                                }
                            }
                            double med = 2 * n >= b * b ? RobustStats.medianInPlace(px, n) : Double.NaN;
                            if (med > 0) {
                                int p = by * tb.nbx + bx;
                                tb.logs[s][p] = Math.log(med);
                                tb.u[p] += su / n;
                                tb.v[p] += sv / n;
                                tb.count[p]++;
                            }
                        }
                    }
                }
            }
        }
        for (int p = 0; p < tb.positions(); p++) {
            if (tb.count[p] > 0) {
                tb.u[p] /= tb.count[p];
                tb.v[p] /= tb.count[p];
            }
        }
        return tb;
    }
}
