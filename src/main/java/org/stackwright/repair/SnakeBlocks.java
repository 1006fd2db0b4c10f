package org.stackwright.repair;

import static org.stackwright.repair.SeamDetector.MAX_BAND;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.volume.Volume;

/**
 * The vertical seams of an uncropped snake-order mosaic with covered overlap from blocks of single tiles, as
 * {@link GridBlocks} finds them, but with the tile rows in two phases. A snake places every other tile row right to
 * left: there the later left tile covers the overlap, and the visible seams lie one overlap further right. The image
 * is a whole number of steps plus one overlap wide, so the rows placed right to left have their seams at k s + (n
 * mod s), the others at k s. One grid of {@link GridBlocks} over all tile rows adds the shifted rows' evidence at the
 * wrong place (and the tile rows' own combs may be too weak for a comb, or take the unshifted phase). Here the
 * tile rows of one parity are read at the shifted teeth, per tooth the squared z-scores of all rows add as a
 * chi-square (Wilson and Hilferty 1931, as in {@link GridBlocks}), judged with the limits of {@link GridBlocks}.
 * A trimmed mosaic's width fixes neither step nor shift: {@link #trimmed} searches both.
 */
final class SnakeBlocks {

    /**
     * The snake grid found.
     *
     * @param step tile step along x
     * @param shift the phase of the shifted tile rows (n mod step)
     * @param parity the parity of the tile rows whose seams are shifted
     * @param teeth the unshifted rows' seam borders (the shifted rows' are these plus shift)
     * @param z combined evidence of each tooth
     * @param score the most strong teeth less empty ones, then the most evidence (the score of {@link GridBlocks})
     */
    record Snake(int step, int shift, int parity, int[] teeth, double[] z, double score) {
    }

    private SnakeBlocks() {
    }

    /**
     * @param cutsY {start, end} of the horizontal seam bands found (one per border between tile rows), ascending
     * @param ex step evidence for vertical seams over the whole height (the seeds of the steps tried)
     * @return the best snake grid that passes the limits of {@link GridBlocks}, or null
     */
    static Snake find(Volume image, int[][] cutsY, SeamEvidence ex, double tooth, double threshold) {
        int w = image.width();
        int h = image.height();
        List<SeamEvidence> blocks = new ArrayList<>();
        List<Integer> row = new ArrayList<>();
        int from = 0;
        for (int i = 0; i <= cutsY.length; i++) {
            int to = i < cutsY.length ? cutsY[i][0] - GridBlocks.MARGIN : h;
            if (to - from >= GridBlocks.MIN_LINES) {
                blocks.add(SeamEvidence.of(image, true, from, to, true));
                row.add(i);
            }
            from = i < cutsY.length ? cutsY[i][1] + GridBlocks.MARGIN : h;
        }
        Snake best = null;
        for (int s : GridBlocks.steps(ex, w, tooth)) {
            int shift = w - (w / s) * s;
            // a covered overlap: 3 px or more (as TileRowSeams.snakeRows) up to MAX_BAND
            if (shift < 3 || shift > MAX_BAND) {
                continue;
            }
            for (int parity = 0; parity < 2; parity++) {
                Snake sn = at(blocks, row, s, shift, parity, w, tooth, threshold);
                if (sn != null && (best == null || sn.score() > best.score())) {
                    best = sn;
                }
            }
        }
        return best;
    }

    /**
     * The snake grid of a trimmed mosaic ({@link SeamComb#freePhase}): its width no longer gives the step, the phase
     * or the overlap, so all three are searched, as {@link GridBlocks#trimmed} lays a comb of free pitch and phase over
     * the blocks' combined evidence, with the odd tile rows read shifted by 3 px up to {@link SeamDetector#MAX_BAND}
     * either way (a covered overlap; the direction says which parity was placed right to left). Per tooth the squared
     * z-scores of the blocks add as a chi-square (each block within one common pixel of the tooth); a tooth within
     * {@link SeamDetector#MAX_BAND} of an end, in either parity, is not looked for. Judged and ranked as
     * {@link GridBlocks#trimmed} judges its combs; with the shift searched too, the rows of each parity must also show
     * their own seams, strong in at least half the teeth (as {@link GridBlocks} asks of each axis of a grid), else
     * stray steps in one parity make a grid (measured: check c-snake s20207, uncropped but read as trimmed, gave step
     * 91 for 110 with one strong tooth per parity asked; asking {@link SeamComb#STRONG_SHARE} lost crop-tune s7207).
     *
     * @param cutsY {start, end} of the horizontal seam bands found (one per border between tile rows), ascending
     * @return the best snake grid, or null when none passes
     */
    static Snake trimmed(Volume image, int[][] cutsY, double tooth, double threshold) {
        int n = image.width();
        int h = image.height();
        List<double[]> sq = new ArrayList<>();
        List<Integer> row = new ArrayList<>();
        int from = 0;
        for (int i = 0; i <= cutsY.length; i++) {
            int to = i < cutsY.length ? cutsY[i][0] - GridBlocks.MARGIN : h;
            if (to - from >= GridBlocks.MIN_LINES) {
                SeamEvidence e = SeamEvidence.of(image, true, from, to, true);
                double[] q = new double[n];
                for (int b = 1; b < Math.min(n, e.length()); b++) {
                    q[b] = e.combStrength(b, tooth) > 0 ? e.step[b] * e.step[b] : 0;
                }
                sq.add(q);
                row.add(i);
            }
            from = i < cutsY.length ? cutsY[i][1] + GridBlocks.MARGIN : h;
        }
        int odd = 0;
        for (int r : row) {
            odd += r % 2;
        }
        if (odd == 0 || odd == row.size()) {
            return null;
        }
        // per parity, the squared evidence summed over its blocks
        double[] even = new double[n];
        double[] shifted = new double[n];
        int evenBlocks = sq.size() - odd;
        for (int k = 0; k < sq.size(); k++) {
            double[] into = row.get(k) % 2 == 0 ? even : shifted;
            for (int b = 0; b < n; b++) {
                into[b] += sq.get(k)[b];
            }
        }
        int blocks = sq.size();
        Snake best = null;
        double[] bestRank = null;
        for (int s = SeamComb.MIN_PITCH; s < n; s++) {
            for (int d = -MAX_BAND; d <= MAX_BAND; d++) {
                if (Math.abs(d) < 3 || 2 * Math.abs(d) >= s) {
                    continue;
                }
                for (int p = 0; p < s; p++) {
                    List<Integer> at = new ArrayList<>();
                    List<Double> zs = new ArrayList<>();
                    int strong = 0;
                    int strongEven = 0;
                    int strongOdd = 0;
                    double sum = 0;
                    double all = 0;
                    for (int b = p; b < n; b += s) {
                        if (Math.min(b, b + d) <= MAX_BAND || n - Math.max(b, b + d) <= MAX_BAND) {
                            continue;
                        }
                        int top = b;
                        double zt = Double.NEGATIVE_INFINITY;
                        for (int w = -1; w <= 1; w++) {
                            double z = SeamEvidence.wilsonHilferty(even[b + w] + shifted[b + d + w], blocks);
                            if (z > zt) {
                                zt = z;
                                top = b + w;
                            }
                        }
                        at.add(top);
                        zs.add(zt);
                        strongEven += SeamEvidence.wilsonHilferty(even[top], evenBlocks) > tooth ? 1 : 0;
                        strongOdd += SeamEvidence.wilsonHilferty(shifted[top + d], odd) > tooth ? 1 : 0;
                        all += Math.max(0, zt);
                        if (zt > tooth) {
                            strong++;
                            sum += zt;
                        }
                    }
                    int teeth = at.size();
                    if (strong < 2 || strong < SeamComb.STRONG_SHARE * teeth || all / Math.sqrt(teeth) <= threshold
                            || 2 * strongEven < teeth || 2 * strongOdd < teeth) {
                        continue;
                    }
                    double[] rank = {2 * strong - teeth, strong, -(teeth - strong), sum};
                    if (bestRank == null || java.util.Arrays.compare(rank, bestRank) > 0) {
                        bestRank = rank;
                        int[] t = at.stream().mapToInt(Integer::intValue).toArray();
                        // the step from the teeth's exact places, as GridBlocks.trimmed
                        int step = Math.round((t[t.length - 1] - t[0]) / (float) (t.length - 1));
                        best = new Snake(step, d, 1, t, zs.stream().mapToDouble(Double::doubleValue).toArray(),
                                score(strong, teeth, all));
                    }
                }
            }
        }
        return best;
    }

    /** @return the snake grid of step s with the rows of the given parity shifted, or null when it fails a limit */
    private static Snake at(List<SeamEvidence> blocks, List<Integer> row, int s, int shift, int parity, int w,
            double tooth, double threshold) {
        int even = 0;
        for (int r : row) {
            even += r % 2 == 0 ? 1 : 0;
        }
        // both parities must be read, else the grid is GridBlocks' own
        if (even == 0 || even == row.size()) {
            return null;
        }
        int[] shifts = new int[blocks.size()];
        for (int k = 0; k < shifts.length; k++) {
            shifts[k] = row.get(k) % 2 == parity ? shift : 0;
        }
        GridBlocks.Axis ax = GridBlocks.teethOverBlocks(blocks, shifts, s, w, tooth);
        int[] t = ax.teeth();
        int strong = ax.strong();
        double sum = ax.sum();
        if (strong < 2 || 2 * strong < t.length || strong < SeamComb.STRONG_SHARE * t.length
                || sum / Math.sqrt(t.length) <= threshold) {
            return null;
        }
        return new Snake(s, shift, parity, t, ax.z(), score(strong, t.length, sum));
    }

    /** @return the score of {@link GridBlocks}: the most strong teeth less empty ones, then the most evidence */
    static double score(int strong, int teeth, double sum) {
        return (2 * strong - teeth) * 1e6 + sum;
    }

    /** @return the score of the x axis of a grid of {@link GridBlocks} (its teeth above the tooth limit, their sum) */
    static double scoreX(GridBlocks.Grid g, double tooth) {
        int strong = 0;
        double sum = 0;
        for (double z : g.zX()) {
            strong += z > tooth ? 1 : 0;
            sum += Math.max(0, z);
        }
        return score(strong, g.zX().length, sum);
    }
}
