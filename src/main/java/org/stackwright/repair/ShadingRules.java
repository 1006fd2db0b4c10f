package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;
import org.stackwright.repair.TileRowSeams.Columns;
import org.stackwright.volume.Volume;

/**
 * The rules that weigh the seams found from steps against the shading every tile shares ({@link SeamTemplate}), for
 * one detection: combs of short tile rows must agree with a step the shading shows, a tile row without a comb may
 * claim the other rows' comb where the shading supports it, a fold of the shading must be backed by the image
 * bending at its borders more than between them ({@link #backed}), and it adds a seam at every tooth that no band
 * covers. The shading's profiles along x are made once, when a rule first needs them, and their best step
 * ({@link SeamTemplate#bestStep}) is searched once.
 */
final class ShadingRules {

    /**
     * the least shift of a fold's teeth in its circular-shift test: the two straight-line fits of a corner reach
     * {@link SeamTemplate#FIT} px on either side of a tooth, looked for within 2 px (our choice, no source)
     */
    static final int SHIFT = SeamTemplate.FIT + 2;
    /** shifts the test needs: a fold of a smaller step cannot be told from a smooth field */
    static final int MIN_SHIFTS = 8;
    /**
     * the bend at a fold's teeth must exceed the median bend of its shifts by this many of their robust sigmas: a
     * lenient one-sided test (a smooth field passes it about one time in nine), because the template's score and
     * corner have already been passed; on {@code InventedMosaic}'s shading-only mosaics (seeds 44-53) true folds
     * measured 1.4 to 11.5, on single tiles of the independent generator false folds -1.7 to 2.2 (our measurement)
     */
    static final double BEND_Z = 1.25;

    private final Volume image;
    private SeamTemplate.Profiles alongX;
    private SeamTemplate.Profiles alongY;

    /** @param image the image or stack the detection runs on, not modified */
    ShadingRules(Volume image) {
        this.image = image;
    }

    /** @return the shading's block profiles along x, made when a rule first needs them (they are read only) */
    SeamTemplate.Profiles alongX() {
        if (alongX == null) {
            alongX = SeamTemplate.profiles(image, true);
        }
        return alongX;
    }

    /** @return the shading's block profiles along y, made when a rule first needs them (they are read only) */
    SeamTemplate.Profiles alongY() {
        if (alongY == null) {
            alongY = SeamTemplate.profiles(image, false);
        }
        return alongY;
    }

    /** @return whether a step along x is 0 or near the best step of the shading template along x */
    boolean nearBest(int step) {
        return step == 0 || SeamTemplate.nearBestStep(alongX(), step);
    }

    /**
     * The pitches a trimmed grid of vertical seams may take ({@link GridBlocks#trimmed}, {@link SnakeBlocks#trimmed}):
     * where the shading every tile shares shows a step S along x ({@link SeamTemplate#shownStep}), those nearer S
     * than its double or its half, over (2 S / 3, 3 S / 2). The shading's step is not exact (measured on the trimmed
     * 3 x 4 draws a-steps of crop-tune and crop-tune2: 95 to 117 for 100 and 110, a tenth off at most), but it tells
     * the tile from two tiles: a trimmed comb of two teeth, both strong, at twice the step outranks the true comb
     * whose middle seam shows no step (measured: crop-tune2 a-steps-s30004 took 200, a snake of 224, for 100). A
     * trimmed grid of a pitch outside is taken only where no grid within passes: the shading's step may be a fraction
     * of the tile (crop-tune e-lines-s7404: 53 for 130).
     *
     * @return {lowest, highest} pitch, or null when the shading shows no step along x
     */
    int[] pitchesX() {
        int shown = SeamTemplate.shownStep(alongX());
        return shown < 0 ? null : new int[] {2 * shown / 3 + 1, (3 * shown - 1) / 2};
    }

    /** @return whether pitch s lies within {@link #pitchesX} (true when the shading shows no step along x) */
    boolean withinPitchesX(int s) {
        int[] r = pitchesX();
        return r == null || s >= r[0] && s <= r[1];
    }

    /**
     * @return whether the combs of the tile rows agree with the shading every tile shares: true when the shading shows
     *     no step of its own ({@link SeamTemplate#shownStep}); else the common step must lie near the shown one and,
     *     with valleys, each tile row's seams at the valley of that row's own shading template
     *     ({@link SeamTemplate#valleyAt}): asked of tile rows cut at seams found from the shading alone (gain steps
     *     between tiles move a row's valley, and there the combs are strong)
     */
    boolean agree(List<Band> rows, Columns c, boolean valleys) {
        int shown = SeamTemplate.shownStep(alongX());
        if (shown < 0) {
            return true;
        }
        if (!SeamTemplate.near(shown, c.step())) {
            return false;
        }
        SeamComb.Period[] px = c.periods();
        for (int s = 0; s < px.length; s++) {
            int[] y = TileRowSeams.stripe(rows, s, image.height());
            if (valleys && px[s] != null && y[1] - y[0] >= SeamTemplate.BLOCK
                    && !SeamTemplate.valleyAt(image, y[0], y[1], px[s].pitch(), px[s].phase())) {
                return false;
            }
        }
        return true;
    }

    /**
     * A tiling is a grid: a tile row without a comb of its own takes the step and phase of the tile rows with one
     * (when those agree, as in a row-by-row mosaic) if the shading every tile shares supports it
     * ({@link SeamTemplate#supports}) and every gap of zeros in the row lies on its teeth.
     */
    void claimRows(List<SeamEvidence> ex, SeamComb.Period[] px, List<Band> rows) {
        SeamComb.Period found = TileRowSeams.agreed(px);
        for (int s = 0; s < px.length && found != null; s++) {
            if (px[s] != null || !gapsOnTeeth(ex.get(s), found)) {
                continue;
            }
            int[] y = TileRowSeams.stripe(rows, s, image.height());
            if (y[1] - y[0] >= SeamTemplate.BLOCK && SeamTemplate.supports(alongX(), image, y[0], y[1],
                    found.pitch(), found.phase())) {
                px[s] = new SeamComb.Period(found.pitch(), found.phase(), 0, 0, 0);
            }
        }
    }

    /**
     * Whether the image itself bends at the borders of a fold, more than at the same tiling shifted elsewhere. The
     * template's own tests cannot tell: folded at any step, a smooth falloff over the whole image (one tile's
     * vignetting, the specimen's trend) gives a template that predicts the held-out tiles (the falloff runs the same
     * way in all of them), and a template that is the arc of a concave falloff, repeated, has a valley at its border
     * like a seam; but the image is smooth there. The bend of a border is the corner of the shading's block profiles
     * across it (the slope of a straight line over the {@link SeamTemplate#FIT} positions after it minus that over the
     * FIT before), its median over the blocks and the fold's inner seams, the largest within 2 px; the fold is backed
     * when that exceeds the median bend of the same teeth shifted by {@link #SHIFT} px or more by {@link #BEND_Z}
     * robust sigmas (1.4826 MAD) of the shifts' bends (a circular-shift test, as for a period in a series: a smooth
     * field bends about as much at the teeth as between them, tiles darkened towards their borders bend up at every
     * border, in the same place). A fold whose inner seams all lie in gaps of zeros is backed by the gaps; a step too
     * small for {@link #MIN_SHIFTS} shifts is not backed.
     */
    static boolean backed(SeamTemplate.Profiles p, SeamTemplate.Fold f) {
        int s = f.pitch();
        double at = bend(p, s, f.phase());
        if (Double.isNaN(at)) {
            return true;
        }
        double[] others = new double[s];
        int m = 0;
        for (int shift = SHIFT; shift <= s - SHIFT; shift++) {
            double o = bend(p, s, f.phase() + shift);
            if (!Double.isNaN(o)) {
                others[m++] = o;
            }
        }
        if (m < MIN_SHIFTS) {
            return false;
        }
        double[] ms = RobustStats.medianSigma(others, m);
        double z = ms[1] > 0 ? (at - ms[0]) / ms[1] : 0;
        return z >= BEND_Z;
    }

    /**
     * Whether a fold predicts every held-out group of tiles, not only their sum ({@link SeamTemplate#worstFold} at
     * least {@link SeamTemplate#SCORE}, the fold's own score limit); asked of a fold that is the only evidence of a
     * tiling (no seam seen along its axis, none found along the other): there one smooth falloff over the whole image
     * (a single tile's vignetting) is the other reading, and cut into tiles its middle tile is a cap the outer ones
     * (slopes) do not predict, while a shading that repeats is predicted in every tile. Where a seam shows, the
     * tiling is not in doubt and tiles whose shading differs (a snake's reversed rows) may fall short. Measured (our
     * measurement): false folds of one-tile draws of the independent generator f-single-s7505 -0.083 (y) and s7509
     * 0.011 (x); true folds on {@code InventedMosaic}'s 3x3 shading-only sweep (seeds 44-63) 0.086 to 0.20; true folds
     * below the limit: e-lines-s7415 x -0.069 (not asked: its other axis shows a seam), the own snake sweep's seed 55
     * x 0.021 (not asked: a gap shows); asked of every fold without a seam seen along its axis, the test lost s7415.
     */
    static boolean predictsEveryTile(SeamTemplate.Profiles p, SeamTemplate.Fold f) {
        return SeamTemplate.worstFold(p, f.pitch(), f.phase()) >= SeamTemplate.SCORE;
    }

    /**
     * @return the largest, over offsets of up to 2 px, of the median corner of the block profiles at the inner seams
     *     of step s, phase ph (where both fits see valid positions only), NaN where no seam has valid fits
     */
    private static double bend(SeamTemplate.Profiles p, int s, int ph) {
        int n = p.length();
        int fit = SeamTemplate.FIT;
        double[] k = new double[p.m.length * (n / s + 2)];
        double best = Double.NaN;
        for (int d = -2; d <= 2; d++) {
            int m = 0;
            for (int b = Math.floorMod(ph, s) + d; b < n; b += s) {
                if (b - d < s - SeamComb.END_SLACK || n - b + d < s - SeamComb.END_SLACK || b < fit
                        || b + fit > n || !allValid(p.valid, b - fit, b + fit)) {
                    continue;
                }
                for (double[] row : p.m) {
                    k[m++] = slope(row, b) - slope(row, b - fit);
                }
            }
            if (m > 0) {
                double med = SeamTemplate.select(k, m);
                best = Double.isNaN(best) ? med : Math.max(best, med);
            }
        }
        return best;
    }

    /** @return the slope of a least-squares straight line through row[from .. from + FIT) */
    static double slope(double[] row, int from) {
        int fit = SeamTemplate.FIT;
        double mt = 0.5 * (fit - 1);
        double num = 0;
        double den = 0;
        for (int d = 0; d < fit; d++) {
            num += (d - mt) * row[from + d];
            den += (d - mt) * (d - mt);
        }
        return num / den;
    }

    private static boolean allValid(boolean[] valid, int from, int to) {
        for (int i = from; i < to; i++) {
            if (!valid[i]) {
                return false;
            }
        }
        return true;
    }

    /**
     * A tile row still without a comb, whose shading does not put its tile borders at the other rows' phase (a snake
     * row, shifted by the overlap, whose seams are too faint for a comb): the common pitch at a phase within
     * {@link SeamDetector#MAX_BAND} of theirs where one tooth shows a seam by itself (evidence above the threshold)
     * and the row's own shading template has its valley ({@link SeamTemplate#valleyAt}); the strongest such tooth.
     */
    void claimShifted(List<SeamEvidence> ex, SeamComb.Period[] px, List<Band> rows, double tooth, double threshold) {
        SeamComb.Period found = TileRowSeams.agreed(px);
        for (int s = 0; s < px.length && found != null; s++) {
            int[] y = TileRowSeams.stripe(rows, s, image.height());
            int pitch = found.pitch();
            if (px[s] != null || y[1] - y[0] < SeamTemplate.BLOCK
                    || SeamTemplate.valleyAt(image, y[0], y[1], pitch, found.phase())) {
                continue;
            }
            SeamEvidence e = ex.get(s);
            double top = threshold;
            int best = -1;
            for (int b = 0; b < e.length(); b++) {
                int d = Math.floorMod(b - found.phase(), pitch);
                int shift = Math.min(d, pitch - d);
                if (shift > 2 && shift <= SeamDetector.MAX_BAND && SeamComb.inRange(b, e.length())
                        && e.peak(b, tooth) > top) {
                    top = e.peak(b, tooth);
                    best = b;
                }
            }
            SeamComb.Period p = best < 0 ? null : new SeamComb.Period(pitch, Math.floorMod(best, pitch), 0, 0, 0);
            if (p != null && gapsOnTeeth(e, p) && SeamTemplate.valleyAt(image, y[0], y[1], pitch, p.phase())) {
                px[s] = p;
            }
        }
    }

    /** @return whether every gap of zeros along the evidence lies within 2 px of a tooth of the period */
    static boolean gapsOnTeeth(SeamEvidence e, SeamComb.Period p) {
        for (int b = 0; b < e.length(); b++) {
            int d = Math.floorMod(b - p.phase(), p.pitch());
            if (e.zeros[b] >= 0.5 && (b == 0 || e.zeros[b - 1] < 0.5) && Math.min(d, p.pitch() - d) > 2) {
                return false;
            }
        }
        return true;
    }

    /**
     * The bands found so far plus a band of the requested width at every seam of the fold that none of them covers
     * (within 2 px); the first and last tiles are whole, at least one step wide.
     */
    static List<Band> withTeeth(List<Band> found, SeamTemplate.Fold f, int n, int stepWidth, int from,
            int to) {
        return withTeeth(found, f, n, stepWidth, from, to, "shading");
    }

    /** As {@link #withTeeth(List, SeamTemplate.Fold, int, int, int, int)}, the added bands with the given look. */
    static List<Band> withTeeth(List<Band> found, SeamTemplate.Fold f, int n, int stepWidth, int from, int to,
            String look) {
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
                    out.add(toothBand(b, n, stepWidth, f.corner(), line, o.from(), look));
                }
                line = Math.max(line, o.to());
            }
            if (line < to) {
                out.add(toothBand(b, n, stepWidth, f.corner(), line, to, look));
            }
        }
        out.sort((x, y) -> x.start() != y.start() ? Integer.compare(x.start(), y.start()) : Integer.compare(x.from(),
                y.from()));
        return out;
    }

    /** @return whether a vertical band (widened by a pixel) covers a column that is zero in most of its lines */
    static boolean coversGap(Volume image, Band b) {
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
    private static Band toothBand(int b, int n, int stepWidth, double strength, int from, int to, String look) {
        return new Band(Math.max(0, b - stepWidth / 2), Math.min(n, b - stepWidth / 2 + stepWidth), strength, from, to,
                List.of(look));
    }
}
