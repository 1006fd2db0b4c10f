package org.stackwright.repair;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.blocks.BlockSettings;
import org.stackwright.op.InputChecks;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * {@code find-defects}: a mask of hot, dead and stuck camera pixels, from dark and/or flat frames when given
 * ({@link FrameDefectFinder}), otherwise from the image itself ({@link ImageDefectFinder}), and the list of defects
 * as columns, rows, segments, clusters and single pixels ({@link DefectGrouping}): one table row each.
 */
public final class FindDefectsOperation implements Operation {

    @Override
    public String name() {
        return "find-defects";
    }

    @Override
    public String summary() {
        return "find hot, dead and stuck camera pixels (from dark/flat frames or the image itself); 255 = defective";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.image("input", true, "the image the mask is for (also searched when no frames are given)"),
                Param.image("dark", false, "stack of dark frames (no light), one exposure per slice"),
                Param.image("flat", false, "stack of flat frames (even light), one exposure per slice"),
                Param.number("threshold", 5.0, 1, 1000, "sigmas", "robust sigmas a pixel must deviate by"),
                Param.number("fraction", 0.5, 0.01, 1, "", "image search: share of slices/time points in which "
                        + "the deviation must be seen"),
                Param.outputImage("output", true, "the 8-bit defect mask, 255 = defective (TIFF)"),
                Param.text(BlockSettings.BLOCK_SIZE, "auto", "only auto: the search decides from the whole image"
                        + " (lines, clusters, the noise level), so it always runs on the whole image in memory"),
                Param.outputFile("record", "run record with counts per kind (JSON)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        refuseBlocks(v);
        ImagePlus input = v.image("input");
        ImagePlus darkImp = v.image("dark");
        ImagePlus flatImp = v.image("flat");
        double k = v.number("threshold");
        // a defect stands out from its 8 neighbours or from the robust statistics of many pixels: a 1x1 or 2x2
        // image has neither (a single pixel was reported as hot)
        InputChecks.requireMinSize("input", input.getWidth() + "x" + input.getHeight(),
                input.getWidth() >= 3 && input.getHeight() >= 3, "3x3");
        DefectMap map;
        if (darkImp != null || flatImp != null) {
            Volume dark = darkImp == null ? null : MaskImages.allPlanes(darkImp);
            Volume flat = flatImp == null ? null : MaskImages.allPlanes(flatImp);
            checkSize("dark", dark, input);
            checkSize("flat", flat, input);
            ctx.progress(0.2, "scoring calibration frames");
            map = FrameDefectFinder.find(dark, flat, k);
        } else {
            Volume img = MaskImages.allPlanes(input);
            ctx.progress(0.2, "scoring " + img.depth() + " planes");
            try (Workers w = new Workers(ctx.threads())) {
                map = ImageDefectFinder.find(img, k, v.number("fraction"), w);
            }
            if (img.depth() < 3) {
                ctx.warn("with fewer than 3 planes stuck pixels cannot be told from hot ones, and dead pixels in dim "
                        + "regions may be missed; dark or flat frames find them reliably");
            }
        }
        ctx.progress(1, "done");
        Result r = new Result();
        r.image("output", MaskImages.toImage(map.mask(), map.width(), map.height(), 1,
                ImagePlusAdapter.voxelSize(input), input.getTitle() + "-find-defects"));
        r.record("operation", name());
        r.record("settings", v.effective());
        r.record("source", map.source());
        r.record("counts", map.counts());
        List<Defect> defects = map.defects();
        Map<String, Integer> byKind = new LinkedHashMap<>();
        for (Defect.Kind kind : Defect.Kind.values()) {
            byKind.put(kind.word(), 0);
        }
        List<Map<String, Object>> list = new ArrayList<>();
        for (Defect d : defects) {
            byKind.merge(d.kind().word(), 1, Integer::sum);
            list.add(d.row());
            r.row(d.row());
        }
        r.record("defects_by_kind", byKind);
        r.record("defects", list);
        r.line(String.format(Locale.ROOT, "%d defective pixels (%d hot, %d dead, %d stuck) from %s, threshold %.3g sigmas",
                map.total(), map.count(PixelDefect.HOT), map.count(PixelDefect.DEAD), map.count(PixelDefect.STUCK),
                map.source(), k));
        r.line(String.format(Locale.ROOT, "%d defects: %d columns, %d rows, %d segments, %d clusters, %d single pixels "
                + "(one table row each: kind, fault, x, y, length, direction)", defects.size(), byKind.get("column"),
                byKind.get("row"), byKind.get("segment"), byKind.get("cluster"), byKind.get("pixel")));
        for (Defect d : defects) {
            if (d.kind() == Defect.Kind.COLUMN || d.kind() == Defect.Kind.ROW || d.kind() == Defect.Kind.SEGMENT) {
                r.line(String.format(Locale.ROOT, "  %s %s %s at x = %d, y = %d, %d px long", d.fault().name()
                        .toLowerCase(Locale.ROOT), d.direction(), d.kind().word(), d.x(), d.y(), d.length()));
            }
        }
        return r;
    }

    /**
     * The search decides from the whole image (a column or row defect, a cluster and the noise level are judged over
     * all of it), so it cannot run in blocks: a block size is refused rather than giving a different mask.
     */
    static void refuseBlocks(Values v) {
        if (BlockSettings.given(v)) {
            throw new IllegalArgumentException("block-size = '" + v.text(BlockSettings.BLOCK_SIZE).trim() + "' is not"
                    + " possible for find-defects: lines, clusters and the noise level are judged over the whole image,"
                    + " which must fit in memory; leave block-size at auto");
        }
    }

    private static void checkSize(String key, Volume frames, ImagePlus input) {
        if (frames != null && (frames.width() != input.getWidth() || frames.height() != input.getHeight())) {
            throw new IllegalArgumentException(key + " frames are " + frames.width() + "x" + frames.height()
                    + " but input is " + input.getWidth() + "x" + input.getHeight() + "; give frames of the same camera size");
        }
    }
}
