package org.stackwright.solve;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.blocks.BlockTotals;
import org.stackwright.blocks.Globals;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.op.Result;
import org.stackwright.op.Values;
import org.stackwright.volume.Volume;

/** What a deconvolution in blocks records and says when its last block is done. */
final class BlockRunRecord {

    private BlockRunRecord() {
    }

    /** @return the record, report line and table row of a block run, as a whole-stack run gives them */
    static Result of(Values resolved, Globals g, BlockTotals totals, PlaneSource data, Volume psf) {
        DeconvolutionSettings s = DeconvolveOperation.settings(resolved);
        ImagePlus psfImp = resolved.images().get("psf");
        Result r = new Result();
        int iterations = s.method().equals("wiener") ? 0 : s.stopping().maxIterations();
        String reason = s.method().equals("wiener") ? "direct method" : "fixed: " + iterations + " iterations in every"
                + " block, " + g.record().get("iterations_from");
        r.record("operation", "deconvolve");
        r.record("method", s.method());
        r.record("iterations", iterations);
        r.record("stop_reason", reason);
        r.record("seconds", totals.seconds());
        r.record("settings", g.record().get(WholeStackValues.SETTINGS));
        Map<String, Object> psfInfo = new LinkedHashMap<>();
        psfInfo.put("source", psfImp == null ? "" : psfImp.getTitle());
        psfInfo.put("shape_used", psf.shape());
        r.record("psf", psfInfo);
        r.record("image_shape", data.width() + "x" + data.height() + "x" + data.depth());
        r.record("voxel_um", List.of(data.voxel().x(), data.voxel().y(), data.voxel().z()));
        r.record("result_units", "ADU above the camera offset (background removed)");
        r.line(String.format(Locale.ROOT, "deconvolved %dx%dx%d with %s in %d blocks: %d iteration(s) each, %.2f s; %s",
                data.width(), data.height(), data.depth(), s.method(), totals.blocks(), iterations, totals.seconds(),
                reason));
        Map<String, Object> row = new LinkedHashMap<>();
        row.put("method", s.method());
        row.put("iterations", iterations);
        row.put("stop_reason", reason);
        row.put("seconds", totals.seconds());
        row.put("final_objective", Double.NaN);
        r.row(row);
        return r;
    }
}
