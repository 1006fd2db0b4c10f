package org.stackwright.repair;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

import org.stackwright.op.Result;
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
