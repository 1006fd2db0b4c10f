package org.stackwright.repair;

import static org.stackwright.repair.SeamDetector.OTHER_AXIS;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;
import org.stackwright.volume.Volume;

/**
 * Vertical seams, searched in each tile row on its own (the stripes between the horizontal seams found) with one
 * common step: the rows of a snake-order mosaic with overlap, whose seams are shifted by the overlap, get their own
 * phase, and the shift gives the overlap ({@link #snakeShift}). Seams at the same place in every row are merged into
 * one band over the whole height.
 */
final class TileRowSeams {

    private TileRowSeams() {
    }

    /** @return the lines {first, one past the last} of tile row s between the horizontal seams (bands left out) */
    static int[] stripe(List<Band> rows, int s, int h) {
        int y0 = s == 0 ? 0 : rows.get(s - 1).end() + 1;
        int y1 = s == rows.size() ? h : rows.get(s).start() - 1;
        return new int[] {y0, Math.max(y0 + 1, y1)};
    }

    /** Vertical seams of each tile row and their common step (0 when none repeats). */
    record Columns(List<Band> bands, SeamComb.Period[] periods, int[] phases, int blend, int step) {
    }

    /**
     * Vertical seams of each tile row, the rows cut by the horizontal seams found.
     *
     * @param pitch 0 to search all pitches; -1 for no comb (each tile row's lone seams); else the one pitch tried,
     *     with teeth that need only {@link SeamDetector#OTHER_AXIS} of the tooth limit
     */
    static Columns columns(Volume image, ShadingRules shading, List<Band> rows, double toothIn, double threshold,
            int stepWidth, int pitch) {
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
            ex.add(SeamEvidence.of(image, true, y[0], y[1], !rows.isEmpty()));
        }
        SeamComb.Period[] px = pitch < 0 ? new SeamComb.Period[stripes] : commonPitch(ex, tooth, threshold, pitch);
        for (int s = 0; s < stripes; s++) {
            // a comb that does not fit the tilings the gaps of zeros admit caught stray steps
            if (px[s] != null && !GapTiling.admits(ex.get(s), px[s])) {
                px[s] = null;
            }
        }
        boolean anyRepeat = false;
        for (int s = 0; s < stripes; s++) {
            anyRepeat |= CombBands.repeats(ex.get(s), px[s], tooth) != null;
        }
        if (!anyRepeat) {
            px = new SeamComb.Period[stripes];
        }
        confirmRows(ex, px, tooth);
        nearOthers(ex, px, tooth, threshold);
        snakeRows(ex, px, tooth);
        shading.claimRows(ex, px, rows);
        shading.claimShifted(ex, px, rows, tooth, threshold);
        sameParity(px);
        List<Band> cols = new ArrayList<>();
        int[] phases = new int[stripes];
        int blendX = 0;
        for (int s = 0; s < stripes; s++) {
            List<Band> found = px[s] != null
                    ? CombBands.seams(ex.get(s), px[s], tooth, threshold, stepWidth, cut[s], cut[s + 1])
                    : LoneEdges.lone(ex.get(s), threshold, stepWidth, cut[s], cut[s + 1]);
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
     * A tiling is a grid: a tile row without a comb of its own takes the step and phase the other tile rows agree on
     * (as in a row-by-row mosaic) when its own steps confirm them there: with no search over pitches and phases, the
     * comb at those teeth needs one strong tooth and its teeth together (Stouffer's sum over their number) above the
     * tooth limit, not the seam limit. A snake's shifted row has nothing at the other rows' teeth.
     */
    static void confirmRows(List<SeamEvidence> ex, SeamComb.Period[] px, double tooth) {
        SeamComb.Period found = agreed(px);
        for (int s = 0; s < px.length && found != null; s++) {
            if (px[s] == null && (SeamComb.score(ex.get(s), found.pitch(), found.phase(), 1, tooth, tooth, 1) != null
                    || gridRow(ex.get(s), found, tooth))) {
                px[s] = new SeamComb.Period(found.pitch(), found.phase(), 0, 0, 0);
            }
        }
    }

    /**
     * @return whether a tile row whose own steps are too faint to confirm the agreed comb is still better read as a
     *     row of the grid than as a snake's shifted row: its evidence at the agreed teeth is positive and, when a
     *     snake shift is possible, larger than at every phase shifted by 3 px up to {@link SeamDetector#MAX_BAND}
     *     (a covered overlap, as {@link #snakeRows} and {@link #snakeStands} read one). An uncropped image exactly a
     *     whole number of steps wide, or wider by less than 3 px or more than that band, has no covered overlap,
     *     hence no snake shift: every tile row of a grid has its seams.
     */
    static boolean gridRow(SeamEvidence e, SeamComb.Period found, double tooth) {
        int pitch = found.pitch();
        double here = teethSum(e, pitch, found.phase(), tooth);
        if (here <= 0) {
            return false;
        }
        int over = Math.floorMod(e.length(), pitch);
        if (!SeamComb.freePhase() && (over < 3 || over > SeamDetector.MAX_BAND)) {
            return true;
        }
        for (int d = 3; d <= SeamDetector.MAX_BAND && 2 * d < pitch; d++) {
            for (int sign = -1; sign <= 1; sign += 2) {
                if (teethSum(e, pitch, Math.floorMod(found.phase() + sign * d, pitch), tooth) >= here) {
                    return false;
                }
            }
        }
        return true;
    }

    /** @return the peak evidence summed over the teeth of comb (pitch, phase), each looking a pixel aside */
    static double teethSum(SeamEvidence e, int pitch, int phase, double tooth) {
        double sum = 0;
        for (int b : new SeamComb.Period(pitch, phase, 0, 0, 0).borders(e.length())) {
            double t = 0;
            for (int d = -1; d <= 1; d++) {
                t = Math.max(t, e.peak(b + d, tooth));
            }
            sum += t;
        }
        return sum;
    }

    /** @return the comb of the tile rows that have one when all of them share its phase, else null */
    static SeamComb.Period agreed(SeamComb.Period[] px) {
        SeamComb.Period found = null;
        for (SeamComb.Period p : px) {
            if (p != null && found != null && p.phase() != found.phase()) {
                return null;
            }
            found = p != null ? p : found;
        }
        return found;
    }

    /**
     * @return whether the comb of some tile row has two teeth that are seams on their own: steps above the seam
     *     limit that keep their sign along the tile row ({@link SeamEvidence}, one tile per stripe). Such a comb
     *     stands on the gain steps between tiles and needs no support from the shading.
     */
    static boolean standsOnSteps(Volume image, List<Band> rows, Columns c, double threshold) {
        SeamComb.Period[] px = c.periods();
        for (int s = 0; s < px.length; s++) {
            if (px[s] == null) {
                continue;
            }
            int[] y = stripe(rows, s, image.height());
            SeamEvidence e = SeamEvidence.of(image, true, y[0], y[1], !rows.isEmpty());
            int seams = 0;
            for (int b : px[s].borders(e.length())) {
                double t = 0;
                for (int d = -1; d <= 1; d++) {
                    t = Math.max(t, e.peak(b + d, threshold / 2));
                }
                seams += t > threshold ? 1 : 0;
            }
            if (seams >= 2) {
                return true;
            }
        }
        return false;
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
        sameParity(best);
        return best;
    }

    /**
     * A stripe without a comb of its own (tooth limit toothIn, the one its comb search used) takes one of the common
     * pitch at a phase near the other stripes' (within {@link SeamDetector#MAX_BAND}: the tiles of a grid move only
     * by an overlap from row to row, as the rows of a snake order do) when its own evidence shows one: with the pitch
     * known and the phase nearly so, its teeth need only {@link SeamDetector#OTHER_AXIS} of the tooth limit, as for
     * one pitch tried along the other axis. Gaps of zeros in the stripe must lie on its teeth.
     */
    static void nearOthers(List<SeamEvidence> ex, SeamComb.Period[] px, double toothIn, double threshold) {
        double tooth = OTHER_AXIS * toothIn;
        SeamComb.Period[] own = px.clone();
        for (int i = 0; i < px.length; i++) {
            if (px[i] != null) {
                continue;
            }
            SeamComb.Period best = null;
            for (SeamComb.Period other : own) {
                if (other == null) {
                    continue;
                }
                int s = other.pitch();
                for (int d = -SeamDetector.MAX_BAND; d <= SeamDetector.MAX_BAND && 2 * d < s; d++) {
                    int ph = Math.floorMod(other.phase() + d, s);
                    SeamComb.Period c = SeamComb.score(ex.get(i), s, ph, 1, tooth, threshold);
                    if (c != null && c.better(best) && ShadingRules.gapsOnTeeth(ex.get(i), c)) {
                        best = c;
                    }
                }
            }
            if (best != null) {
                px[i] = SeamComb.refine(List.of(ex.get(i)), new SeamComb.Period[] {best}, tooth, true)[0];
            }
        }
    }

    /**
     * A snake order moves the seams of the tile rows placed right to left by the overlap: there the left tile is
     * placed later and covers the overlap, so the visible border lies at its end. The image is the tiles' bounding
     * box, a whole number of steps plus one overlap wide (the last tile is whole): the rows placed left to right have
     * their seams at whole steps from the left edge (phase 0), the others at the overlap, the length past the last
     * whole step (phase n mod step). A stripe without a comb of its own, when the stripes with one are all of the
     * other parity and share one of these two phases (within a pixel), takes the common pitch at the other phase
     * (within a pixel) where its own steps show the seams: one tooth above the tooth limit and its teeth together
     * (Stouffer's sum) above it too, as {@link #confirmRows} asks of a comb tried with no search (the phase is given
     * by the width, not searched); its phase refined on the exact borders. Off when the length past the last step is
     * under 3 px or over {@link SeamDetector#MAX_BAND} (no overlap, or not a covered one). A trimmed mosaic's width
     * gives no overlap: there {@link #shiftedRows} searches the shift.
     */
    static void snakeRows(List<SeamEvidence> ex, SeamComb.Period[] px, double tooth) {
        SeamComb.Period found = agreed(px);
        if (found == null) {
            return;
        }
        int parity = -1;
        for (int s = 0; s < px.length; s++) {
            if (px[s] != null && px[s].strong() > 0) {
                if (parity >= 0 && parity != s % 2) {
                    return;
                }
                parity = s % 2;
            }
        }
        int pitch = found.pitch();
        if (parity >= 0 && SeamComb.freePhase()) {
            shiftedRows(ex, px, found, parity, tooth);
            return;
        }
        int overlap = Math.floorMod(ex.get(0).length(), pitch);
        if (parity < 0 || overlap < 3 || overlap > SeamDetector.MAX_BAND) {
            return;
        }
        boolean atEdge = within1(found.phase(), 0, pitch);
        if (atEdge == within1(found.phase(), overlap, pitch)) {
            return;
        }
        int target = atEdge ? overlap : 0;
        for (int s = 0; s < px.length; s++) {
            if (px[s] != null || s % 2 == parity) {
                continue;
            }
            SeamComb.Period best = null;
            for (int d = -1; d <= 1; d++) {
                SeamComb.Period c = SeamComb.score(ex.get(s), pitch, Math.floorMod(target + d, pitch), 1, tooth,
                        tooth, 1);
                if (c != null && c.better(best) && ShadingRules.gapsOnTeeth(ex.get(s), c)) {
                    best = c;
                }
            }
            if (best != null) {
                px[s] = SeamComb.refine(List.of(ex.get(s)), new SeamComb.Period[] {best}, tooth, true)[0];
            }
        }
    }

    /**
     * The shifted tile rows of a snake in a trimmed mosaic ({@link SeamComb#freePhase}): its width no longer gives
     * the overlap, so a stripe without a comb of its own, the stripes with one all of the other parity and sharing a
     * phase, tries the common pitch at every phase shifted by 3 px up to {@link SeamDetector#MAX_BAND} either way (a
     * covered overlap, as {@link #snakeStands} reads one; the direction of the shift depends on which parity was
     * placed right to left). Its own steps must show the seams there as {@link #snakeRows} asks (one tooth above the
     * tooth limit, the teeth together above it), and more evidence than at the other rows' phase and at every other
     * shift (as {@link #gridRow} weighs them): the best of some forty phases tried, not one given by the width.
     */
    static void shiftedRows(List<SeamEvidence> ex, SeamComb.Period[] px, SeamComb.Period found, int parity,
            double tooth) {
        int pitch = found.pitch();
        for (int s = 0; s < px.length; s++) {
            if (px[s] != null || s % 2 == parity) {
                continue;
            }
            SeamEvidence e = ex.get(s);
            int bestPh = -1;
            double bestSum = teethSum(e, pitch, found.phase(), tooth);
            for (int d = 3; d <= SeamDetector.MAX_BAND && 2 * d < pitch; d++) {
                for (int sign = -1; sign <= 1; sign += 2) {
                    int ph = Math.floorMod(found.phase() + sign * d, pitch);
                    double sum = teethSum(e, pitch, ph, tooth);
                    if (sum > bestSum) {
                        bestSum = sum;
                        bestPh = ph;
                    }
                }
            }
            if (bestPh < 0) {
                continue;
            }
            SeamComb.Period c = SeamComb.score(e, pitch, bestPh, 1, tooth, tooth, 1);
            if (c != null && ShadingRules.gapsOnTeeth(e, c)) {
                px[s] = SeamComb.refine(List.of(e), new SeamComb.Period[] {c}, tooth, true)[0];
            }
        }
    }

    /** @return whether phases a and b of a comb of pitch s lie within a pixel of each other (circularly) */
    private static boolean within1(int a, int b, int s) {
        int d = Math.floorMod(a - b, s);
        return Math.min(d, s - d) <= 1;
    }

    /**
     * A stripe still without a comb takes the phase of a stripe two, four, ... above or below (the same direction
     * in a snake order) that has one.
     */
    private static void sameParity(SeamComb.Period[] px) {
        SeamComb.Period[] had = px.clone();
        for (int i = 0; i < px.length; i++) {
            for (int j = i % 2; j < px.length && px[i] == null; j += 2) {
                if (had[j] != null && j != i) {
                    px[i] = new SeamComb.Period(had[j].pitch(), had[j].phase(), 0, 0, 0);
                }
            }
        }
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

    /**
     * @return whether the tile rows' combs make a snake order on their own steps, which needs no support from the
     *     shading's step: every tile row has a comb with a strong tooth of its own, the rows of each parity share a
     *     phase, and the odd rows are shifted against the even ones by one common shift of 3 px up to
     *     {@link SeamDetector#MAX_BAND} (a covered overlap, {@link #snakeShift}); stray steps of the specimen do not
     *     line up so in every row. The shading's step, when it shows one, must lie near the step or near the step plus
     *     that shift: the tiles of a snake's two directions show their shading shifted by the overlap, and the fold
     *     over the whole image then prefers the tile width (measured: 112 for step 100 and overlap 12 on a tune draw).
     */
    static boolean snakeStands(Columns c, int shown) {
        SeamComb.Period[] px = c.periods();
        if (px.length < 2 || c.step() <= 0) {
            return false;
        }
        for (SeamComb.Period p : px) {
            if (p == null || p.strong() < 1) {
                return false;
            }
        }
        int shift = snakeShift(c.phases(), c.step());
        if (shift < 3 || shift > SeamDetector.MAX_BAND) {
            return false;
        }
        return shown < 0 || SeamTemplate.near(shown, c.step()) || SeamTemplate.near(shown, c.step() + shift)
                || shown > c.step() && shown < c.step() + shift;
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

    /**
     * The vertical seams of a snake grid found in blocks of single tiles ({@link SnakeBlocks}): in each tile row (the
     * stripes between the horizontal seams' centres) a band of width stepWidth at every tooth, shifted in the rows of
     * the shifted parity; each row with its comb and phase.
     */
    static Columns snake(List<Band> rows, SnakeBlocks.Snake sn, double tooth, int stepWidth, int w, int h,
            int blend) {
        int stripes = rows.size() + 1;
        SeamComb.Period[] px = new SeamComb.Period[stripes];
        int[] phases = new int[stripes];
        int strong = 0;
        double sum = 0;
        for (double z : sn.z()) {
            strong += z > tooth ? 1 : 0;
            sum += Math.max(0, z);
        }
        List<Band> cols = new ArrayList<>();
        for (int s = 0; s < stripes; s++) {
            int from = s == 0 ? 0 : rows.get(s - 1).centre();
            int to = s == rows.size() ? h : rows.get(s).centre();
            int shift = s % 2 == sn.parity() ? sn.shift() : 0;
            for (int i = 0; i < sn.teeth().length; i++) {
                int b = sn.teeth()[i] + shift;
                cols.add(new Band(Math.max(0, b - stepWidth / 2), Math.min(w, b - stepWidth / 2 + stepWidth),
                        sn.z()[i], from, to, List.of("step")));
            }
            phases[s] = Math.floorMod(sn.teeth()[0] + shift, sn.step());
            px[s] = new SeamComb.Period(sn.step(), phases[s], strong, sn.teeth().length, sum);
        }
        return new Columns(mergeAlongRows(cols, h), px, phases, blend, sn.step());
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
}
