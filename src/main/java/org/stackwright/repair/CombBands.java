package org.stackwright.repair;

import static org.stackwright.repair.SeamDetector.MAX_BAND;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;

/**
 * The seam bands a comb's teeth show: around each tooth, the offsets at which steps or corners (kinks) repeat in most
 * teeth are the ends of the seam (a dimmed band or a blending band has two); zeros nearby widen it to a gap. A comb
 * whose teeth catch no such repeating evidence is no tiling ({@link #repeats}).
 */
final class CombBands {

    /**
     * An end of a seam with less than this share of the summed evidence of its strongest end is dropped: removing
     * the median of the nearby steps biases the borders next to a strong edge slightly the other way.
     */
    static final double ECHO = 0.5;
    /** the ends of a seam start within this many pixels of its comb tooth (it may sit on a corner beside a step) */
    static final int NEAR = 6;

    private CombBands() {
    }

    /**
     * @return the period when its evidence repeats at one exact offset from most teeth (a step or a corner), else
     *     null: a comb whose teeth only catch unrelated evidence within their one-pixel windows is no tiling
     */
    static SeamComb.Period repeats(SeamEvidence e, SeamComb.Period p, double tooth) {
        if (p == null || p.strong() == 0) {
            return p;
        }
        int[] b = scored(p, e.length());
        return repeating(e, e.step, b, tooth).length > 0 || repeating(e, e.kink, b, tooth).length > 0 ? p : null;
    }

    /** The seam bands of a comb, over the lines [from, to). */
    static List<Band> seams(SeamEvidence e, SeamComb.Period p, double tooth, double threshold, int stepWidth, int from,
            int to) {
        int n = e.length();
        int[] borders = p.borders(n);
        int[] steps = repeating(e, e.step, scored(p, n), tooth);
        int[] kinks = repeating(e, e.kink, scored(p, n), tooth);
        List<Band> out = new ArrayList<>();
        for (int t : borders) {
            // within MAX_BAND or half a step of an end (an overlap past the last step is no seam; the comb was not
            // scored there) a tooth must show a seam by itself, as a lone edge must; further in (within a step of an
            // end only in a trimmed mosaic, whose end tiles are partial) a tooth is a seam as every inner tooth is
            // (an uncropped reading: the first and last tiles are whole, at least one step wide, so a tooth within a
            // step of an end must show a seam by itself)
            boolean nearEnd = SeamComb.freePhase()
                    ? SeamComb.atEnd(t, n) || SeamComb.withinHalfStep(t, n, p.pitch())
                    : n - t < p.pitch() - SeamComb.END_SLACK || t < p.pitch() - SeamComb.END_SLACK;
            if (nearEnd && nearest(e, t, tooth) <= threshold) {
                continue;
            }
            out.add(band(e, t, steps, kinks, stepWidth, from, to));
        }
        return out;
    }

    /**
     * @return the teeth that must show the repeating evidence: not one closer to the last pixel than the widest band
     *     ({@link SeamDetector#MAX_BAND}), which no seam between whole tiles can reach (the overlap past the last step
     *     of an uncropped mosaic with overlap, columns x step + overlap long). A tooth as near the first pixel is not
     *     excused (a comb of stray steps could pass on its inner teeth; a snake row's shifted first tooth is found by
     *     the row's search near the other rows' phase), nor are teeth further in, even within one step of an end where
     *     the comb's score does not look; all teeth when fewer than two are left
     */
    static int[] scored(SeamComb.Period p, int n) {
        int[] all = p.borders(n);
        if (all.length == 0 || all[0] <= MAX_BAND) {
            return all;
        }
        int[] inner = Arrays.stream(all).filter(b -> n - b > MAX_BAND).toArray();
        return inner.length >= 2 ? inner : all;
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
     * Offsets from the comb teeth (within {@link SeamDetector#MAX_BAND}) at which one kind of evidence repeats in most
     * teeth, one per group of neighbouring offsets (the offset of the largest summed evidence): the ends of a seam.
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
}
