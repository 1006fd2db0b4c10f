package org.stackwright.repair;

import static org.stackwright.repair.SeamDetector.MAX_BAND;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

import org.stackwright.volume.Volume;

/**
 * The seams of an uncropped mosaic of three or more whole tiles along an axis whose step evidence over the whole
 * image is too weak for a comb. Gains differ tile by tile, so the step of a vertical seam keeps its sign along one
 * tile row but may change it from row to row, and over the whole height the rows cancel (the same for a horizontal
 * seam along the tile columns). Cut into the blocks of single tiles along the other axis, each block shows the seam
 * with one sign ({@link SeamEvidence}, one tile per block); one grid holds for all blocks, so their squared z-scores
 * at a tooth add as a chi-square with one degree of freedom per block (turned into a normal deviate by Wilson &
 * Hilferty 1931, as in {@link SeamEvidence}), which passes where no single block does.
 *
 * <p>The grid is anchored at the first pixel and made of m &gt;= 3 whole tiles of its step s (n - m s in
 * [0, {@link SeamDetector#MAX_BAND}]: an overlap past the last step at most), the rule of two halves
 * ({@code SeamDetector.halves}) carried to more tiles. Its step is a divisor of one of the {@link #SEEDS} strongest
 * borders along the axis. A tooth k s is strong when its blocks pass the tooth limit; the teeth are judged as a
 * comb's ({@link SeamComb}), over all the teeth of the axes asked together, since the tiles form one grid: at least
 * two strong teeth and {@link SeamComb#STRONG_SHARE} of all, and their summed evidence over the square root of their
 * number above the seam limit; each axis asked must itself have at least half of its teeth strong (so that a grid of
 * quarter tiles cannot pass on one seam that halves the axis). Where the gains of two neighbouring tiles hardly
 * differ, a seam of the grid shows no step in any block, and the grid's other teeth carry it. Edges of narrow lines
 * (a defective column, a thin filament, a sensor column repeated in every tile) give no evidence, so a line that
 * does not repeat, or one inside each tile, is never a seam.
 */
final class GridBlocks {

    /**
     * Strongest borders along an axis (one per {@link SeamDetector#MAX_BAND}) tried as one seam of the grid: a few,
     * as the strongest border over the whole image may be a structure (no source; not tuned).
     */
    static final int SEEDS = 3;
    /** lines left out on either side of a cut between blocks: the seam there and the one-pixel doubt of its place */
    static final int MARGIN = 3;
    /** a block shorter than this many lines is left out (fewer lines than two blocks of the sign test) */
    static final int MIN_LINES = 2 * SeamEvidence.BLOCK;

    /**
     * The grid found.
     *
     * @param stepX tile step along x (0 when not asked or not found)
     * @param stepY tile step along y
     * @param teethX vertical seam borders
     * @param teethY horizontal seam borders
     * @param zX combined evidence of each vertical tooth
     * @param zY combined evidence of each horizontal tooth
     */
    record Grid(int stepX, int stepY, int[] teethX, int[] teethY, double[] zX, double[] zY) {
    }

    /** One axis tested: its teeth at their best offset and the combined evidence of each, or null. */
    record Axis(int step, int[] teeth, double[] z, double sum, int strong) {
    }

    private GridBlocks() {
    }

    /**
     * @param image the image, not modified
     * @param cutsX {start, end} of the vertical seam bands already found, ascending (null when x needs a grid)
     * @param cutsY {start, end} of the horizontal seam bands already found (null when y needs a grid)
     * @param ex step evidence for vertical seams over the whole height
     * @param ey step evidence for horizontal seams over the whole width
     * @return the grid of the axes that needed one, or null when none passes on every axis asked
     */
    static Grid find(Volume image, int[][] cutsX, int[][] cutsY, SeamEvidence ex, SeamEvidence ey, double tooth,
            double threshold) {
        int w = image.width();
        int h = image.height();
        List<Integer> sxs = cutsX != null ? List.of(0) : steps(ex, w, tooth);
        List<Integer> sys = cutsY != null ? List.of(0) : steps(ey, h, tooth);
        Map<Integer, List<SeamEvidence>> rowsOf = new HashMap<>();
        Map<Integer, List<SeamEvidence>> colsOf = new HashMap<>();
        Grid best = null;
        double bestScore = Double.NEGATIVE_INFINITY;
        for (int sx : sxs) {
            for (int sy : sys) {
                Axis ax = null;
                Axis ay = null;
                if (cutsX == null) {
                    // vertical seams, over the tile rows cut by the horizontal seams (found or of this grid)
                    int[][] cy = cutsY != null ? cutsY : cuts(teeth(sy, h));
                    List<SeamEvidence> blocks = rowsOf.computeIfAbsent(sy, k -> blocks(image, true, cy, h));
                    ax = axis(blocks, sx, w, tooth);
                    if (ax == null) {
                        continue;
                    }
                }
                if (cutsY == null) {
                    int[][] cx = cutsX != null ? cutsX : cuts(teeth(sx, w));
                    List<SeamEvidence> blocks = colsOf.computeIfAbsent(sx, k -> blocks(image, false, cx, w));
                    ay = axis(blocks, sy, h, tooth);
                    if (ay == null) {
                        continue;
                    }
                }
                int strong = 0;
                int teeth = 0;
                double sum = 0;
                for (Axis a : new Axis[] {ax, ay}) {
                    if (a != null) {
                        strong += a.strong();
                        teeth += a.teeth().length;
                        sum += a.sum();
                    }
                }
                if (strong < 2 || strong < SeamComb.STRONG_SHARE * teeth || sum / Math.sqrt(teeth) <= threshold) {
                    continue;
                }
                // as a comb: the most strong teeth less empty ones (a multiple of the step explains a subset, a
                // fraction has empty teeth), then the most evidence
                double score = (2 * strong - teeth) * 1e6 + sum;
                if (score > bestScore) {
                    bestScore = score;
                    best = new Grid(ax == null ? 0 : ax.step(), ay == null ? 0 : ay.step(),
                            ax == null ? new int[0] : ax.teeth(), ay == null ? new int[0] : ay.teeth(),
                            ax == null ? new double[0] : ax.z(), ay == null ? new double[0] : ay.z());
                }
            }
        }
        return best;
    }

    /**
     * The seams of a trimmed mosaic along one axis (its end tiles partial, the grid's phase free), the other axis's
     * seams known: the blocks of single tiles cut there combine their step evidence at every border as in
     * {@link #find}, and a comb of free pitch and phase is laid over the combined evidence, judged as
     * {@link SeamComb}'s (at least two strong teeth and {@link SeamComb#STRONG_SHARE} of all, their summed evidence
     * over the square root of their number above the seam limit; the most strong teeth less empty ones, then the most
     * strong teeth, then the fewest empty ones, then the most evidence). No tooth is looked for within
     * {@link SeamDetector#MAX_BAND} of an end, where an overlap past the last step looks the same.
     *
     * @param alongX true for vertical seams (the blocks are tile rows cut at the horizontal seams)
     * @param cuts {start, end} of the other axis's seam bands, ascending
     * @param pitches {lowest, highest} pitch searched ({@link ShadingRules#pitchesX}), null for all
     * @return the grid of the one axis (the other axis's step 0; its step from the strong teeth, {@link #exactStep}),
     *     or null when no comb passes
     */
    static Grid trimmed(Volume image, boolean alongX, int[][] cuts, int[] pitches, double tooth, double threshold) {
        int n = alongX ? image.width() : image.height();
        List<SeamEvidence> blocks = blocks(image, alongX, cuts, alongX ? image.height() : image.width());
        if (blocks.size() < 2) {
            return null;
        }
        double[] z = new double[n];
        for (int b = 0; b < n; b++) {
            double chi = 0;
            for (SeamEvidence e : blocks) {
                double step = b > 0 && b < e.length() && e.combStrength(b, tooth) > 0 ? e.step[b] : 0;
                chi += step * step;
            }
            z[b] = SeamEvidence.wilsonHilferty(chi, blocks.size());
        }
        int[] bestAt = null;
        double[] bestZ = null;
        int bestS = 0;
        double[] bestRank = null;
        int lo = pitches == null ? SeamComb.MIN_PITCH : Math.max(SeamComb.MIN_PITCH, pitches[0]);
        int hi = pitches == null ? n - 1 : Math.min(n - 1, pitches[1]);
        for (int s = lo; s <= hi; s++) {
            for (int p = 0; p < s; p++) {
                List<Integer> at = new ArrayList<>();
                List<Double> zs = new ArrayList<>();
                int strong = 0;
                double sum = 0;
                double all = 0;
                for (int b = p; b < n; b += s) {
                    if (b <= MAX_BAND || n - b <= MAX_BAND || !SeamComb.inRange(b, n)) {
                        continue;
                    }
                    int top = b;
                    for (int d = -1; d <= 1; d++) {
                        if (b + d > 0 && b + d < n && z[b + d] > z[top]) {
                            top = b + d;
                        }
                    }
                    at.add(top);
                    zs.add(z[top]);
                    all += Math.max(0, z[top]);
                    if (z[top] > tooth) {
                        strong++;
                        sum += z[top];
                    }
                }
                int teeth = at.size();
                if (strong < 2 || strong < SeamComb.STRONG_SHARE * teeth || all / Math.sqrt(teeth) <= threshold) {
                    continue;
                }
                double[] rank = {2 * strong - teeth, strong, -(teeth - strong), sum};
                if (bestRank == null || java.util.Arrays.compare(rank, bestRank) > 0) {
                    bestRank = rank;
                    bestS = s;
                    bestAt = at.stream().mapToInt(Integer::intValue).toArray();
                    bestZ = zs.stream().mapToDouble(Double::doubleValue).toArray();
                }
            }
        }
        if (bestAt == null) {
            return null;
        }
        // the step from the strong teeth's exact places (their one-pixel windows let neighbouring pitches tie; a weak
        // tooth's place is the largest noise in its window), the weak teeth put on the grid of the strong ones
        bestS = exactStep(bestAt, bestZ, tooth);
        return alongX ? new Grid(bestS, 0, bestAt, new int[0], bestZ, new double[0])
                : new Grid(0, bestS, new int[0], bestAt, new double[0], bestZ);
    }

    /**
     * The step of a comb's teeth from the places of its strong teeth (above the tooth limit), by least squares over
     * their tooth numbers; the weak teeth are moved, in place, onto that grid through the strong teeth (their own
     * place within the one-pixel window is where the noise peaks). All teeth count when fewer than two are strong.
     *
     * @param at the teeth, ascending, one step apart give or take a pixel (modified: weak teeth moved)
     * @param z the evidence of each tooth (not modified)
     * @return the step, rounded to a pixel
     */
    static int exactStep(int[] at, double[] z, double tooth) {
        int strong = 0;
        for (double v : z) {
            strong += v > tooth ? 1 : 0;
        }
        // tooth numbers k from the first tooth; least squares of at[k] = a + k s over the teeth used
        double sk = 0;
        double sb = 0;
        double skk = 0;
        double skb = 0;
        int m = 0;
        for (int k = 0; k < at.length; k++) {
            if (strong >= 2 && z[k] <= tooth) {
                continue;
            }
            sk += k;
            sb += at[k];
            skk += (double) k * k;
            skb += (double) k * at[k];
            m++;
        }
        double den = m * skk - sk * sk;
        if (m < 2 || den <= 0) {
            return at.length > 1 ? Math.round((at[at.length - 1] - at[0]) / (float) (at.length - 1)) : 0;
        }
        double s = (m * skb - sk * sb) / den;
        double a = (sb - s * sk) / m;
        int step = (int) Math.round(s);
        for (int k = 0; k < at.length; k++) {
            if (strong >= 2 && z[k] <= tooth) {
                at[k] = (int) Math.round(a + k * s);
            }
        }
        return step;
    }

    /**
     * Three whole tiles along an axis of an uncropped mosaic, the other axis's seams known, where one of the two seams
     * shows and the other does not: each tile's vignetting makes a step at its borders (its two edges differ where the
     * optical centre is off the tile's centre), the same at every seam, and where two tiles' gains step the other way
     * by about as much, that seam shows no step in any block (measured on tune draws e-lines-s7404, s7410, s7411,
     * s7415 of the independent generator: one tooth at z 7 to 17 in blocks of single tiles, the other 1 to 4). The
     * one seam that shows then fixes the grid, as the one seam that halves an axis fixes two tiles
     * ({@code SeamDetector.halves}): a grid of three whole tiles of step s (n - 3 s in [0, {@link
     * SeamDetector#MAX_BAND}]) whose stronger tooth, over the blocks cut at the other axis's seams, exceeds the seam
     * limit (a seam by itself, as a lone edge must), or {@link SeamDetector#OTHER_AXIS} of it at the other axis's step
     * (square tiles: one step tested instead of all, as when an axis borrows the other's step); of several steps, the
     * one whose teeth show the most evidence.
     *
     * @param alongX true for vertical seams (the blocks are tile rows cut at the horizontal seams)
     * @param cuts {start, end} of the other axis's seam bands, ascending
     * @param otherStep the other axis's step, 0 when it has none
     * @return the grid of the one axis (the other axis's step 0), or null when no tooth passes
     */
    static Grid thirds(Volume image, boolean alongX, int[][] cuts, int otherStep, double tooth, double threshold) {
        int n = alongX ? image.width() : image.height();
        List<SeamEvidence> blocks = blocks(image, alongX, cuts, alongX ? image.height() : image.width());
        if (blocks.size() < 2) {
            return null;
        }
        Axis best = null;
        double[] rank = null;
        for (int s = Math.max(SeamComb.MIN_PITCH, (n - MAX_BAND + 2) / 3); s <= n / 3; s++) {
            if (n / s != 3 || !wholeTiles(s, n)) {
                continue;
            }
            Axis a = teethOverBlocks(blocks, new int[blocks.size()], s, n, tooth);
            double top = Math.max(a.z()[0], a.z()[1]);
            double[] r = {top, a.z()[0] + a.z()[1]};
            double limit = s == otherStep ? SeamDetector.OTHER_AXIS * threshold : threshold;
            if (top > limit && (rank == null || java.util.Arrays.compare(r, rank) > 0)) {
                rank = r;
                best = a;
            }
        }
        if (best == null) {
            return null;
        }
        // the step from the stronger tooth's exact place (the teeth's one-pixel windows let neighbouring steps tie)
        int k = best.z()[0] >= best.z()[1] ? 0 : 1;
        int s = Math.round(best.teeth()[k] / (float) (k + 1));
        // the other seam, which does not show, lies where the step puts it, not at its tooth's best pixel (tune2
        // b-shading-s30113: that tooth at 233 for the seam at 236, step 118)
        int[] teeth = best.teeth().clone();
        teeth[1 - k] = (2 - k) * s;
        return alongX ? new Grid(s, 0, teeth, new int[0], best.z(), new double[0])
                : new Grid(0, s, new int[0], teeth, new double[0], best.z());
    }

    /**
     * @return the steps s of grids of m &gt;= 3 whole tiles (0 &lt;= n - m s &lt;= MAX_BAND) that have one of the
     *     {@link #SEEDS} strongest borders of the axis on a tooth (k s within one pixel of it)
     */
    static List<Integer> steps(SeamEvidence e, int n, double tooth) {
        List<Integer> seeds = seeds(e, n, tooth);
        List<Integer> out = new ArrayList<>();
        for (int a : seeds) {
            for (int k = 1; k * SeamComb.MIN_PITCH <= a + 1; k++) {
                int s = Math.round(a / (float) k);
                if (s >= SeamComb.MIN_PITCH && Math.abs(k * s - a) <= 1 && wholeTiles(s, n) && !out.contains(s)) {
                    out.add(s);
                }
            }
        }
        return out;
    }

    /** @return the {@link #SEEDS} strongest borders along the axis, one per {@link SeamDetector#MAX_BAND} */
    private static List<Integer> seeds(SeamEvidence e, int n, double tooth) {
        List<Integer> seeds = new ArrayList<>();
        for (int i = 0; i < SEEDS; i++) {
            int top = -1;
            for (int b = 1; b < n; b++) {
                double s = e.peak(b, tooth);
                boolean far = true;
                for (int q : seeds) {
                    far &= Math.abs(q - b) > MAX_BAND;
                }
                if (s > 0 && far && (top < 0 || s > e.peak(top, tooth))) {
                    top = b;
                }
            }
            if (top < 0) {
                break;
            }
            seeds.add(top);
        }
        return seeds;
    }

    /** @return whether m &gt;= 3 whole tiles of step s fill an axis of n pixels, give or take an overlap */
    static boolean wholeTiles(int s, int n) {
        int m = n / s;
        return m >= 3 && n - m * s <= MAX_BAND;
    }

    /** @return the teeth s, 2s, ... of m whole tiles along n */
    static int[] teeth(int s, int n) {
        int m = n / s;
        int[] t = new int[m - 1];
        for (int k = 1; k < m; k++) {
            t[k - 1] = k * s;
        }
        return t;
    }

    /**
     * The evidence of each block between the cuts: lines [end of a cut + MARGIN, start of the next - MARGIN).
     *
     * @param cuts {start, end} of each seam band across the lines, ascending
     */
    private static List<SeamEvidence> blocks(Volume image, boolean alongX, int[][] cuts, int lines) {
        List<SeamEvidence> out = new ArrayList<>();
        int from = 0;
        for (int i = 0; i <= cuts.length; i++) {
            int to = i < cuts.length ? cuts[i][0] - MARGIN : lines;
            if (to - from >= MIN_LINES) {
                out.add(SeamEvidence.of(image, alongX, from, to, true));
            }
            from = i < cuts.length ? cuts[i][1] + MARGIN : lines;
        }
        return out;
    }

    /** @return the teeth of a grid as cuts of one pixel each, {t, t + 1} */
    private static int[][] cuts(int[] teeth) {
        int[][] c = new int[teeth.length][];
        for (int i = 0; i < teeth.length; i++) {
            c[i] = new int[] {teeth[i], teeth[i] + 1};
        }
        return c;
    }

    /**
     * @return the teeth of step s with their squared step z-scores over the blocks as one chi-square each (at one
     *     offset within a pixel, the same for all blocks; 0 at the edges of a narrow line), or null when fewer than
     *     half of them pass the tooth limit (each axis of the grid must show its own teeth)
     */
    private static Axis axis(List<SeamEvidence> blocks, int s, int n, double tooth) {
        if (blocks.size() < 2) {
            return null;
        }
        Axis a = teethOverBlocks(blocks, new int[blocks.size()], s, n, tooth);
        return a.strong() > 0 && 2 * a.strong() >= a.teeth().length ? a : null;
    }

    /**
     * The grid's teeth of step s over an axis of n pixels, each placed within a pixel where the squared step
     * evidence summed over the blocks (each read shift[k] px further on) is largest, as a z (Wilson-Hilferty).
     */
    static Axis teethOverBlocks(List<SeamEvidence> blocks, int[] shift, int s, int n, double tooth) {
        int[] t = teeth(s, n);
        int[] at = new int[t.length];
        double[] z = new double[t.length];
        double sum = 0;
        int strong = 0;
        for (int i = 0; i < t.length; i++) {
            z[i] = Double.NEGATIVE_INFINITY;
            for (int d = -1; d <= 1; d++) {
                double chi = 0;
                for (int k = 0; k < blocks.size(); k++) {
                    SeamEvidence e = blocks.get(k);
                    int b = t[i] + d + shift[k];
                    double step = b > 0 && b < e.length() && e.combStrength(b, tooth) > 0 ? e.step[b] : 0;
                    chi += step * step;
                }
                double zc = SeamEvidence.wilsonHilferty(chi, blocks.size());
                if (zc > z[i]) {
                    z[i] = zc;
                    at[i] = t[i] + d;
                }
            }
            strong += z[i] > tooth ? 1 : 0;
            sum += Math.max(0, z[i]);
        }
        return new Axis(s, at, z, sum, strong);
    }
}
