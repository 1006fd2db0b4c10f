package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;
import org.stackwright.volume.Volume;

/**
 * The tile step of an axis from its gaps of zeros, when no comb and no fold of the shading found one. A gap of zeros
 * is a seam beyond doubt (a stitcher leaves no data there), and its first zero is a tile border exactly; in an
 * uncropped mosaic of tiles of one size the borders lie at multiples of the step from the first pixel, and the image
 * is a whole number of steps long plus an overlap of at most {@link SeamDetector#MAX_BAND}. The gaps and the length
 * then leave few steps; the largest is taken (the coarsest tiling, which adds the fewest seams nothing else shows): a
 * 3x3 mosaic with a gap on one of its two seams along an axis has the other seam where the length puts it, even
 * when its shading is too faint to show it. Two tiles are the case {@link SeamDetector} already handles as one seam
 * that halves the axis.
 */
final class GapTiling {

    private GapTiling() {
    }

    /**
     * @param gaps first zero of every gap along the axis, ascending
     * @param n length of the axis
     * @return the largest step s >= {@link SeamComb#MIN_PITCH} with every gap at a multiple of s and n - (n / s) s
     *     at most {@link SeamDetector#MAX_BAND}, whose seams are at most twice as many as the gaps (a seam without a
     *     gap is one nothing but the length shows; on a cropped mosaic the small divisors of a gap's position fit any
     *     length and would cut it into dozens of such seams), or 0 when there is no gap or no such step
     */
    static int step(int[] gaps, int n) {
        if (gaps.length == 0) {
            return 0;
        }
        for (int s = n / 2; s >= SeamComb.MIN_PITCH; s--) {
            if (n % s > SeamDetector.MAX_BAND || n / s - 1 > 2 * gaps.length) {
                continue;
            }
            boolean all = true;
            for (int g : gaps) {
                all &= g > 0 && g % s == 0;
            }
            if (all) {
                return s;
            }
        }
        return 0;
    }

    /**
     * Whether a comb agrees with the gaps of zeros along its evidence: true when there is no gap, or when the gaps and
     * the length admit no uncropped tiling ({@link #step} 0: a cropped mosaic, on which they say nothing of the
     * step); else the comb must be one of those tilings, its pitch leaving at most {@link SeamDetector#MAX_BAND} past
     * its last whole tile, its phase within a pixel of the first pixel and every gap's first zero within a pixel of a
     * tooth. A comb that misses them caught stray steps of the specimen.
     */
    static boolean admits(SeamEvidence e, SeamComb.Period p) {
        int n = e.length();
        int[] gaps = starts(e);
        if (gaps.length == 0 || step(gaps, n) == 0) {
            return true;
        }
        int s = p.pitch();
        if (n % s > SeamDetector.MAX_BAND || Math.min(p.phase() % s, s - p.phase() % s) > 1) {
            return false;
        }
        for (int g : gaps) {
            int d = Math.floorMod(g - p.phase(), s);
            if (Math.min(d, s - d) > 1) {
                return false;
            }
        }
        return true;
    }

    /** @return the first zero of every gap along the evidence (a run of pixels zero in at least half the lines) */
    static int[] starts(SeamEvidence e) {
        List<Integer> out = new ArrayList<>();
        for (int b = 1; b < e.length(); b++) {
            if (e.zeros[b] >= 0.5 && e.zeros[b - 1] < 0.5) {
                out.add(b);
            }
        }
        return out.stream().mapToInt(Integer::intValue).toArray();
    }

    /**
     * @param alongX true for vertical bands (columns), false for horizontal ones (rows)
     * @return the first line of each band (widened by a pixel) that is zero in more than half of the band's lines, a
     *     gap's first zero, ascending without repeats; bands without one are left out
     */
    static int[] starts(Volume image, List<Band> bands, boolean alongX) {
        List<Integer> out = new ArrayList<>();
        for (Band b : bands) {
            int g = firstZero(image, b, alongX);
            if (g >= 0 && !out.contains(g)) {
                out.add(g);
            }
        }
        return out.stream().mapToInt(Integer::intValue).sorted().toArray();
    }

    private static int firstZero(Volume image, Band b, boolean alongX) {
        int w = image.width();
        int h = image.height();
        int n = alongX ? w : h;
        int lines = alongX ? h : w;
        int l0 = Math.max(0, b.from());
        int l1 = Math.min(lines, b.to());
        float[] f = image.data();
        for (int i = Math.max(0, b.start() - 1); i < Math.min(n, b.end() + 1); i++) {
            int zeros = 0;
            for (int l = l0; l < l1; l++) {
                zeros += f[alongX ? l * w + i : i * w + l] == 0 ? 1 : 0;
            }
            if (2 * zeros > l1 - l0) {
                return i;
            }
        }
        return -1;
    }

    /**
     * The bands found so far that lie on a border of step s from the first pixel (within 2 px) plus a band of the
     * requested width at every other border, over the lines [from, to); bands off the borders are dropped (a
     * structure: the gaps fix the grid). The first and last tiles are whole.
     */
    static List<Band> onGrid(List<Band> found, int s, int n, int stepWidth, int from, int to) {
        List<Band> kept = found.stream().filter(b -> {
            int d = Math.floorMod(b.looks().contains("gap") ? b.start() : b.centre(), s);
            return Math.min(d, s - d) <= 2;
        }).toList();
        return ShadingRules.withTeeth(kept, new SeamTemplate.Fold(s, 0, 0, 0), n, stepWidth, from, to, "grid");
    }
}
