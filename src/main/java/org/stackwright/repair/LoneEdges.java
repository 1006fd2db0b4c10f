package org.stackwright.repair;

import static org.stackwright.repair.SeamDetector.MAX_BAND;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.repair.SeamDetector.Band;
import org.stackwright.repair.SeamDetector.Line;

/**
 * Strong edges without the support of a repeating comb: along an axis (or tile row) without a period they may still
 * be seams when strong enough ({@link #lone}); next to the seams found they are lines that do not repeat with the
 * tile step, a defective column or a structure, handed to the user instead ({@link #lines}).
 */
final class LoneEdges {

    /** a seam that does not repeat must be this many times stronger than the threshold */
    static final double LONE = 2;

    private LoneEdges() {
    }

    /**
     * Without a period: the strong edges that are not narrow lines, each a band of the requested width. Without the
     * support of repeating teeth an edge must exceed {@link #LONE} times the threshold (structure that runs along a
     * line gives evidence of the size of the threshold now and then). The first zero of a gap of zeros (zero in at
     * least half the lines, at most {@link SeamDetector#MAX_BAND} wide) is a seam whatever its sign test says: a
     * stitcher leaves no data there, no structure makes whole lines zero (the test's empirical null can scale even
     * a gap's edge below the limit).
     */
    static List<Band> lone(SeamEvidence e, double thresholdIn, int stepWidth, int from, int to) {
        double threshold = LONE * thresholdIn;
        int n = e.length();
        List<Band> out = new ArrayList<>();
        for (int b = 1; b < n; b++) {
            double s = e.combStrength(b, threshold / 2);
            boolean peak = s > threshold && s >= e.combStrength(b - 1, threshold / 2)
                    && s >= e.combStrength(b + 1 < n ? b + 1 : b, threshold / 2);
            if (peak || gapStart(e, b)) {
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

    /** @return whether b is the first zero of a gap: zero in at least half the lines, at most MAX_BAND wide */
    private static boolean gapStart(SeamEvidence e, int b) {
        if (e.zeros[b] < 0.5 || e.zeros[b - 1] >= 0.5) {
            return false;
        }
        int end = b;
        while (end < e.length() && e.zeros[end] >= 0.5) {
            end++;
        }
        return end - b <= MAX_BAND;
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
}
