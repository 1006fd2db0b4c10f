package org.stackwright.repair;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

import org.stackwright.repair.TileRowSeams.Columns;
import org.stackwright.volume.Volume;

/**
 * Finds the tile seams of a stitched image from the periodicity of the tiling: brightness steps between tiles,
 * shading that repeats in every tile, gaps of zeros and blending bands all leave evidence ({@link SeamEvidence})
 * at borders that repeat with the tile step; a comb over that evidence gives the step and phase
 * ({@link SeamComb}). Horizontal seams come first (they cross the whole width); vertical ones are then found in
 * each tile row on its own with one common step, so that the rows of a snake-order mosaic with overlap, whose
 * seams are shifted by the overlap, get their own phase (and the shift gives the overlap; {@link TileRowSeams}).
 *
 * <p>Each seam becomes a band ({@link CombBands}): the borders around the comb tooth whose evidence repeats in most
 * teeth (a dimmed band, a blending band has two, a gap is widened to its zeros), or, for a lone step or corner, the
 * requested width centred on it. Strong evidence that does not repeat with the step (a defective column, a structure)
 * is no seam; it is returned as a line for the user to check with find-defects ({@link LoneEdges}). Without two
 * repeating teeth along an axis (a mosaic of two tiles along it) the seams along that axis are the strong edges that
 * are not narrow lines, and the result is marked not regular. An axis without a period of its own is tried once more
 * with the step of the other axis alone (square tiles), its teeth needing {@link #OTHER_AXIS} of the usual evidence. An
 * axis still without a period of its own takes the blend bands found from the noise ({@link BlendBands}: inside a blend
 * the noise of two exposures is averaged) as its seams; their looks say "blend" and "noise". Where the shading every
 * tile shares shows the step, the combs must agree with it, and an axis still without a period may take it from there
 * ({@link ShadingRules}, {@link SeamTemplate}) where the image bends at the fold's borders more than between them
 * (a smooth falloff, as in a single tile, folds at many steps). An axis of three or more whole tiles still without a
 * period is weighed in blocks of single tiles cut at the other axis's seams, where the gain steps of the tiles do not
 * cancel ({@link GridBlocks}); an axis of three whole tiles may take its step from the one of its two seams that
 * shows there ({@link GridBlocks#thirds}), before the shading is asked. This class runs those steps in order and holds
 * the results.
 */
public final class SeamDetector {

    /** borders of one seam lie at most this far apart (pixels): a blending band or overlap up to this wide */
    public static final int MAX_BAND = 24;
    /**
     * Tooth limit, as a share of the usual one, when an axis without a period of its own is tried with the step found
     * along the other axis: one pitch tested instead of all pitches needs a smaller allowance for the search.
     */
    static final double OTHER_AXIS = 0.75;
    /**
     * The lengths past the last whole step of the two axes of an uncropped mosaic ({@link #sameOverlap}) differ by at
     * most this (pixels): each step is known to a pixel. Not tuned: equal on every uncropped draw measured.
     */
    static final int SAME_OVERLAP = 2;

    /**
     * A seam band [start, end) along one axis, over the lines [from, to) of the other axis.
     *
     * @param start first pixel of the band
     * @param end one past the last pixel
     * @param strength largest evidence (sign-test z) over the band's borders
     * @param from first line the band covers (0 for a whole seam)
     * @param to one past the last line it covers
     * @param looks what the seam looks like: step, shading, gap, blend
     */
    public record Band(int start, int end, double strength, int from, int to, List<String> looks) {

        /** A band over the whole image. */
        public Band(int start, int end, double strength) {
            this(start, end, strength, 0, Integer.MAX_VALUE, List.of());
        }

        /** @return the centre position (start + end) / 2, a tile border for a band centred on it */
        public int centre() {
            return (start + end) / 2;
        }
    }

    /**
     * Strong evidence that does not repeat with the tile step.
     *
     * @param position first pixel of the line (its border with the previous pixel)
     * @param width 1 or 2 for a narrow line (both edges found), 0 for a lone edge
     * @param strength sign-test z
     */
    public record Line(int position, int width, double strength) {
    }

    /**
     * The tiling found.
     *
     * @param stepX tile step along x (pixels between neighbouring vertical seams), 0 when not found
     * @param stepY tile step along y, 0 when not found
     * @param phaseX first vertical seam border of each tile row (the phase of its comb)
     * @param phaseY first horizontal seam border
     * @param overlapX the overlap seen from a snake order (shift of the odd tile rows), -1 when not seen
     * @param blendX width of the blending bands of vertical seams, 0 when none
     * @param blendY width of the blending bands of horizontal seams, 0 when none
     * @param borrowed "x" or "y" when that axis showed no period of its own and the other axis's step was found to
     *     fit it (with {@link #OTHER_AXIS} of the usual evidence per seam), else ""
     * @param folded the axes ("x", "y", "yx") whose step came from the shading every tile shares
     *     ({@link SeamTemplate}), because their seams are too faint at each border, and ("x=2", "y=2") those with two
     *     tiles, whose step is the one seam that cuts the axis into two whole tiles, ("x=3", "y=3") those of three
     *     whole tiles whose step is the one of their two seams that shows ({@link GridBlocks#thirds}), and ("x=gaps",
     *     "y=gaps") those whose step the gaps of zeros and the axis's length fix ({@link GapTiling}); else ""
     * @param trimmed whether the mosaic was read as trimmed (its end tiles partial, the grid's phase free): the seams
     *     near its ends are the least certain
     */
    public record Tiling(int stepX, int stepY, int[] phaseX, int phaseY, int overlapX, int blendX, int blendY,
            String borrowed, String folded, boolean trimmed) {
    }

    /**
     * What was found.
     *
     * @param columns vertical seams (x bands; each over the tile rows it crosses)
     * @param rows horizontal seams (y bands)
     * @param regular true when a tile period was found along both axes (or an axis has no seam)
     * @param tiling the steps and phases
     * @param columnLines strong vertical lines that are not seams
     * @param rowLines strong horizontal lines that are not seams
     */
    public record Found(List<Band> columns, List<Band> rows, boolean regular, Tiling tiling, List<Line> columnLines,
            List<Line> rowLines) {

        /** @return one plane, 255 on every band */
        public byte[] mask(int w, int h) {
            byte[] m = new byte[w * h];
            for (Band b : columns) {
                for (int y = Math.max(0, b.from()); y < Math.min(h, b.to()); y++) {
                    for (int x = Math.max(0, b.start()); x < Math.min(w, b.end()); x++) {
                        m[y * w + x] = (byte) 255;
                    }
                }
            }
            for (Band b : rows) {
                for (int y = Math.max(0, b.start()); y < Math.min(h, b.end()); y++) {
                    for (int x = Math.max(0, b.from()); x < Math.min(w, b.to()); x++) {
                        m[y * w + x] = (byte) 255;
                    }
                }
            }
            return m;
        }
    }

    private SeamDetector() {
    }

    /**
     * @param stack the image or stack, not modified; of a deep stack only {@link SeamSlices#read} are read
     * @param threshold sign-test z a seam must exceed somewhere; teeth of a repeating comb need half of it
     * @param stepWidth band width given to a lone step or corner, pixels
     */
    public static Found detect(Volume stack, double threshold, int stepWidth) {
        Volume image = SeamSlices.of(stack);
        // the shading's profiles and their best step do not depend on the reading: made once, shared by both
        ShadingRules shading = new ShadingRules(image);
        Found whole = detectOnce(image, shading, threshold, stepWidth);
        // (an uncropped reading whose one axis came from the shading's fold and the other from one seam in blocks cut at
        // that fold's seams, GridBlocks.thirds, shows nothing of that chain by itself: the trimmed reading is made too
        // and weighed as for a mosaic read without a tiling, measured on crop-tune c-snake-s7206, whose uncropped reading
        // found 128x86 that way and the trimmed one the truth 100x88 with the snake's overlap; an uncropped tiling whose
        // axes leave different lengths past their whole steps, sameOverlap, is weighed so too)
        boolean uncropped = uncropped(whole.tiling(), image.width(), image.height())
                && !foldThenThird(whole.tiling().folded());
        if (uncropped && !foldedAtZero(whole.tiling().folded())) {
            return whole;
        }
        // no uncropped tiling on both axes: the mosaic may have been trimmed (its end tiles partial, the grid's phase
        // free); that reading is taken when it finds the step on more axes, or on as many where the uncropped reading
        // found a tiling that does not start at the first pixel. A shading fold assumes the phase 0 it then shows, so
        // an uncropped tiling with a fold is weighed against the trimmed reading too: where that finds both steps from
        // the seams' own evidence (no fold), every seam showing by itself (above the seam limit), it is taken
        // (measured on crop-tune a-steps-s7012: the fold at phase 0 gave 92 x 82 for 100 x 90, which its combs found
        // trimmed, every seam above 11; combs of teeth at the tooth limit only caught stray steps on shading-only
        // mosaics of InventedMosaic, ShadingSeamTest 3x3 of 128 with gaps, seed 59)
        Found trimmed = SeamComb.freePhase(() -> detectOnce(image, shading, threshold, stepWidth));
        int a = axes(whole.tiling());
        int b = axes(trimmed.tiling());
        boolean taken = uncropped
                ? b == 2 && trimmed.tiling().borrowed().isEmpty() && trimmed.tiling().folded().isEmpty()
                        && allShow(trimmed, threshold)
                : b > a || b == a && a > 0 && !trimmed.tiling().folded().contains("corners");
        // (a trimmed reading whose steps came from the shading's corners of square tiles, TrimmedShadingGrid, stands on
        // a weaker reading than a tiling found on as many axes with the image's origin: it is taken only where that
        // finds fewer; InventedMosaic's 3x3 shading sweep with gaps, seed 60, took 129 for 128 on a tie)
        // (the tiling says which reading was taken: seams near the image's ends are less certain in a trimmed one)
        return taken ? trimmed : whole;
    }

    /**
     * @return whether the marks of {@link Tiling#folded} name a shading fold ("x", "y"; a fold assumes phase 0), not
     *     only tilings the gaps of zeros or two halves fix
     */
    static boolean foldedAtZero(String folded) {
        String rest = folded.replaceAll("[xy]=(2|3|gaps)", "");
        return rest.contains("x") || rest.contains("y");
    }

    /** @return whether every band found exceeds the seam limit: each seam shows by itself */
    private static boolean allShow(Found f, double threshold) {
        return java.util.stream.Stream.concat(f.columns().stream(), f.rows().stream())
                .allMatch(b -> b.strength() > threshold);
    }

    /** @return whether one axis's step came from the shading's fold and the other's from {@link GridBlocks#thirds} */
    private static boolean foldThenThird(String folded) {
        String folds = folded.replaceAll("[xy]=(2|3|gaps)", "");
        return folds.contains("y") && folded.contains("x=3") || folds.contains("x") && folded.contains("y=3");
    }

    /** @return the number of axes with a step */
    private static int axes(Tiling t) {
        return (t.stepX() > 0 ? 1 : 0) + (t.stepY() > 0 ? 1 : 0);
    }

    /**
     * @return whether both axes have a step and every phase found starts the tiles at the first pixel and ends them
     *     at the last, give or take an overlap (up to {@link #MAX_BAND}; a snake row starts at the overlap), the same
     *     overlap on both axes ({@link #sameOverlap})
     */
    static boolean uncropped(Tiling t, int w, int h) {
        if (t.stepX() <= 0 || t.stepY() <= 0 || !whole(t.phaseY(), t.stepY(), h)
                || !sameOverlap(w, t.stepX(), h, t.stepY())) {
            return false;
        }
        for (int p : t.phaseX()) {
            if (p >= 0 && !whole(p, t.stepX(), w)) {
                return false;
            }
        }
        return true;
    }

    /**
     * Whether the two axes leave the same length past their whole steps (n mod step, taken between minus and plus half
     * a step: a phase a few pixels short of a step counts as 0, {@link #whole}) within {@link #SAME_OVERLAP}: a
     * mosaic's tiles overlap by one number of pixels on both axes (so both generators of the tests make them), or by
     * one share of tiles that are not square (a stitcher given the overlap as a percentage: 10 % of 200 x 150 px
     * tiles is 20 and 15 px), so an uncropped mosaic read
     * with its true steps shows its overlap on both axes, and a trimmed one, whose ends are cut anywhere, seldom does. Rules of whole tiles read into trimmed
     * mosaics (three whole tiles from one seam, {@link GridBlocks#thirds}, folds at phase 0) gave tilings that start
     * and end at the image's ends but leave different lengths: crop-tune c-snake-s7201 (110 x 102: 109, i.e. -1, and
     * 14), e-lines-s7402 (110 x 116: 13 and 5), crop-tune2 e-lines-s30402 (87 x 126: 24 and 2).
     */
    static boolean sameOverlap(int w, int stepX, int h, int stepY) {
        int ox = past(w, stepX);
        int oy = past(h, stepY);
        if (Math.abs(ox - oy) <= SAME_OVERLAP) {
            return true;
        }
        // one share of tiles that are not square (a stitcher given the overlap as a percentage): the overlap along y
        // that share gives, from the one along x, within the same allowance
        return ox > 0 && oy > 0 && Math.abs(oy - ox * (double) (stepY + oy) / (stepX + ox)) <= SAME_OVERLAP;
    }

    /** @return n mod s, in (-s / 2, s / 2] */
    private static int past(int n, int s) {
        int r = Math.floorMod(n, s);
        return 2 * r > s ? r - s : r;
    }

    /**
     * @return whether tiles of step s at phase p start within MAX_BAND of 0 and end within MAX_BAND of n (a phase up to
     *     3 px short of a step, as {@link SeamComb.Period#anchored}, counts as 0)
     */
    private static boolean whole(int p, int s, int n) {
        int a = Math.floorMod(p, s);
        int r = Math.floorMod(n - a, s);
        return (a <= MAX_BAND || s - a <= 3) && (r <= MAX_BAND || s - r <= 3);
    }

    private static Found detectOnce(Volume image, ShadingRules shading, double threshold, int stepWidth) {
        int w = image.width();
        int h = image.height();
        double tooth = threshold / 2;
        SeamEvidence ey = SeamEvidence.of(image, false, 0, w);
        SeamComb.Period py = CombBands.repeats(ey, SeamComb.find(ey, null, tooth, threshold), tooth);
        // a comb that does not fit the tilings the gaps of zeros admit caught stray steps
        if (py != null && !GapTiling.admits(ey, py)) {
            py = null;
        }
        List<Band> rows = py != null ? CombBands.seams(ey, py, tooth, threshold, stepWidth, 0, w)
                : LoneEdges.lone(ey, threshold, stepWidth, 0, w);
        Columns c = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, 0);
        String borrowed = "";
        if (py == null && c.step() > 0) {
            // no period of horizontal seams of their own: try the vertical seams' step, the one pitch of square tiles
            SeamComb.Period guided = SeamComb.atPitch(ey, c.step(), OTHER_AXIS * tooth, threshold);
            if (CombBands.repeats(ey, guided, OTHER_AXIS * tooth) != null) {
                borrowed = "y";
                py = guided;
                rows = CombBands.seams(ey, py, OTHER_AXIS * tooth, threshold, stepWidth, 0, w);
                c = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, 0);
            }
        } else if (py != null && c.step() == 0 && !rows.isEmpty()) {
            // and the other way round
            Columns guided = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, py.pitch());
            if (guided.step() > 0) {
                borrowed = "x";
                c = guided;
            }
        }
        // the combs of short tile rows may lock onto stray steps (structures of the specimen): where the shading every
        // tile shares shows a step of its own, a comb must agree with it, else the rows' lone seams stand; a comb with
        // two seams of its own in one tile row (gain steps between tiles) stands without the shading, whose best step
        // an off-centre vignetting can move by several pixels
        if (c.step() > 0 && !shading.agree(rows, c, false) && !TileRowSeams.standsOnSteps(image, rows, c, threshold)
                && !TileRowSeams.snakeStands(c, SeamTemplate.shownStep(shading.alongX()))) {
            c = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, -1);
        }
        // an axis without a period of its own from steps: blend bands found from the noise (two exposures averaged)
        // are its seams (a seam band dimmed after acquisition also lowers the noise, but its steps find it first)
        BlendBands.Found blends = py == null || c.step() == 0 || !borrowed.isEmpty() ? BlendBands.find(image)
                : BlendBands.Found.NONE;
        // whether the vertical seams had a period of their own before the rows are cut at the horizontal blend bands:
        // the shorter tile rows cut there may lock onto stray steps of the specimen, which must not overturn the
        // vertical blend bands the noise shows (structures add to the noise, they cannot remove it)
        boolean xSteps = c.step() > 0 && !borrowed.equals("x");
        if (blends.y() != null && (py == null || borrowed.equals("y"))) {
            py = new SeamComb.Period(blends.y().step(), blends.y().phase(), 0, 0, 0);
            rows = blendBands(blends.y(), 0, w);
            c = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, 0);
            borrowed = "";
        }
        if (blends.x() != null && !xSteps) {
            int[] ph = new int[c.phases().length];
            Arrays.fill(ph, blends.x().phase());
            c = new Columns(blendBands(blends.x(), 0, h), c.periods(), ph, blends.x().width(), blends.x().step());
            borrowed = borrowed.replace("x", "");
        }
        // an axis still without a period: the shading every tile shares may show the step (SeamTemplate)
        String folded = "";
        // (the rules of an uncropped mosaic below, folds at phase 0, gap tilings from the first pixel and two halves,
        // are not read into a trimmed mosaic: there they fitted specimen lines, measured on crop-check e-lines-s20400)
        boolean whole = !SeamComb.freePhase();
        // a fold along an axis where no seam showed by itself, weighed again at the end (ShadingRules.predictsEveryTile)
        LoneFold lone = null;
        LoneFold loneX = null;
        SeamEvidence ex = SeamEvidence.of(image, true, 0, h);
        // a trimmed mosaic of shading only, an axis without a step, a gap on it: square tiles whose teeth through the
        // gaps show the shading's corners (TrimmedShadingGrid); the other axis's step where that has one and it passes
        // (borrow), else the square grid of both axes, which then replaces the other axis's comb
        int[] lent = null;
        if (!whole && py != null && c.step() == 0) {
            lent = TrimmedShadingGrid.borrow(ex, shading.alongX(), py.pitch());
        } else if (!whole && py == null && c.step() > 0) {
            lent = TrimmedShadingGrid.borrow(ey, shading.alongY(), c.step());
        }
        // (the square grid of both axes is searched only where no step was lent: a lent step is taken before it)
        TrimmedShadingGrid.Grid sq = lent == null && !whole && (py == null || c.step() == 0)
                ? TrimmedShadingGrid.find(ex, ey, shading.alongX(), shading.alongY()) : null;
        if (lent != null && py != null) {
            // the vertical seams at the horizontal ones' step, square tiles
            folded += "x=corners";
            Columns base = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, -1);
            c = onePhase(base, onTeeth(base.bands(), lent, ex, stepWidth, 0, h), py.pitch(), lent[0] % py.pitch(),
                    base.blend());
        } else if (lent != null) {
            // the horizontal seams at the vertical ones' step
            folded += "y=corners";
            py = new SeamComb.Period(c.step(), lent[0] % c.step(), 0, 0, 0);
            rows = onTeeth(rows, lent, ey, stepWidth, 0, w);
            c = recut(image, shading, rows, c, tooth, threshold, stepWidth);
        }
        if (sq != null) {
            folded += "xy=corners";
            py = new SeamComb.Period(sq.step(), sq.phaseY(), 0, 0, 0);
            rows = onTeeth(rows, sq.teethY(), ey, stepWidth, 0, w);
            Columns base = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, -1);
            c = onePhase(base, onTeeth(c.bands(), sq.teethX(), ex, stepWidth, 0, h), sq.step(), sq.phaseX(),
                    c.blend());
        }
        // three whole tiles along an axis whose one seam shows (the other's gain step cancelled by the vignetting's):
        // that seam fixes the grid before the shading is asked, whose best fold may lie a few pixels off or at
        // another step (GridBlocks.thirds)
        GridBlocks.Grid third = py == null && whole && c.step() > 0 ? thirds(image, false, rows, c.bands(), c.step(),
                ex, ey, shading, tooth, threshold) : null;
        if (third != null) {
            folded += "y=3";
            py = new SeamComb.Period(third.stepY(), 0, 0, 0, 0);
            rows = gridBands(third.teethY(), third.zY(), stepWidth, h, 0, w);
            c = recut(image, shading, rows, c, tooth, threshold, stepWidth);
        }
        if (py == null && whole) {
            SeamTemplate.Profiles alongY = shading.alongY();
            int[] gapsY = GapTiling.starts(image, rows, false);
            SeamTemplate.Fold fy = SeamTemplate.find(alongY, anchors(rows), gapsY);
            if (fy != null && fy.found() && ShadingRules.backed(alongY, fy)) {
                fy = FoldEdges.throughEdges(alongY, fy, ey, rows, anchors(rows), gapsY, threshold);
                if (anchors(rows).length == 0) {
                    lone = new LoneFold(alongY, fy, rows, c);
                }
                folded = "y";
                py = new SeamComb.Period(fy.pitch(), fy.phase(), 0, 0, 0);
                rows = ShadingRules.withTeeth(rows, fy, h, stepWidth, 0, w);
                c = recut(image, shading, rows, c, tooth, threshold, stepWidth);
            }
        }
        // an axis still without a period whose gaps of zeros, with its length, leave one coarsest tiling of three tiles
        // or more (two tiles: the halves below)
        int gy = py == null && whole ? GapTiling.step(GapTiling.starts(image, rows, false), h) : 0;
        if (gy > 0 && h / gy >= 3) {
            folded += "y=gaps";
            py = new SeamComb.Period(gy, 0, 0, 0, 0);
            rows = GapTiling.onGrid(rows, gy, h, stepWidth, 0, w);
            c = recut(image, shading, rows, c, tooth, threshold, stepWidth);
        }
        third = c.step() == 0 && whole && py != null ? thirds(image, true, c.bands(), rows, py.pitch(), ex, ey,
                shading, tooth, threshold) : null;
        if (third != null) {
            folded += "x=3";
            c = gridColumns(c, third, stepWidth, w, h, false);
        }
        if (c.step() == 0 && whole) {
            SeamTemplate.Profiles px = shading.alongX();
            List<Band> kept = c.bands();
            SeamTemplate.Fold fx = SeamTemplate.find(px, anchors(kept), GapTiling.starts(image, kept, true));
            if (fx == null || !fx.found()) {
                // a lone step may be a structure that runs across a tile row: only the gaps of zeros must be seams
                kept = c.bands().stream().filter(b -> ShadingRules.coversGap(image, b)).toList();
                fx = kept.size() < c.bands().size()
                        ? SeamTemplate.find(px, anchors(kept), GapTiling.starts(image, kept, true)) : null;
            }
            if (fx != null && fx.found() && ShadingRules.backed(px, fx)) {
                fx = FoldEdges.throughEdges(px, fx, ex, kept, anchors(kept), GapTiling.starts(image, kept, true),
                        threshold);
                if (anchors(kept).length == 0) {
                    loneX = new LoneFold(px, fx, rows, c);
                }
                folded += "x";
                int[] ph = new int[c.phases().length];
                Arrays.fill(ph, fx.phase());
                c = new Columns(ShadingRules.withTeeth(kept, fx, w, stepWidth, 0, h), c.periods(), ph, c.blend(),
                        fx.pitch());
            } else {
                int gx = GapTiling.step(GapTiling.starts(image, c.bands(), true), w);
                if (gx > 0 && w / gx >= 3) {
                    folded += "x=gaps";
                    int[] ph = new int[c.phases().length];
                    c = new Columns(GapTiling.onGrid(c.bands(), gx, w, stepWidth, 0, h), c.periods(), ph, c.blend(),
                            gx);
                }
            }
        }
        // three or more whole tiles along an axis still without a period: its seams in blocks of single tiles, cut at
        // the other axis's seams, where the gains of the tiles do not cancel (GridBlocks)
        // (an axis with one seam that halves it has two whole tiles: that seam is a cut, the axis needs no grid)
        boolean askY = py == null && !(rows.size() == 1 && halves(rows.get(0), h));
        boolean askX = c.step() == 0 && !halvesAll(c, w);
        if (askY || askX) {
            int[][] cutsY = askY ? null : spans(rows);
            int[][] cutsX = askX ? null : spans(c.bands());
            GridBlocks.Grid g = GridBlocks.find(image, cutsX, cutsY, ex, ey, tooth, threshold);
            boolean free = false;
            boolean fromThirds = false;
            if (g == null && SeamComb.freePhase() && askX != askY) {
                // a trimmed mosaic: the grid's phase is free, the other axis's seams cut the blocks
                g = GridBlocks.trimmed(image, askX, askX ? cutsY : cutsX, null, tooth, threshold);
                // vertical seams: a pitch far from the shading's step (ShadingRules.pitchesX) gives way to the best
                // grid near it, where there is one (the shading's step may itself be a fraction of the tile: crop-tune
                // e-lines-s7404 shows 53 for 130, and there no grid near it passes)
                if (askX && g != null && !shading.withinPitchesX(g.stepX())) {
                    GridBlocks.Grid near = GridBlocks.trimmed(image, true, cutsY, shading.pitchesX(), tooth, threshold);
                    g = near != null ? near : g;
                }
                free = true;
            } else if (g == null && whole && askX != askY) {
                // three whole tiles whose one seam shows
                int other = askX ? (py == null ? 0 : py.pitch()) : c.step();
                g = GridBlocks.thirds(image, askX, askX ? cutsY : cutsX, other, tooth, threshold);
                g = g != null && onGrid(askX ? c.bands() : rows, askX ? g.teethX() : g.teethY()) ? g : null;
                fromThirds = g != null;
            }
            // a snake order's tile rows in two phases (SnakeBlocks), where that grid scores better than one phase
            // (an uncropped snake's shifted rows are read at the width's phase; a trimmed one's with step, phase and
            // shift searched: on crop-tune c-snake it found the seams of s7207, whose rows had no comb of their own)
            SnakeBlocks.Snake sn = !askX || askY || rows.isEmpty() ? null
                    : whole ? SnakeBlocks.find(image, cutsY, ex, tooth, threshold)
                    : SnakeBlocks.trimmed(image, cutsY, tooth, threshold);
            // a trimmed snake's step must lie near the shading's, as the trimmed grid's (ShadingRules.pitchesX): with
            // step, phase and shift free, two teeth per parity at about twice the step made snakes of row-by-row
            // mosaics (crop-tune2 a-steps-s30004 and s30016: 224 and 155 for 100)
            if (sn != null && !whole && !shading.withinPitchesX(sn.step())) {
                sn = null;
            }
            if (sn != null && (g == null || sn.score() > SnakeBlocks.scoreX(g, tooth))) {
                c = TileRowSeams.snake(rows, sn, tooth, stepWidth, w, h, c.blend());
                g = null;
            }
            if (g != null) {
                folded += !fromThirds ? "" : askX ? "x=3" : "y=3";
                if (askY) {
                    int phase = free ? g.teethY()[0] % g.stepY() : 0;
                    py = new SeamComb.Period(g.stepY(), phase, g.teethY().length, g.teethY().length, 0);
                    rows = gridBands(g.teethY(), g.zY(), stepWidth, h, 0, w);
                    if (!askX) {
                        // the vertical seams were searched over the whole height: again in the tile rows now cut
                        c = recut(image, shading, rows, c, tooth, threshold, stepWidth);
                    }
                }
                if (askX) {
                    c = gridColumns(c, g, stepWidth, w, h, free);
                }
            }
        }
        // two tiles along an axis: one seam that cuts it into two whole tiles (give or take an overlap) is the step
        if (py == null && whole && rows.size() == 1 && halves(rows.get(0), h)) {
            py = new SeamComb.Period(anchors(rows)[0], 0, 0, 0, 0);
            folded += "y=2";
        }
        if (c.step() == 0 && whole && halvesAll(c, w)) {
            c = new Columns(c.bands(), c.periods(), c.phases(), c.blend(), anchors(c.bands())[0]);
            folded += "x=2";
        }
        // a fold that is the only evidence of a tiling (no seam seen along its axis, none along the other) must predict
        // every held-out group of tiles, else one tile's smooth falloff is the better reading
        if (lone != null && c.step() == 0 && c.bands().isEmpty() && !ShadingRules.predictsEveryTile(lone.p(),
                lone.fold())) {
            py = null;
            rows = lone.rows();
            folded = folded.replaceFirst("^y", "");
        }
        if (loneX != null && py == null && rows.isEmpty() && !ShadingRules.predictsEveryTile(loneX.p(),
                loneX.fold())) {
            c = loneX.columns();
            folded = folded.replaceFirst("x(?!=)", "");
        }
        // an uncropped mosaic whose width admits a snake: rows whose own steps show the shifted phase get it
        if (whole) {
            c = SnakeOwnRows.apply(image, rows, c, tooth, stepWidth);
        }
        List<Band> cols = c.bands();
        SeamComb.Period[] px = c.periods();
        int[] phases = c.phases();
        int blendX = c.blend();
        int stepX = c.step();
        int blendY = 0;
        for (Band b : rows) {
            if (b.looks().contains("blend")) {
                blendY = Math.max(blendY, b.end() - b.start());
            }
        }
        Tiling tiling = new Tiling(stepX, py == null ? 0 : py.pitch(), phases, py == null ? -1 : py.phase(),
                snakeOverlap(phases, stepX, w, whole), blendX, blendY, borrowed, folded, !whole);
        boolean regular = (py != null || rows.isEmpty()) && (stepX > 0 || cols.isEmpty());
        List<Line> colLines = LoneEdges.lines(ex, cols, threshold);
        List<Line> rowLines = LoneEdges.lines(ey, rows, threshold);
        return new Found(cols, rows, regular, tiling, colLines, rowLines);
    }

    /** A fold of the shading taken where no seam showed along its axis, with the seams found before it. */
    private record LoneFold(SeamTemplate.Profiles p, SeamTemplate.Fold fold, List<Band> rows, Columns columns) {
    }

    /** @return columns of one step and phase in every tile row of shape (as many rows), over these bands */
    private static Columns onePhase(Columns shape, List<Band> bands, int step, int phase, int blend) {
        SeamComb.Period[] per = new SeamComb.Period[shape.periods().length];
        Arrays.fill(per, new SeamComb.Period(step, phase, 0, 0, 0));
        int[] ph = new int[shape.phases().length];
        Arrays.fill(ph, phase);
        return new Columns(bands, per, ph, blend, step);
    }

    /**
     * @return the bands found so far that lie on a tooth (within 2 px of its border), plus a band of the requested width
     *     centred on every tooth that none covers, over the lines [from, to); bands off the teeth are dropped (their
     *     strong edges are reported as lines that are not seams)
     */
    private static List<Band> onTeeth(List<Band> found, int[] teeth, SeamEvidence e, int stepWidth, int from, int to) {
        List<Band> out = new ArrayList<>();
        for (int t : teeth) {
            List<Band> here = found.stream().filter(b -> t >= b.start() - 2 && t <= b.end() + 2).toList();
            if (here.isEmpty()) {
                out.add(new Band(Math.max(0, t - stepWidth / 2), Math.min(e.length(), t - stepWidth / 2 + stepWidth),
                        e.strength(t), from, to, List.of("shading")));
            }
            out.addAll(here.stream().filter(b -> !out.contains(b)).toList());
        }
        out.sort((x, y) -> x.start() != y.start() ? Integer.compare(x.start(), y.start())
                : Integer.compare(x.from(), y.from()));
        return out;
    }

    /** @return the vertical seams of a grid found in blocks of single tiles (its phase free in a trimmed reading) */
    private static Columns gridColumns(Columns c, GridBlocks.Grid g, int stepWidth, int w, int h, boolean free) {
        SeamComb.Period[] per = new SeamComb.Period[c.periods().length];
        Arrays.fill(per, new SeamComb.Period(g.stepX(), 0, g.teethX().length, g.teethX().length, 0));
        int[] ph = new int[c.phases().length];
        Arrays.fill(ph, free ? g.teethX()[0] % g.stepX() : 0);
        return new Columns(gridBands(g.teethX(), g.zX(), stepWidth, w, 0, h), per, ph, c.blend(), g.stepX());
    }

    /**
     * @return the grid of three whole tiles along one axis from the one seam that shows ({@link GridBlocks#thirds}),
     *     the blocks cut at the other axis's seams, where no grid of the usual rules ({@link GridBlocks#find}) passes
     *     (a finer grid, whose teeth show, is left to it) and the seams already found along the axis lie on its teeth;
     *     null when none
     * @param own the seams found along the axis so far (lone edges, gaps)
     * @param other the other axis's seams, where the blocks are cut
     */
    private static GridBlocks.Grid thirds(Volume image, boolean alongX, List<Band> own, List<Band> other,
            int otherStep, SeamEvidence ex, SeamEvidence ey, ShadingRules shading, double tooth, double threshold) {
        if (other.isEmpty()) {
            return null;
        }
        int[][] cuts = spans(other);
        if (GridBlocks.find(image, alongX ? null : cuts, alongX ? cuts : null, ex, ey, tooth, threshold) != null) {
            return null;
        }
        GridBlocks.Grid g = GridBlocks.thirds(image, alongX, cuts, otherStep, tooth, threshold);
        // a seam seen along the axis off the grid's teeth (a gap that halves a two-tile axis: the own shading sweep's
        // 2x4 seed 54 took three tiles of 71 for two of 110 without this) rules the grid out
        if (g == null || !onGrid(own, alongX ? g.teethX() : g.teethY()) || foldElsewhere(image, shading, alongX, own, g)) {
            return null;
        }
        // a snake order's tile rows in two phases that score better are left to SnakeBlocks (measured on tune draw
        // c-snake-s7213: three tiles of 110 px, the one seam that shows in one phase, the snake in both)
        SnakeBlocks.Snake sn = alongX ? SnakeBlocks.find(image, cuts, ex, tooth, threshold) : null;
        return sn != null && sn.score() > SnakeBlocks.scoreX(g, tooth) ? null : g;
    }

    /**
     * @return whether the shading's fold along the axis (with the seams found so far as anchors, or without the lone
     *     steps among them, as the fold is retried below) would take three whole tiles of its own none of whose seams
     *     lies within 2 px of the grid's stronger tooth: that tooth is then a stray step, not a seam (the own shading
     *     sweep's 3x3 seed 49: a lone step at 244 gave three tiles of 122, the fold without it the true 128; on the
     *     tune draws of the independent generator where the grid is right, the fold took the same step, one of 122 or
     *     123 whose seams lie within 2 px of the tooth, e-lines-s7411 and s30403, one of 7 tiles, s7404, or none)
     */
    private static boolean foldElsewhere(Volume image, ShadingRules shading, boolean alongX, List<Band> own,
            GridBlocks.Grid g) {
        int n = alongX ? image.width() : image.height();
        int[] teeth = alongX ? g.teethX() : g.teethY();
        double[] z = alongX ? g.zX() : g.zY();
        int strong = z[0] >= z[1] ? teeth[0] : teeth[1];
        SeamTemplate.Profiles p = alongX ? shading.alongX() : shading.alongY();
        List<Band> kept = own.stream().filter(b -> ShadingRules.coversGap(image, b)).toList();
        for (List<Band> anchored : kept.size() < own.size() ? List.of(own, kept) : List.of(own)) {
            SeamTemplate.Fold f = SeamTemplate.find(p, anchors(anchored), GapTiling.starts(image, anchored, alongX));
            if (f == null || !f.found() || !ShadingRules.backed(p, f) || n / f.pitch() != 3
                    || !GridBlocks.wholeTiles(f.pitch(), n)) {
                continue;
            }
            boolean near = false;
            for (int k = 1; k < 3; k++) {
                near |= Math.abs(f.phase() + k * f.pitch() - strong) <= 2;
            }
            if (!near) {
                return true;
            }
        }
        return false;
    }

    /** @return whether every band's border (a gap's first zero, else its centre) lies within 2 px of a tooth */
    private static boolean onGrid(List<Band> bands, int[] teeth) {
        for (int a : anchors(bands)) {
            if (Arrays.stream(teeth).noneMatch(t -> Math.abs(t - a) <= 2)) {
                return false;
            }
        }
        return true;
    }

    /** The blend bands of one axis as seams over the lines [from, to), marked "blend" and "noise" (their evidence). */
    private static List<Band> blendBands(BlendBands.Axis a, int from, int to) {
        List<Band> out = new ArrayList<>();
        for (int i = 0; i < a.starts().length; i++) {
            out.add(new Band(a.starts()[i], a.starts()[i] + a.width(), a.z()[i], from, to, List.of("blend", "noise")));
        }
        return out;
    }

    /**
     * The vertical seams again over the tile rows cut at horizontal seams found late (from the shading or the gaps).
     * The tile rows are shorter than the stripes before: their combs, weaker, must not overturn a step the longer
     * stripes showed nor bring one the shading along x does not support (a stray pitch catching the gap and a few
     * structures).
     */
    private static Columns recut(Volume image, ShadingRules shading, List<Band> rows, Columns c, double tooth,
            double threshold, int stepWidth) {
        Columns again = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, 0);
        if (again.step() > 0 && !shading.agree(rows, again, true)
                && !TileRowSeams.snakeStands(again, SeamTemplate.shownStep(shading.alongX()))) {
            again = TileRowSeams.columns(image, shading, rows, tooth, threshold, stepWidth, -1);
        }
        return again.step() == c.step() || c.step() == 0 && shading.nearBest(again.step()) ? again : c;
    }

    /** The teeth of a grid found in blocks of single tiles as seams of the requested width, over the lines [from, to). */
    private static List<Band> gridBands(int[] teeth, double[] z, int stepWidth, int n, int from, int to) {
        List<Band> out = new ArrayList<>();
        for (int i = 0; i < teeth.length; i++) {
            int b = teeth[i];
            out.add(new Band(Math.max(0, b - stepWidth / 2), Math.min(n, b - stepWidth / 2 + stepWidth), z[i], from,
                    to, List.of("step")));
        }
        return out;
    }

    /** @return {start, end} of the bands (of all tile rows together), ascending, overlapping ones merged */
    private static int[][] spans(List<Band> bands) {
        List<int[]> out = new ArrayList<>();
        bands.stream().map(b -> new int[] {b.start(), b.end()}).sorted((p, q) -> Integer.compare(p[0], q[0]))
                .forEach(p -> {
                    int[] last = out.isEmpty() ? null : out.get(out.size() - 1);
                    if (last != null && p[0] <= last[1]) {
                        last[1] = Math.max(last[1], p[1]);
                    } else {
                        out.add(p);
                    }
                });
        return out.toArray(new int[0][]);
    }

    /** @return whether every tile row has one vertical seam, the same, that halves the width */
    private static boolean halvesAll(Columns c, int w) {
        List<Band> b = c.bands();
        return !b.isEmpty() && b.size() == c.phases().length && b.stream().allMatch(x -> halves(x, w)
                && x.start() == b.get(0).start());
    }

    /** @return whether the band's border cuts an axis of length n into two tiles of its step plus an overlap */
    private static boolean halves(Band b, int n) {
        int at = b.looks().contains("gap") ? b.start() : b.centre();
        return at >= SeamComb.MIN_PITCH && n - 2 * at >= 0 && n - 2 * at <= MAX_BAND;
    }

    /** @return the border of each band found so far (a gap's first zero, else its centre), ascending: fold anchors */
    private static int[] anchors(List<Band> bands) {
        return bands.stream().mapToInt(b -> b.looks().contains("gap") ? b.start() : b.centre()).distinct().sorted()
                .toArray();
    }

    /**
     * @return the overlap a snake's shift shows ({@link TileRowSeams#snakeShift}), -1 when none; on an uncropped
     *     reading the width past whole steps where that lies within a pixel of the shift: an uncropped snake is whole
     *     steps plus one overlap wide, while each phase found may lie a pixel off the border (measured on the
     *     independent generator's whole snakes: tune c-snake s7208 13 for 12, tune2 s30217 17 for 18, held-out
     *     s100208 11 for 12, every seam within 2 px)
     */
    static int snakeOverlap(int[] phases, int step, int w, boolean whole) {
        int shift = TileRowSeams.snakeShift(phases, step);
        int over = step > 0 ? Math.floorMod(w, step) : -1;
        return whole && shift > 0 && over >= 3 && Math.abs(over - shift) <= 1 ? over : shift;
    }

    /** @return the positions of the bands' centres, ascending, without repeats */
    static int[] centres(List<Band> bands) {
        return bands.stream().mapToInt(Band::centre).distinct().sorted().toArray();
    }
}
