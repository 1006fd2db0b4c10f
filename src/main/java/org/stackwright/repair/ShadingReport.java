package org.stackwright.repair;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/** What {@code seam-mask --shading} records and says about the estimated shading, and its picture. */
final class ShadingReport {

    private ShadingReport() {
    }

    static void report(TileShading.Flat flat, Result r) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("model", "exp of a polynomial of total degree " + TileShading.DEGREE + " in tile coordinates scaled "
                + "to [-1, 1] over " + flat.spanX() + " x " + flat.spanY() + " px");
        m.put("coefficients", flat.coefficients());
        m.put("min", flat.min());
        m.put("max", flat.max());
        m.put("blocks_fitted", flat.blocks());
        r.record("shading", m);
        r.line(String.format(Locale.ROOT, "shading shared by the tiles: %.3f to %.3f of its mean over a tile "
                + "(%.0f %% darker at the darkest point than at the brightest), fitted to %d blocks", flat.min(),
                flat.max(), 100 * (1 - flat.min() / flat.max()), flat.blocks()));
    }

    /** Records and says where the tile gains of {@code level-tiles} come from, and warns when the levels were not used. */
    static void gainSource(BackgroundGains.Choice c, Result r, RunContext ctx) {
        r.record("tile_gain_source", c.fromLevels() ? "background levels" : "seams");
        r.record("tile_gain_levels_vs_seams_rms_log_misfit", c.levelMisfit());
        if (c.fromLevels()) {
            r.line(String.format(Locale.ROOT, "tile gains from each tile's background level (all its pixels); they "
                    + "agree with the seams within %.1f %% rms", 100 * c.levelMisfit()));
        } else if (Double.isNaN(c.levelMisfit())) {
            r.line("tile gains from the seams (some tile has no usable block for a background level)");
        } else {
            ctx.warn(String.format(Locale.ROOT, "the tiles' background levels disagree with the seams (rms %.1f %%, "
                    + "allowed %.1f %%): the tiles do not share one background (tissue over part of the mosaic?), so "
                    + "the gains come from the seams alone and the shading from the tiles' medians; both are less "
                    + "sure: check the levelled image", 100 * c.levelMisfit(), 100 * BackgroundGains.AGREEMENT));
        }
    }

    /** @return the surface over one tile (its largest extent), mean 1 over a tile step */
    static Volume picture(TileShading.Flat flat, VoxelSize voxel) {
        float[] d = new float[flat.spanX() * flat.spanY()];
        for (int v = 0; v < flat.spanY(); v++) {
            for (int u = 0; u < flat.spanX(); u++) {
                d[v * flat.spanX() + u] = (float) flat.value(u, v);
            }
        }
        return new Volume(flat.spanX(), flat.spanY(), 1, d, voxel);
    }
}
