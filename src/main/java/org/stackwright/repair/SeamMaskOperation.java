package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.ImagePlus;

import org.stackwright.op.InputChecks;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * {@code seam-mask}: a mask of the tile seams of a stitched image, from the tile layout ({@link TileLayout}, checked
 * against the image when one is given) or found in the image from the periodicity of the tiling
 * ({@link SeamDetector}, reported by {@link SeamReport}); optionally reports per-tile gains ({@link TileLevelling},
 * {@code level}), or corrects shading and gains in one step ({@code level-tiles}: the shading all tiles share and each
 * tile's background level, {@link TileShading}, then the gains: the background levels where they agree with the
 * seams, else the seam gains on the corrected image, {@link BackgroundGains}), and, only when asked for, writes a levelled copy.
 * {@code level-tiles} replaces the older {@code shading}, which needed {@code level} beside it; old commands and
 * macros with {@code level shading} still run (the old key is an alias).
 */
public final class SeamMaskOperation implements Operation {

    /** rms misfit of the pair ratios (log units) above which the gains are reported as unreliable */
    static final double MISFIT_WARNING = 0.05;

    @Override
    public String name() {
        return "seam-mask";
    }

    @Override
    public String summary() {
        return "mask the tile seams of a stitched image, from the tile layout or found in the image; 255 = seam";
    }

    @Override
    public List<Param> params() {
        return List.of(
                Param.text("grid", null, "tile grid ROWSxCOLUMNS, e.g. 3x4 (layout mode)"),
                Param.text("tile", null, "tile size WxH in pixels, e.g. 512x512 (layout mode)"),
                Param.text("overlap", "0", "overlap of neighbouring tiles: pixels (32) or percent of the tile (10%)"),
                Param.choice("order", "row-by-row", List.of("row-by-row", "snake"), "order in which tiles were placed"),
                Param.integer("seam-width", 4, 1, 10_000, "width of each seam band in pixels"),
                Param.flag("detect", "find the seams in the input image instead of using a layout"),
                Param.image("input", false, "the stitched image (needed with detect or level; with a layout it is "
                        + "checked against the image)"),
                Param.number("threshold", 8.0, 2, 1000, "", "detect: sign-test z a seam must exceed (repeating seams "
                        + "need half of it in each tile)"),
                Param.flag("level", "estimate a gain per tile from the bands beside the seams and report it"),
                Param.flag("level-tiles", "shading and gain correction of the tiles in one step: estimate the "
                        + "shading all tiles share (a flat field from the mosaic itself) with each tile's background "
                        + "level, take it out, then a gain per tile: the background levels where they agree with the "
                        + "seams, else from the seams (implies level)").withAlias("shading"),
                Param.number("offset", 0.0, -1e9, 1e9, "ADU", "level: camera offset (dark level) of the input"),
                Param.integer("strip", 4, 1, 1000, "level: pixels used on each side of a seam"),
                Param.outputImage("output", true, "the 8-bit seam mask, 255 = seam (TIFF)"),
                Param.outputImage("levelled-output", false, "level: the input with each tile divided by its gain "
                        + "(and by the shading with level-tiles)"),
                Param.outputImage("flat-field", false, "level-tiles: the estimated shading of one tile, mean 1 "
                        + "(32-bit)"),
                Param.outputFile("record", "run record with seam positions and gains (JSON)"));
    }

    @Override
    public Result run(Values v, RunContext ctx) {
        ImagePlus input = v.image("input");
        boolean detect = v.flag("detect");
        int sw = v.integer("seam-width");
        boolean levelTiles = v.flag("level-tiles");
        boolean level = v.flag("level") || levelTiles;
        if ((detect || level) && input == null) {
            throw new IllegalArgumentException("input is required with " + (detect ? "detect" : levelTiles
                    ? "level-tiles" : "level") + ": give the stitched image");
        }
        Volume img = input == null ? null : InputChecks.oneVolume("input", input);
        Result r = new Result();
        r.record("operation", name());
        r.record("settings", v.effective());
        byte[] mask;
        int w;
        int h;
        List<int[]> colBands = new ArrayList<>();
        List<int[]> rowBands = new ArrayList<>();
        if (detect) {
            w = img.width();
            h = img.height();
            ctx.progress(0.2, "looking for seams");
            SeamDetector.Found f = SeamDetector.detect(img, v.number("threshold"), sw);
            mask = f.mask(w, h);
            // levelling works on a grid of tiles: the vertical seams of the first tile row
            f.columns().stream().filter(b -> b.from() == 0).forEach(b -> colBands.add(new int[] {b.start(), b.end()}));
            f.rows().forEach(b -> rowBands.add(new int[] {b.start(), b.end()}));
            SeamReport.detected(f, w, h, img.depth(), r, ctx);
        } else {
            if (!v.given("grid") || !v.given("tile")) {
                throw new IllegalArgumentException("grid and tile are required unless detect is given: e.g. "
                        + "--grid 3x4 --tile 512x512 --overlap 10% --seam-width 4, or --detect --input IN.tif");
            }
            int[] grid = v.dims("grid", 2);
            int[] tile = v.dims("tile", 2);
            TileLayout layout = new TileLayout(grid[0], grid[1], tile[0], tile[1],
                    TileLayout.overlapPixels(v.text("overlap"), tile[0]), TileLayout.overlapPixels(v.text("overlap"), tile[1]),
                    v.choice("order").equals("snake"));
            w = layout.width();
            h = layout.height();
            if (img != null && (img.width() != w || img.height() != h)) {
                throw new IllegalArgumentException("grid, tile and overlap give a " + w + "x" + h + " image but input is "
                        + img.width() + "x" + img.height() + "; check the tile size and overlap");
            }
            mask = layout.mask(sw);
            for (int x : layout.columnSeams(0)) {
                colBands.add(new int[] {x - sw / 2, x - sw / 2 + sw});
            }
            for (int y : layout.rowSeams()) {
                rowBands.add(new int[] {y - sw / 2, y - sw / 2 + sw});
            }
            r.record("layout", layout.toString());
            r.line("seam mask of " + layout + ", seams " + sw + " px wide");
            if (img != null) {
                ctx.progress(0.3, "checking the layout against the image");
                SeamReport.checkLayout(img, layout, v.number("threshold"), sw, r, ctx);
            }
            if (layout.snake() && layout.overlapX() > 0 && layout.columns() > 1 && level) {
                ctx.warn("level uses the seam positions of the first tile row; in snake order with overlap the "
                        + "odd rows are shifted by the overlap, so their gains are approximate");
            }
        }
        if (v.given("flat-field") && !levelTiles) {
            throw new IllegalArgumentException("flat-field needs level-tiles: add --level-tiles");
        }
        if (level) {
            InputChecks.checkOffset("input", img, v.number("offset"), 0, ctx);
            Volume base = img;
            TileLevelling.Gains g;
            if (levelTiles) {
                ctx.progress(0.5, "estimating the shading and the gains of the tiles");
                BackgroundGains.Choice choice = BackgroundGains.estimate(img, colBands, rowBands, v.integer("strip"),
                        v.number("offset"));
                ShadingReport.report(choice.flat(), r);
                ShadingReport.gainSource(choice, r, ctx);
                r.image("flat-field", ImagePlusAdapter.toImagePlus(ShadingReport.picture(choice.flat(), img.voxel()),
                        input.getTitle() + "-flat-field"));
                base = choice.corrected();
                g = choice.gains();
            } else {
                ctx.progress(0.7, "estimating the gains of the tiles");
                g = TileLevelling.estimate(base, colBands, rowBands, v.integer("strip"), v.number("offset"));
            }
            r.record("tile_gains", g.gains());
            r.record("tile_gain_rms_log_misfit", g.rmsLogResidual());
            for (int row = 0; row < g.rows(); row++) {
                StringBuilder sb = new StringBuilder("tile gains, row " + (row + 1) + ":");
                for (int c = 0; c < g.columns(); c++) {
                    sb.append(String.format(Locale.ROOT, " %.4f", g.gains()[row * g.columns() + c]));
                }
                r.line(sb.toString());
            }
            r.line("gains are relative to the average tile" + (levelTiles ? ", measured after the shading "
                    + "correction" : "") + "; not applied unless levelled-output is given");
            if (g.rmsLogResidual() > MISFIT_WARNING) {
                ctx.warn(String.format(Locale.ROOT, "the tile gains disagree around the grid (rms misfit %.1f %%): a "
                        + "structure along a seam or a wrong offset biases them; do not level with them",
                        100 * g.rmsLogResidual()));
            }
            // made whenever level is on; the doors keep it only when levelled-output is asked for
            Volume lev = TileLevelling.apply(base, colBands, rowBands, g, v.number("offset"));
            r.image("levelled-output", ImagePlusAdapter.toImagePlus(lev, input.getTitle() + "-levelled"));
            r.line("levelled-output (when asked for): estimates, not measurements; the seam bands are corrected with "
                    + "the tile on their side of the seam, but fill them with inpaint all the same");
        } else if (v.given("levelled-output")) {
            throw new IllegalArgumentException("levelled-output needs level-tiles (or level for the gains alone): "
                    + "add --level-tiles");
        }
        VoxelSize voxel = img == null ? VoxelSize.UNIT : img.voxel();
        r.image("output", MaskImages.toImage(mask, w, h, 1, voxel,
                (input == null ? "tiles" : input.getTitle()) + "-seam-mask"));
        ctx.progress(1, "done");
        return r;
    }
}
