package org.stackwright.repair;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.function.Supplier;

import org.stackwright.volume.Volume;

/**
 * Finds the tile seams of a stitched image from the periodicity of the tiling: brightness steps between tiles,
 * shading that repeats in every tile, gaps of zeros and blending bands all leave evidence ({@link SeamEvidence})
 * at borders that repeat with the tile step; a comb over that evidence gives the step and phase
 * ({@link SeamComb}). Horizontal seams come first (they cross the whole width); vertical ones are then found in
 * each tile row on its own with one common step, so that the rows of a snake-order mosaic with overlap, whose
 * seams are shifted by the overlap, get their own phase (and the shift gives the overlap).
 *
 * <p>Each seam becomes a band: the borders around the comb tooth whose evidence repeats in most teeth (a dimmed
 * band, a blending band has two, a gap is widened to its zeros), or, for a lone step or corner, the requested
 * width centred on it. Strong evidence that does not repeat with the step (a defective column, a structure) is no
 * seam; it is returned as a line for the user to check with find-defects. Without two repeating teeth along an
 * axis (a mosaic of two tiles along it) the seams along that axis are the strong edges that are not narrow lines,
 * and the result is marked not regular. An axis without a period of its own is tried once more with the step of
 * the other axis alone (square tiles), its teeth needing {@link #OTHER_AXIS} of the usual evidence. An axis still
 * without a period of its own takes the blend bands found from the noise ({@link BlendBands}: inside a blend the
 * noise of two exposures is averaged) as its seams; their looks say "blend" and "noise".
 */
public final class SeamDetector {

    /** borders of one seam lie at most this far apart (pixels): a blending band or overlap up to this wide */
    public static final int MAX_BAND = 24;
    /**
     * An end of a seam with less than this share of the summed evidence of its strongest end is dropped: removing
     * the median of the nearby steps biases the borders next to a strong edge slightly the other way.
     */
    static final double ECHO = 0.5;
    /** the ends of a seam start within this many pixels of its comb tooth (the tooth may sit on a corner beside a step) */
    static final int NEAR = 6;
    /** a seam that does not repeat must be this many times stronger than the threshold */
    static final double LONE = 2;
    /**
     * Tooth limit, as a share of the usual one, when an axis without a period of its own is tried with the step found
     * along the other axis: one pitch tested instead of all pitches needs a smaller allowance for the search.
     */
    static final double OTHER_AXIS = 0.75;

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
     *     tiles, whose step is the one seam that cuts the axis into two whole tiles; else ""
     */
    public record Tiling(int stepX, int stepY, int[] phaseX, int phaseY, int overlapX, int blendX, int blendY,
            String borrowed, String folded) {
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
     * @param image the image or stack, not modified
     * @param threshold sign-test z a seam must exceed somewhere; teeth of a repeating comb need half of it
     * @param stepWidth band width given to a lone step or corner, pixels
     */
    public static Found detect(Volume image, double threshold, int stepWidth) {
        int w = image.width();
        int h = image.height();
        double tooth = threshold / 2;
        SeamEvidence ey = SeamEvidence.of(image, false, 0, w);
        SeamComb.Period py = repeats(ey, SeamComb.find(ey, null, tooth, threshold), tooth);
        List<Band> rows = py != null ? seams(ey, py, tooth, threshold, stepWidth, 0, w)
                : lone(ey, threshold, stepWidth, 0, w);
        Columns c = columns(image, rows, tooth, threshold, stepWidth, 0);
        // the shading's block profiles along x, made once when a rule below first needs them (they are read only)
        SeamTemplate.Profiles[] made = new SeamTemplate.Profiles[1];
        Supplier<SeamTemplate.Profiles> alongX = () -> made[0] != null ? made[0]
                : (made[0] = SeamTemplate.profiles(image, true));
        String borrowed = "";
        if (py == null && c.step() > 0) {
            // no period of horizontal seams of their own: try the vertical seams' step, the one pitch of square tiles
            SeamComb.Period guided = SeamComb.atPitch(ey, c.step(), OTHER_AXIS * tooth, threshold);
            if (repeats(ey, guided, OTHER_AXIS * tooth) != null) {
                borrowed = "y";
                py = guided;
                rows = seams(ey, py, OTHER_AXIS * tooth, threshold, stepWidth, 0, w);
                c = columns(image, rows, tooth, threshold, stepWidth, 0);
            }
        } else if (py != null && c.step() == 0 && !rows.isEmpty()) {
            // and the other way round
            Columns guided = columns(image, rows, tooth, threshold, stepWidth, py.pitch());
            if (guided.step() > 0) {
                borrowed = "x";
                c = guided;
            }
        }
        // the combs of short tile rows may lock onto stray steps (structures of the specimen): where the shading every
        // tile shares shows a step of its own, a comb must agree with it, else the rows' lone seams stand
        if (c.step() > 0 && !shadingAgrees(alongX.get(), image, rows, c, false)) {
            c = columns(image, rows, tooth, threshold, stepWidth, -1);
        }
        // an axis without a period of its own from steps: blend bands found from the noise (two exposures averaged)
        // are its seams (a seam band dimmed after acquisition also lowers the noise, but its steps find it first)
        BlendBands.Found blends = py == null || c.step() == 0 || !borrowed.isEmpty() ? BlendBands.find(image)
                : BlendBands.Found.NONE;
        if (blends.y() != null && (py == null || borrowed.equals("y"))) {
            py = new SeamComb.Period(blends.y().step(), blends.y().phase(), 0, 0, 0);
            rows = blendBands(blends.y(), 0, w);
            c = columns(image, rows, tooth, threshold, stepWidth, 0);
            borrowed = "";
        }
        if (blends.x() != null && (c.step() == 0 || borrowed.equals("x"))) {
            int[] ph = new int[c.phases().length];
            Arrays.fill(ph, blends.x().phase());
            c = new Columns(blendBands(blends.x(), 0, h), c.periods(), ph, blends.x().width(), blends.x().step());
            borrowed = borrowed.replace("x", "");
        }
        // an axis still without a period: the shading every tile shares may show the step (SeamTemplate)
        String folded = "";
        if (py == null) {
            SeamTemplate.Fold fy = SeamTemplate.find(SeamTemplate.profiles(image, false), anchors(rows));
            if (fy != null && fy.found()) {
                folded = "y";
                py = new SeamComb.Period(fy.pitch(), fy.phase(), 0, 0, 0);
                rows = withTeeth(rows, fy, h, stepWidth, 0, w);
                Columns again = columns(image, rows, tooth, threshold, stepWidth, 0);
                if (again.step() > 0 && !shadingAgrees(alongX.get(), image, rows, again, true)) {
                    again = columns(image, rows, tooth, threshold, stepWidth, -1);
                }
                // the tile rows cut at the seams of shading are shorter: their combs, weaker, must not overturn a
                // step the longer stripes showed nor bring one the shading along x does not support (a stray pitch
                // catching the gap and a few structures)
                c = again.step() == c.step() || c.step() == 0 && nearBest(alongX.get(), again.step()) ? again : c;
            }
        }
        if (c.step() == 0) {
            SeamTemplate.Profiles px = alongX.get();
            List<Band> kept = c.bands();
            SeamTemplate.Fold fx = SeamTemplate.find(px, anchors(kept));
            if (fx == null || !fx.found()) {
                // a lone step may be a structure that runs across a tile row: only the gaps of zeros must be seams
                kept = c.bands().stream().filter(b -> coversGap(image, b)).toList();
                fx = kept.size() < c.bands().size() ? SeamTemplate.find(px, anchors(kept)) : null;
            }
            if (fx != null && fx.found()) {
                folded += "x";
                int[] ph = new int[c.phases().length];
                Arrays.fill(ph, fx.phase());
                c = new Columns(withTeeth(kept, fx, w, stepWidth, 0, h), c.periods(), ph, c.blend(), fx.pitch());
            }
        }
        // two tiles along an axis: one seam that cuts it into two whole tiles (give or take an overlap) is the step
        if (py == null && rows.size() == 1 && halves(rows.get(0), h)) {
            py = new SeamComb.Period(anchors(rows)[0], 0, 0, 0, 0);
            folded += "y=2";
        }
        List<Band> colsSoFar = c.bands();
        if (c.step() == 0 && colsSoFar.size() == c.phases().length && colsSoFar.stream().allMatch(b -> halves(b, w)
                && b.start() == colsSoFar.get(0).start())) {
            c = new Columns(c.bands(), c.periods(), c.phases(), c.blend(), anchors(c.bands())[0]);
            folded += "x=2";
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
                snakeShift(phases, stepX), blendX, blendY, borrowed, folded);
        boolean regular = (py != null || rows.isEmpty()) && (stepX > 0 || cols.isEmpty());
        List<Line> colLines = lines(SeamEvidence.of(image, true, 0, h), cols, threshold);
        List<Line> rowLines = lines(ey, rows, threshold);
        return new Found(cols, rows, regular, tiling, colLines, rowLines);
    }

    /** @return whether a step along x is 0 or near the best step of the shading template along x */
    private static boolean nearBest(SeamTemplate.Profiles alongX, int step) {
        return step == 0 || SeamTemplate.nearBestStep(alongX, step);
    }

    /**
     * @return whether the combs of the tile rows agree with the shading every tile shares: true when the shading shows
     *     no step of its own ({@link SeamTemplate#shownStep}); else the common step must lie near the shown one and,
     *     with valleys, each tile row's seams at the valley of that row's own shading template
     *     ({@link SeamTemplate#valleyAt}): asked of tile rows cut at seams found from the shading alone (gain steps
     *     between tiles move a row's valley, and there the combs are strong)
     */
    private static boolean shadingAgrees(SeamTemplate.Profiles alongX, Volume image, List<Band> rows, Columns c,
            boolean valleys) {
        int shown = SeamTemplate.shownStep(alongX);
        if (shown < 0) {
            return true;
        }
        if (!SeamTemplate.near(shown, c.step())) {
            return false;
        }
        SeamComb.Period[] px = c.periods();
        for (int s = 0; s < px.length; s++) {
            int[] y = stripe(rows, s, image.height());
            if (valleys && px[s] != null && y[1] - y[0] >= SeamTemplate.BLOCK
                    && !SeamTemplate.valleyAt(image, y[0], y[1], px[s].pitch(), px[s].phase())) {
                return false;
            }
        }
        return true;
    }

    /** @return the lines {first, one past the last} of tile row s between the horizontal seams (bands left out) */
    private static int[] stripe(List<Band> rows, int s, int h) {
        int y0 = s == 0 ? 0 : rows.get(s - 1).end() + 1;
        int y1 = s == rows.size() ? h : rows.get(s).start() - 1;
        return new int[] {y0, Math.max(y0 + 1, y1)};
    }

    /** Vertical seams of each tile row and their common step (0 when none repeats). */
    private record Columns(List<Band> bands, SeamComb.Period[] periods, int[] phases, int blend, int step) {
    }

    /**
     * Vertical seams of each tile row, the rows cut by the horizontal seams found.
     *
     * @param pitch 0 to search all pitches; -1 for no comb (each tile row's lone seams); else the one pitch tried,
     *     with teeth that need only {@link #OTHER_AXIS} of the tooth limit
     */
    private static Columns columns(Volume image, List<Band> rows, double toothIn, double threshold, int stepWidth,
            int pitch) {
        int h = image.height();
        double tooth = pitch > 0 ? OTHER_AXIS * toothIn : toothIn;
        // tile rows: the stripes between horizontal seams, each searched on its own
        int[] cut = new int[rows.size() + 2];
        cut[0] = 0;
        for (int i = 0; i < rows.size(); i++) {
            cut[i + 1] = rows.get(i).centre();
        }
        cut[cut.length - 1] = h;
        int stripes = cut.length - 1;
        List<SeamEvidence> ex = new ArrayList<>();
        for (int s = 0; s < stripes; s++) {
            int[] y = stripe(rows, s, h);
            ex.add(SeamEvidence.of(image, true, y[0], y[1]));
        }
        SeamComb.Period[] px = pitch < 0 ? new SeamComb.Period[stripes] : commonPitch(ex, tooth, threshold, pitch);
        boolean anyRepeat = false;
        for (int s = 0; s < stripes; s++) {
            anyRepeat |= repeats(ex.get(s), px[s], tooth) != null;
        }
        if (!anyRepeat) {
            px = new SeamComb.Period[stripes];
        }
        claimRows(image, ex, px, rows);
        List<Band> cols = new ArrayList<>();
        int[] phases = new int[stripes];
        int blendX = 0;
        for (int s = 0; s < stripes; s++) {
            List<Band> found = px[s] != null
                    ? seams(ex.get(s), px[s], tooth, threshold, stepWidth, cut[s], cut[s + 1])
                    : lone(ex.get(s), threshold, stepWidth, cut[s], cut[s + 1]);
            phases[s] = px[s] == null ? -1 : px[s].phase();
            for (Band b : found) {
                if (b.looks().contains("blend")) {
                    blendX = Math.max(blendX, b.end() - b.start());
                }
            }
            cols.addAll(found);
        }
        int stepX = 0;
        for (SeamComb.Period p : px) {
            if (p != null) {
                stepX = p.pitch();
            }
        }
        return new Columns(mergeAlongRows(cols, h), px, phases, blendX, stepX);
    }

    /**
     * A tiling is a grid: a tile row without a comb of its own takes the step and phase of the tile rows with one
     * (when those agree, as in a row-by-row mosaic) if the shading every tile shares supports it
     * ({@link SeamTemplate#supports}) and every gap of zeros in the row lies on its teeth.
     */
    private static void claimRows(Volume image, List<SeamEvidence> ex, SeamComb.Period[] px, List<Band> rows) {
        SeamComb.Period found = null;
        for (SeamComb.Period p : px) {
            if (p != null && found != null && p.phase() != found.phase()) {
                return;
            }
            found = p != null ? p : found;
        }
        for (int s = 0; s < px.length && found != null; s++) {
            if (px[s] != null || !gapsOnTeeth(ex.get(s), found)) {
                continue;
            }
            int[] y = stripe(rows, s, image.height());
            if (y[1] - y[0] >= SeamTemplate.BLOCK && SeamTemplate.supports(image, y[0], y[1], found.pitch(),
                    found.phase())) {
                px[s] = new SeamComb.Period(found.pitch(), found.phase(), 0, 0, 0);
            }
        }
    }

    /** @return whether every gap of zeros along the evidence lies within 2 px of a tooth of the period */
    private static boolean gapsOnTeeth(SeamEvidence e, SeamComb.Period p) {
        for (int b = 0; b < e.length(); b++) {
            int d = Math.floorMod(b - p.phase(), p.pitch());
            if (e.zeros[b] >= 0.5 && (b == 0 || e.zeros[b - 1] < 0.5) && Math.min(d, p.pitch() - d) > 2) {
                return false;
            }
        }
        return true;
    }

    /**
     * @return the period when its evidence repeats at one exact offset from most teeth (a step or a corner), else
     *     null: a comb whose teeth only catch unrelated evidence within their one-pixel windows is no tiling
     */
    static SeamComb.Period repeats(SeamEvidence e, SeamComb.Period p, double tooth) {
        if (p == null || p.strong() == 0) {
            return p;
        }
        int[] b = p.borders(e.length());
        return repeating(e, e.step, b, tooth).length > 0 || repeating(e, e.kink, b, tooth).length > 0 ? p : null;
    }

    /**
     * One pitch for all stripes (the most strong teeth less empty ones over all stripes), each stripe with its own
     * phase.
     *
     * @param pitch 0 to search all pitches, else the only pitch tried (and kept)
     */
    static SeamComb.Period[] commonPitch(List<SeamEvidence> ex, double tooth, double threshold, int pitch) {
        int n = ex.get(0).length();
        SeamComb.Period[] best = null;
        for (int s = pitch > 0 ? pitch : SeamComb.MIN_PITCH; s < (pitch > 0 ? Math.min(n, pitch + 1) : n); s++) {
            SeamComb.Period[] at = combs(ex, s, 0, s - 1, 1, tooth, threshold);
            if (total(at) != null && better(at, best)) {
                best = at;
            }
        }
        if (best == null) {
            return new SeamComb.Period[ex.size()];
        }
        best = SeamComb.refine(ex, best, tooth, pitch > 0);
        // a stripe without a comb of its own takes the phase of the stripe two above or below (same direction)
        for (int i = 0; i < best.length; i++) {
            if (best[i] == null) {
                for (int j = i % 2; j < best.length; j += 2) {
                    if (best[j] != null && j != i) {
                        best[i] = new SeamComb.Period(best[j].pitch(), best[j].phase(), 0, 0, 0);
                        break;
                    }
                }
            }
        }
        return best;
    }

    /** The best comb of pitch s of each stripe, phases p0 .. p1 (taken modulo s), teeth looking window px aside. */
    private static SeamComb.Period[] combs(List<SeamEvidence> ex, int s, int p0, int p1, int window, double tooth,
            double threshold) {
        SeamComb.Period[] at = new SeamComb.Period[ex.size()];
        for (int i = 0; i < ex.size(); i++) {
            for (int p = p0; p <= p1; p++) {
                SeamComb.Period c = SeamComb.score(ex.get(i), s, Math.floorMod(p, s), window, tooth, threshold);
                if (c != null && c.better(at[i])) {
                    at[i] = c;
                }
            }
        }
        return at;
    }

    /** @return {strong teeth, summed evidence, teeth without evidence} over the stripes, or null if no comb */
    private static double[] total(SeamComb.Period[] at) {
        double strong = 0;
        double sum = 0;
        double empty = 0;
        boolean any = false;
        for (SeamComb.Period p : at) {
            if (p != null) {
                any = true;
                strong += p.strong();
                sum += p.sum();
                empty += p.teeth() - p.strong();
            }
        }
        return any ? new double[] {strong, sum, empty} : null;
    }

    private static boolean better(SeamComb.Period[] a, SeamComb.Period[] b) {
        if (b == null) {
            return true;
        }
        double[] ta = total(a);
        double[] tb = total(b);
        if (ta[0] - ta[2] != tb[0] - tb[2]) {
            return ta[0] - ta[2] > tb[0] - tb[2];
        }
        if (ta[0] != tb[0]) {
            return ta[0] > tb[0];
        }
        if (ta[2] != tb[2]) {
            return ta[2] < tb[2];
        }
        return ta[1] > tb[1] * (1 + 1e-9);
    }

    private static int pitchOf(SeamComb.Period[] at) {
        for (SeamComb.Period p : at) {
            if (p != null) {
                return p.pitch();
            }
        }
        return 0;
    }

    /** The shift of the odd stripes' phase against the even ones when it is the same for all, else -1. */
    static int snakeShift(int[] phases, int step) {
        if (phases.length < 2 || step <= 0) {
            return -1;
        }
        int shift = Integer.MIN_VALUE;
        for (int i = 1; i < phases.length; i++) {
            if (phases[i] < 0 || phases[i - 1] < 0) {
                return -1;
            }
            int d = Math.floorMod((i % 2 == 1 ? 1 : -1) * (phases[i] - phases[i - 1]), step);
            if (d > step / 2) {
                d -= step;
            }
            if (shift == Integer.MIN_VALUE) {
                shift = d;
            } else if (Math.abs(shift - d) > 1) {
                return -1;
            }
        }
        return shift == Integer.MIN_VALUE || shift == 0 ? -1 : Math.abs(shift);
    }

    /** The seam bands of a comb, over the lines [from, to). */
    static List<Band> seams(SeamEvidence e, SeamComb.Period p, double tooth, double threshold, int stepWidth, int from,
            int to) {
        int n = e.length();
        int[] borders = p.borders(n);
        int[] steps = repeating(e, e.step, borders, tooth);
        int[] kinks = repeating(e, e.kink, borders, tooth);
        List<Band> out = new ArrayList<>();
        for (int t : borders) {
            // the first and last tiles of a mosaic are whole, at least one step wide: a tooth closer than that to an
            // end is no seam unless it shows one
            int slack = SeamComb.END_SLACK;
            if ((n - t < p.pitch() - slack || t < p.pitch() - slack) && nearest(e, t, tooth) <= tooth) {
                continue;
            }
            out.add(band(e, t, steps, kinks, stepWidth, from, to));
        }
        return out;
    }

    /** @return the largest peak evidence within 2 pixels of t */
    private static double nearest(SeamEvidence e, int t, double tooth) {
        double m = 0;
        for (int d = -2; d <= 2; d++) {
            m = Math.max(m, e.peak(t + d, tooth));
        }
        return m;
    }

    /**
     * Offsets from the comb teeth (within {@link #MAX_BAND}) at which one kind of evidence repeats in most teeth,
     * one per group of neighbouring offsets (the offset of the largest summed evidence): the ends of a seam.
     */
    static int[] repeating(SeamEvidence e, double[] z, int[] borders, double tooth) {
        int n = e.length();
        double[] sum = new double[2 * MAX_BAND + 1];
        boolean[] rep = new boolean[sum.length];
        for (int o = -MAX_BAND; o <= MAX_BAND; o++) {
            int strong = 0;
            int teeth = 0;
            for (int b : borders) {
                int q = b + o;
                if (q > 0 && q < n) {
                    teeth++;
                    if (Math.abs(z[q]) > tooth && e.combStrength(q, tooth) > 0) {
                        strong++;
                        sum[o + MAX_BAND] += Math.abs(z[q]);
                    }
                }
            }
            rep[o + MAX_BAND] = teeth > 0 && strong >= SeamComb.STRONG_SHARE * teeth;
        }
        List<Integer> ends = new ArrayList<>();
        double top = 0;
        int i = 0;
        while (i < rep.length) {
            if (!rep[i]) {
                i++;
                continue;
            }
            int best = i;
            while (i < rep.length && rep[i]) {
                if (sum[i] > sum[best]) {
                    best = i;
                }
                i++;
            }
            ends.add(best - MAX_BAND);
            top = Math.max(top, sum[best]);
        }
        // an end much weaker than the strongest is the echo of removing the median of nearby steps
        final double strongest = top;
        ends.removeIf(o -> sum[o + MAX_BAND] < ECHO * strongest);
        // keep the ends that chain to the one nearest the tooth within MAX_BAND of each other
        if (ends.isEmpty()) {
            return new int[0];
        }
        int near = 0;
        for (int k = 1; k < ends.size(); k++) {
            if (Math.abs(ends.get(k)) < Math.abs(ends.get(near))) {
                near = k;
            }
        }
        if (Math.abs(ends.get(near)) > NEAR) {
            return new int[0];
        }
        int a = near;
        int b = near;
        while (a > 0 && ends.get(b) - ends.get(a - 1) <= MAX_BAND) {
            a--;
        }
        while (b < ends.size() - 1 && ends.get(b + 1) - ends.get(a) <= MAX_BAND) {
            b++;
        }
        return ends.subList(a, b + 1).stream().mapToInt(Integer::intValue).toArray();
    }

    /** The band of the seam at comb tooth t, from the repeating ends of steps and kinks. */
    private static Band band(SeamEvidence e, int t, int[] steps, int[] kinks, int stepWidth, int from, int to) {
        int n = e.length();
        int[] ends = steps.length > 0 ? steps : kinks;
        double strength = 0;
        for (int o : ends) {
            strength = Math.max(strength, e.strength(t + o));
        }
        int first = ends.length == 0 ? t : t + ends[0];
        int last = ends.length == 0 ? t : t + ends[ends.length - 1];
        // zeros of a gap near the seam widen the band to cover them
        boolean gap = false;
        for (int x = Math.max(0, first - 3); x < Math.min(n, last + 3); x++) {
            if (e.zeros[x] >= 0.5) {
                if (!gap) {
                    first = Math.min(first, x);
                }
                gap = true;
                first = Math.min(first, x);
                last = Math.max(last, x + 1);
            }
        }
        List<String> looks = new ArrayList<>();
        if (steps.length > 0 && !gap) {
            looks.add(steps.length >= 2 && e.step[t + steps[0]] * e.step[t + steps[steps.length - 1]] < 0 ? "band"
                    : "step");
        }
        if (kinks.length > 0) {
            looks.add("shading");
        }
        if (gap) {
            looks.add("gap");
        }
        if (steps.length == 0 && kinks.length >= 2) {
            looks.add("blend");
        }
        if (last - first < 2 && !gap) {
            // a lone border (a step or a corner): the requested width centred on it
            return new Band(Math.max(0, first - stepWidth / 2), Math.min(n, first - stepWidth / 2 + stepWidth),
                    strength, from, to, looks);
        }
        return new Band(first, last, strength, from, to, looks);
    }

    /** The blend bands of one axis as seams over the lines [from, to), marked "blend" and "noise" (their evidence). */
    private static List<Band> blendBands(BlendBands.Axis a, int from, int to) {
        List<Band> out = new ArrayList<>();
        for (int i = 0; i < a.starts().length; i++) {
            out.add(new Band(a.starts()[i], a.starts()[i] + a.width(), a.z()[i], from, to, List.of("blend", "noise")));
        }
        return out;
    }

    /** @return whether the band's border cuts an axis of length n into two tiles of its step plus an overlap */
    private static boolean halves(Band b, int n) {
        int at = b.looks().contains("gap") ? b.start() : b.centre();
        return at >= SeamComb.MIN_PITCH && n - 2 * at >= 0 && n - 2 * at <= MAX_BAND;
    }

    /** @return the border of each band found so far (a gap's first zero, else its centre), ascending: anchors for a fold */
    private static int[] anchors(List<Band> bands) {
        return bands.stream().mapToInt(b -> b.looks().contains("gap") ? b.start() : b.centre()).distinct().sorted()
                .toArray();
    }

    /**
     * The bands found so far plus a band of the requested width at every seam of the fold that none of them covers
     * (within 2 px); the first and last tiles are whole, at least one step wide.
     */
    private static List<Band> withTeeth(List<Band> found, SeamTemplate.Fold f, int n, int stepWidth, int from,
            int to) {
        List<Band> out = new ArrayList<>(found);
        for (int seam = f.phase(); seam < n; seam += f.pitch()) {
            final int b = seam;
            if (b < f.pitch() - SeamComb.END_SLACK || n - b < f.pitch() - SeamComb.END_SLACK) {
                continue;
            }
            // the lines of [from, to) no band found so far covers at this seam (a tile row may have found it alone)
            List<Band> here = found.stream().filter(o -> b >= o.start() - 2 && b <= o.end() + 2)
                    .sorted((x, y) -> Integer.compare(x.from(), y.from())).toList();
            int line = from;
            for (Band o : here) {
                if (o.from() > line) {
                    out.add(toothBand(b, n, stepWidth, f.corner(), line, o.from()));
                }
                line = Math.max(line, o.to());
            }
            if (line < to) {
                out.add(toothBand(b, n, stepWidth, f.corner(), line, to));
            }
        }
        out.sort((x, y) -> x.start() != y.start() ? Integer.compare(x.start(), y.start()) : Integer.compare(x.from(),
                y.from()));
        return out;
    }

    /** @return whether a vertical band (widened by a pixel) covers a column that is zero in most of its lines */
    private static boolean coversGap(Volume image, Band b) {
        int w = image.width();
        int y1 = Math.min(image.height(), b.to());
        float[] f = image.data();
        for (int x = Math.max(0, b.start() - 1); x < Math.min(w, b.end() + 1); x++) {
            int zeros = 0;
            for (int y = b.from(); y < y1; y++) {
                zeros += f[y * w + x] == 0 ? 1 : 0;
            }
            if (2 * zeros > y1 - b.from()) {
                return true;
            }
        }
        return false;
    }

    /** A band of the requested width centred on the fold's seam b, over the lines [from, to). */
    private static Band toothBand(int b, int n, int stepWidth, double strength, int from, int to) {
        return new Band(Math.max(0, b - stepWidth / 2), Math.min(n, b - stepWidth / 2 + stepWidth), strength, from, to,
                List.of("shading"));
    }

    /**
     * Without a period: the strong edges that are not narrow lines, each a band of the requested width. Without the
     * support of repeating teeth an edge must exceed {@link #LONE} times the threshold (structure that runs along a
     * line gives evidence of the size of the threshold now and then).
     */
    static List<Band> lone(SeamEvidence e, double thresholdIn, int stepWidth, int from, int to) {
        double threshold = LONE * thresholdIn;
        int n = e.length();
        List<Band> out = new ArrayList<>();
        for (int b = 1; b < n; b++) {
            double s = e.combStrength(b, threshold / 2);
            if (s > threshold && s >= e.combStrength(b - 1, threshold / 2) && s >= e.combStrength(b + 1 < n ? b + 1 : b,
                    threshold / 2)) {
                if (!out.isEmpty() && b - out.get(out.size() - 1).centre() <= MAX_BAND) {
                    continue;
                }
                List<String> looks = new ArrayList<>();
                looks.add(Math.abs(e.step[b]) >= Math.abs(e.kink[b]) ? "step" : "shading");
                out.add(new Band(Math.max(0, b - stepWidth / 2), Math.min(n, b - stepWidth / 2 + stepWidth), s, from,
                        to, looks));
            }
        }
        return out;
    }

    /** Bands at the same position in every stripe become one band over the whole height. */
    private static List<Band> mergeAlongRows(List<Band> cols, int h) {
        List<Band> out = new ArrayList<>();
        boolean[] used = new boolean[cols.size()];
        for (int i = 0; i < cols.size(); i++) {
            if (used[i]) {
                continue;
            }
            Band a = cols.get(i);
            int from = a.from();
            int to = a.to();
            double strength = a.strength();
            List<String> looks = new ArrayList<>(a.looks());
            for (int j = i + 1; j < cols.size(); j++) {
                Band b = cols.get(j);
                if (!used[j] && b.start() == a.start() && b.end() == a.end() && b.from() == to) {
                    used[j] = true;
                    to = b.to();
                    strength = Math.max(strength, b.strength());
                    for (String l : b.looks()) {
                        if (!looks.contains(l)) {
                            looks.add(l);
                        }
                    }
                }
            }
            out.add(new Band(a.start(), a.end(), strength, from, to, looks));
        }
        out.sort((x, y) -> x.start() != y.start() ? Integer.compare(x.start(), y.start()) : Integer.compare(x.from(),
                y.from()));
        return out;
    }

    /** Strong evidence more than 2 pixels from every seam band: lines that do not repeat with the tile step. */
    static List<Line> lines(SeamEvidence e, List<Band> seams, double threshold) {
        int n = e.length();
        List<Line> out = new ArrayList<>();
        for (int b = 1; b < n; b++) {
            if (e.strength(b) <= threshold || nearSeam(b, seams)) {
                continue;
            }
            int wdt = e.narrowLine(b, threshold / 2);
            double s = e.strength(b);
            if (wdt > 0) {
                s = Math.max(s, e.strength(b + wdt));
            }
            if (!out.isEmpty()) {
                Line prev = out.get(out.size() - 1);
                if (b <= prev.position() + Math.max(prev.width(), 2)) {
                    continue;
                }
            }
            out.add(new Line(b, wdt, s));
        }
        return out;
    }

    private static boolean nearSeam(int b, List<Band> seams) {
        for (Band s : seams) {
            if (b >= s.start() - 2 && b <= s.end() + 2) {
                return true;
            }
        }
        return false;
    }

    /** @return the positions of the bands' centres, ascending, without repeats */
    static int[] centres(List<Band> bands) {
        return bands.stream().mapToInt(Band::centre).distinct().sorted().toArray();
    }

    /** @return a copy of the array as text, for messages */
    static String text(int[] a) {
        return Arrays.toString(a);
    }
}
